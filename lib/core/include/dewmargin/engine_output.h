#pragma once
// What the decision core hands to the shell after each reading, command or tick:
// messages to publish (in order), event records and per-minute samples for the store,
// and snapshots of the state a restarted service must restore.
#include <optional>
#include <string>
#include <vector>

#include "dewmargin/timestamp.h"

namespace dewmargin {

// How the publisher treats a message when the link is down and its outbox is full:
// alarm-related events are dropped last; states are keyed so only the latest is kept.
enum class message_class {
  alarm_event,   // an event that changes or concerns an alarm (band into/out of alarm, ack, shelve)
  event,         // any other event
  state,         // retained zone/loop/status state: only the latest per topic matters
  command,       // valve, setpoint and dehumidifier commands to the plant (retained)
};

struct outbound_message {
  std::string topic;
  std::string payload;
  bool retained = false;
  message_class cls = message_class::event;
};

enum class subject_type { site, zone, loop, dehumidifier };

inline const char* subject_type_name(subject_type s) {
  switch (s) {
    case subject_type::site: return "site";
    case subject_type::zone: return "zone";
    case subject_type::loop: return "loop";
    case subject_type::dehumidifier: return "dehumidifier";
  }
  return "site";
}

// One entry of <prefix>/events, as stored: indexed columns plus the published JSON.
struct event_record {
  timestamp ts;
  subject_type subject = subject_type::site;
  std::string subject_id;   // zone/loop/dehumidifier id; empty for the site
  std::string kind;         // band, ack, shelve, unshelve, valve, setpoint, dehumidify, input, rejected, service
  std::string json;         // the exact object published on <prefix>/events
};

// One zone over one minute, for reports.
struct zone_sample {
  timestamp minute_start;
  std::string zone;
  std::optional<double> min_margin_k;
  std::optional<double> max_dew_point_c;
  std::string worst_band;                 // worst band seen in the minute
  std::optional<double> air_temp_c;       // last values of the minute
  std::optional<double> rh_pct;
  std::optional<double> surface_min_c;
  std::optional<double> supply_c;
  std::optional<double> surface_rh_pct;   // room air's RH at the coldest surface (null: the reader computes it)
};

// What a restarted service restores (and re-publishes before it evaluates readings).
struct zone_snapshot {
  std::string zone;
  std::string band;                       // last band, informative
  bool alarm_active = false;
  bool acknowledged = true;
  std::optional<timestamp> shelved_until;
  std::string valve;                      // "open", "closed" or "" (never commanded / no valve)
  timestamp ts;
};

struct loop_snapshot {
  std::string loop;
  double setpoint_c = 0.0;
  timestamp ts;
};

struct restored_state {
  std::vector<zone_snapshot> zones;
  std::vector<loop_snapshot> loops;
};

struct engine_output {
  std::vector<outbound_message> messages;
  std::vector<event_record> events;
  std::vector<zone_sample> samples;
  std::vector<zone_snapshot> zone_snapshots;
  std::vector<loop_snapshot> loop_snapshots;

  void clear() {
    messages.clear();
    events.clear();
    samples.clear();
    zone_snapshots.clear();
    loop_snapshots.clear();
  }
  [[nodiscard]] bool empty() const {
    return messages.empty() && events.empty() && samples.empty() && zone_snapshots.empty() && loop_snapshots.empty();
  }
};

}  // namespace dewmargin
