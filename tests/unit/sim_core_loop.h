#pragma once
// Test helper: closes the simulator's loop through the decision core in-process, in lockstep
// on simulated time (no broker, no threads). The core takes each reading at its own time and
// ticks once per simulated second, as dewmargind does in event-time mode; whatever the core
// publishes goes straight back to the simulation. The end-to-end test does the same through
// mosquitto and the real dewmargind.
#include <chrono>
#include <memory>
#include <vector>

#include "dewmargin/engine.h"
#include "model/simulation.h"

namespace dewmargin::sim::testing {

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
