#pragma once
// One simulated day: the plant model, its sensors, the ground truth and (with the service)
// the commands that come back. Pure and single-threaded: the MQTT shell (or a test that
// drives the decision core directly) carries messages in and out and paces the steps.
#include <cstdint>
#include <map>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "dewmargin/config.h"
#include "dewmargin/result.h"
#include "model/ground_truth.h"
#include "model/plant_model.h"
#include "model/scenario.h"
#include "model/sensor_feed.h"
#include "model/service_watch.h"
#include "model/site_binding.h"

namespace dewmargin::sim {

struct simulation_options {
  bool with_service = true;  // false: the baseline, the plant on its design settings
  std::uint64_t seed = 20260714;
  double step_s = 5.0;         // model step and reading grid
  double ack_after_s = 300.0;  // simulated operator; <= 0: never acknowledges
  std::string operator_name = "sim-operator";
};

struct value_span {
  double min = 0.0;
  double max = 0.0;
  bool seen = false;
  void add(double v);
};

// What the plant was told (with the service), as the plant saw it.
struct command_record {
  std::map<std::string, value_span> setpoint_by_loop;           // commanded supply setpoints
  std::map<std::string, value_span> dew_point_request_by_unit;  // dehumidifier requests
  int valve_closings = 0;                                       // a valve command that changed the valve
  int valve_openings = 0;
  int bad_commands = 0;
  std::string last_bad_command;
};

// What a broker outage of the scenario swallowed.
struct outage_record {
  int readings_dropped = 0;  // messages the simulator did not publish
  int messages_missed = 0;   // messages from the service it did not hear
};

class simulation {
 public:
  // Fails when the config and the building disagree or the config's inputs cannot be fed.
  static result<std::unique_ptr<simulation>> create(site_config cfg, building b, scenario s, simulation_options o);
  simulation(const simulation&) = delete;
  simulation& operator=(const simulation&) = delete;

  // Readings at the start of the day (every sensor's first report due then).
  void begin(std::vector<outbound>& out);
  // One step: physics, ground truth, readings due, operator acknowledgements due. During a
  // broker outage of the scenario nothing is handed out.
  void advance(std::vector<outbound>& out);
  [[nodiscard]] bool done() const { return t_s_ >= scenario_.end_s - 1e-9; }

  // A message from the broker: a plant command (applied from the next step on) or one of
  // the service's states and events. Ignored without the service and during a broker outage.
  void on_message(const std::string& topic, std::string_view payload);
  [[nodiscard]] std::vector<std::string> subscriptions() const;

  [[nodiscard]] double now_s() const { return t_s_; }
  [[nodiscard]] timestamp now() const { return scenario_.at(t_s_); }
  [[nodiscard]] const site_config& config() const { return cfg_; }
  [[nodiscard]] const scenario& script() const { return scenario_; }
  [[nodiscard]] const simulation_options& options() const { return options_; }
  [[nodiscard]] const plant_model& plant() const { return plant_; }
  [[nodiscard]] const ground_truth& truth() const { return truth_; }
  [[nodiscard]] const service_watch& watch() const { return watch_; }
  [[nodiscard]] const command_record& commands() const { return commands_; }
  [[nodiscard]] const outage_record& outage() const { return outage_; }
  // Is the scenario's broker outage on now?
  [[nodiscard]] bool broker_down() const { return scenario_.broker_down(t_s_); }

 private:
  simulation(site_config cfg, building b, scenario s, simulation_options o);
  void hand_out(std::vector<outbound>& due, std::vector<outbound>& out);

  site_config cfg_;
  scenario scenario_;
  simulation_options options_;
  site_binding binding_;
  plant_model plant_;
  sensor_feed sensors_;
  ground_truth truth_;
  service_watch watch_;
  command_record commands_;
  outage_record outage_;
  double t_s_;
};

}  // namespace dewmargin::sim
