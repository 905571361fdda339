#pragma once
// Helpers for the simulator's unit tests (test_sim_*.cpp):
//  - the demo config (config/demo.yaml), as is or with text replaced, loaded by the project's loader;
//  - the demo's scenarios (config/scenarios/*.yaml) read against it;
//  - run_through_core: closes the simulator's loop through the decision core in-process, in
//    lockstep on simulated time (no broker, no threads). The core takes each reading at its own
//    time and ticks once per simulated second, as dewmargind does in event-time mode; whatever
//    the core publishes goes straight back to the simulation. The end-to-end test
//    (tests/e2e) does the same through mosquitto and the real dewmargind.
#include <chrono>
#include <fstream>
#include <memory>
#include <sstream>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

#include "dewmargin/config_loader.h"
#include "dewmargin/engine.h"
#include "dewmargin/tick_driver.h"
#include "model/simulation.h"
#include "scenario_file/scenario_loader.h"

namespace dewmargin::sim::testing {

inline std::string demo_config_text() {
  std::ifstream in(std::string(DEWMARGIN_SOURCE_DIR) + "/config/demo.yaml");
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

// Every occurrence of each `from` replaced by its `to`.
inline std::string replaced(std::string text, const std::vector<std::pair<std::string, std::string>>& edits) {
  for (const auto& [from, to] : edits) {
    for (std::size_t at = text.find(from); at != std::string::npos; at = text.find(from, at + to.size())) {
      text.replace(at, from.size(), to);
    }
  }
  return text;
}

inline config_load_result load_demo(const std::vector<std::pair<std::string, std::string>>& edits = {}) {
  return load_config_text(replaced(demo_config_text(), edits), "demo.yaml");
}

inline std::string source_path(const std::string& relative) {
  return std::string(DEWMARGIN_SOURCE_DIR) + "/" + relative;
}

// A building and a day read from a scenario file of the repository (e.g. "config/scenarios/short.yaml").
struct day_to_play {
  building house;
  scenario day;
};
inline day_to_play scenario_from(const std::string& relative, const site_config& cfg,
                                 const std::string& config_label = "config/demo.yaml") {
  const auto r = load_scenario_file(source_path(relative), cfg, config_label);
  if (!r.ok()) {
    std::string text;
    for (const auto& e : r.errors) text += e.to_string() + "\n";
    throw std::runtime_error(relative + ": " + text);
  }
  return {*r.house, *r.day};
}
inline day_to_play demo_scenario(const std::string& name) {
  const auto loaded = load_demo();
  if (!loaded.ok()) throw std::runtime_error("config/demo.yaml: " + loaded.errors.front().to_string());
  return scenario_from("config/scenarios/" + name + ".yaml", *loaded.config);
}

inline void run_through_core(simulation& sim, const site_config& cfg) {
  engine core(cfg);
  engine_output batch;
  const auto route = [&]() {
    for (const auto& m : batch.messages) sim.on_message(m.topic, m.payload);
    batch.clear();
  };
  std::vector<outbound> out;
  sim.begin(out);
  core.begin(sim.now(), restored_state{}, batch);
  route();
  tick_driver ticks(sim.now());
  const auto deliver = [&](timestamp now) {
    ticks.advance_to(now, [&](timestamp at) {
      core.tick(at, batch);
      route();
    });
    for (const auto& m : out) {
      core.on_message(m.topic, m.payload, now, batch, m.retained);
      route();
    }
    out.clear();
  };
  deliver(sim.now());
  while (!sim.done()) {
    sim.advance(out);
    deliver(sim.now());
  }
}

}  // namespace dewmargin::sim::testing
