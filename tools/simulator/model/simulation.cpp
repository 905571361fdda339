#include "model/simulation.h"

#include <algorithm>
#include <stdexcept>

namespace dewmargin::sim {

void value_span::add(double v) {
  if (!seen) {
    min = max = v;
    seen = true;
    return;
  }
  min = std::min(min, v);
  max = std::max(max, v);
}

result<std::unique_ptr<simulation>> simulation::create(site_config cfg, building b, scenario s, simulation_options o) {
  auto bound = site_binding::bind(cfg, b);
  if (!bound) return bound.err();
  if (!(o.step_s > 0.0)) return make_error(error_code::invalid_argument, "step must be above 0 s");
  try {
    return std::unique_ptr<simulation>(new simulation(std::move(cfg), std::move(b), std::move(s), std::move(o)));
  } catch (const std::invalid_argument& e) {
    return make_error(error_code::invalid_argument, e.what());
  }
}

// binding_ is bound again here against the config copy this object owns (the one checked in
// create() is a temporary); both see the same ids, so it cannot fail differently.
simulation::simulation(site_config cfg, building b, scenario s, simulation_options o)
    : cfg_(std::move(cfg)),
      scenario_(std::move(s)),
      options_(std::move(o)),
      binding_(site_binding::bind(cfg_, b).value()),
      plant_(std::move(b), scenario_),
      sensors_(cfg_, binding_, plant_.layout(), scenario_, options_.seed, options_.step_s),
      truth_(plant_.layout()),
      watch_(cfg_, options_.ack_after_s, options_.operator_name, scenario_.at(0.0)),
      t_s_(scenario_.start_s) {}

void simulation::begin(std::vector<outbound>& out) {
  std::vector<outbound> due;
  sensors_.sample(t_s_, now(), plant_, scenario_, due);
  hand_out(due, out);
}

void simulation::advance(std::vector<outbound>& out) {
  if (done()) return;
  const double dt = std::min(options_.step_s, scenario_.end_s - t_s_);
  plant_.step(t_s_, dt);
  t_s_ += dt;
  truth_.record(t_s_, dt, plant_.zones(), scenario_);
  std::vector<outbound> due;
  sensors_.sample(t_s_, now(), plant_, scenario_, due);
  // The operator's screen goes quiet with the broker: no acknowledgements during an outage.
  if (options_.with_service && !broker_down()) watch_.operator_actions(t_s_, due);
  hand_out(due, out);
}

void simulation::hand_out(std::vector<outbound>& due, std::vector<outbound>& out) {
  if (broker_down()) {
    outage_.readings_dropped += static_cast<int>(due.size());
    return;
  }
  for (auto& m : due) out.push_back(std::move(m));
}

void simulation::on_message(const std::string& topic, std::string_view payload) {
  if (!options_.with_service) return;
  if (broker_down()) {
    ++outage_.messages_missed;
    return;
  }
  if (binding_.is_command_topic(topic)) {
    const auto c = binding_.decode(topic, payload);
    if (!c) {
      ++commands_.bad_commands;
      commands_.last_bad_command = c.err().message;
      return;
    }
    const plant_command& cmd = c.value();
    switch (cmd.target) {
      case command_target::setpoint:
        plant_.set_setpoint_c(cmd.index, cmd.value_c);
        commands_.setpoint_by_loop[plant_.layout().loops[cmd.index].id].add(cmd.value_c);
        break;
      case command_target::dew_point_request:
        plant_.set_dew_point_request_c(cmd.index, cmd.value_c);
        commands_.dew_point_request_by_unit[plant_.layout().dehumidifiers[cmd.index].id].add(cmd.value_c);
        break;
      case command_target::valve:
        if (plant_.zones()[cmd.index].valve_open != cmd.open) {
          ++(cmd.open ? commands_.valve_openings : commands_.valve_closings);
        }
        plant_.set_valve_open(cmd.index, cmd.open);
        break;
    }
    return;
  }
  watch_.on_message(topic, payload, t_s_);
}

std::vector<std::string> simulation::subscriptions() const {
  std::vector<std::string> topics = binding_.command_topics();
  for (auto& t : watch_.topics()) topics.push_back(std::move(t));
  return topics;
}

}  // namespace dewmargin::sim
