#pragma once
// The simulator's imperative shell: paces the simulation against the wall clock, carries
// readings to the broker and the service's commands back, and prints status lines.
#include <iosfwd>
#include <string>

#include "model/simulation.h"

namespace dewmargin::sim {

struct run_options {
  std::string broker_uri;         // from the config unless --broker overrides it
  double speed = 400.0;           // simulated seconds per wall second; 0: as fast as possible
  double status_every_s = 1800;   // simulated; 0: no status lines
  double wait_service_s = 30.0;   // wall time to wait for the service's "online" status
  std::ostream* trace = nullptr;  // true state, one CSV row per zone and simulated minute
};

// Exit codes as everywhere in the project: 0 done, 1 runtime failure (broker, service).
int run_with_broker(simulation& sim, const run_options& o, std::ostream& out, std::ostream& err);

// The baseline: no broker, no service, as fast as it goes.
int run_offline(simulation& sim, const run_options& o, std::ostream& out);

}  // namespace dewmargin::sim
