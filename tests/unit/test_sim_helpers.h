#pragma once
// Helpers for the simulator's unit tests (test_sim_*.cpp):
//  - the demo config (config/demo.yaml), as is or with text replaced, loaded by the project's loader;
//  - run_through_core: closes the simulator's loop through the decision core in-process, in
//    lockstep on simulated time (no broker, no threads). The core takes each reading at its own
//    time and ticks once per simulated second, as dewmargind does in event-time mode; whatever
//    the core publishes goes straight back to the simulation. The end-to-end test
//    (tests/e2e) does the same through mosquitto and the real dewmargind.
#include <chrono>
#include <fstream>
#include <memory>
#include <sstream>
#include <string>
#include <utility>
#include <vector>

#include "dewmargin/config_loader.h"
#include "dewmargin/engine.h"
#include "model/simulation.h"

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
  timestamp next_tick = sim.now() + std::chrono::seconds(1);
  const auto deliver = [&](timestamp now) {
    while (next_tick <= now) {
      core.tick(next_tick, batch);
      route();
      next_tick += std::chrono::seconds(1);
    }
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
