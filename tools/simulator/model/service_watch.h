#pragma once
// Watches what the service publishes (zone and loop states, events) for the status line, the
// summary and the verdict, and plays the operator: every unacknowledged alarm is acknowledged
// a few simulated minutes after it appears, through the service's own command topic. Pure:
// the shell hands in each message with the simulated time it arrived at.
//
// It also follows the service's own clock: in event-time mode every state and event carries
// the time of the readings the service has taken in (`ts`), so the newest `ts` tells how far
// behind the simulator the service is.
#include <map>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "dewmargin/config.h"
#include "dewmargin/timestamp.h"
#include "model/sensor_feed.h"

namespace dewmargin::sim {

struct watched_zone {
  std::string id;
  std::string band = "unknown";
  std::optional<double> margin_k;
  bool alarm_active = false;
  bool acknowledged = true;
  std::optional<double> ack_due_s;  // when the simulated operator will acknowledge
  bool ack_sent = false;
  std::vector<double> alarm_onsets_s;  // time of day each alarm became active (the service's `ts`)
};

struct service_tally {
  bool online = false;
  int alarms_raised = 0;  // a zone's alarm going from inactive to active
  int acknowledged = 0;   // `ack` events
  int acks_sent = 0;      // acknowledgements the simulated operator sent
  int valves_closed = 0;  // `valve` events by target position
  int valves_opened = 0;
  int setpoint_events = 0;
  int dehumidify_events = 0;
  int input_events = 0;
  int rejected = 0;
  int band_events = 0;
  std::map<std::string, int> alarms_by_zone;
  std::map<std::string, int> bands_entered;  // band name -> times entered (from band events)
  std::vector<double> unit_alarm_onsets_s;   // a dehumidifier's alarm raised (its fault), time of day
};

class service_watch {
 public:
  // ack_after_s <= 0: the operator never acknowledges.
  // `midnight`: the start of the simulated day, to turn the service's `ts` into times of day.
  service_watch(const site_config& cfg, double ack_after_s, std::string operator_name, timestamp midnight);

  // Topics to subscribe to: zone states, events, status.
  [[nodiscard]] std::vector<std::string> topics() const;
  // Takes a message; false when it is not one of the service's.
  bool on_message(const std::string& topic, std::string_view payload, double now_s);
  // Acknowledgements due at now_s.
  void operator_actions(double now_s, std::vector<outbound>& out);

  [[nodiscard]] const service_tally& tally() const { return tally_; }
  [[nodiscard]] const std::vector<watched_zone>& zones() const { return zones_; }
  // The zone with the lowest known margin (nullptr when none is known), and how many are unknown.
  [[nodiscard]] const watched_zone* worst_zone() const;
  [[nodiscard]] int unknown_zones() const;
  // The newest `ts` the service has published, as a time of day; none before its first state.
  [[nodiscard]] std::optional<double> service_time_s() const { return service_time_s_; }

 private:
  watched_zone* find(const std::string& id);
  void take_alarm(watched_zone& z, bool active, bool acknowledged, double now_s, std::optional<double> ts_s);
  void on_zone_state(std::string_view payload, double now_s);
  void on_event(std::string_view payload, double now_s);
  // The message's `ts` as a time of day (and the service's clock moved on to it).
  std::optional<double> take_time(const std::string& ts, double now_s);

  std::string prefix_;
  double ack_after_s_;
  std::string operator_name_;
  timestamp midnight_;
  std::vector<watched_zone> zones_;
  service_tally tally_;
  std::optional<double> service_time_s_;
};

}  // namespace dewmargin::sim
