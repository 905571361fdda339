#pragma once
// The simulator's imperative shell: paces the simulation against the wall clock, carries
// readings to the broker and the service's commands back, and prints status lines. It waits
// for the broker and the service instead of outrunning them (see model/pace.h).
#include <iosfwd>
#include <string>

#include "model/pace.h"
#include "model/simulation.h"

namespace dewmargin::sim {

struct run_options {
  std::string broker_uri;           // from the config unless --broker overrides it
  double speed = 400.0;             // simulated seconds per wall second; 0: as fast as possible
  double status_every_s = 1800;     // simulated; 0: no status lines
  double wait_service_s = 30.0;     // wall time to wait for the service's "online" status
  double max_service_lag_s = 15.0;  // simulated; the service may trail the readings this much; 0: no limit
  int max_in_flight = 50;           // messages handed to the MQTT client and not yet written out
  double broker_timeout_s = 30.0;   // wall time the broker may take to accept one message
  std::ostream* trace = nullptr;    // true state, one CSV row per zone and simulated minute
};

// Exit codes as everywhere in the project: 0 done, 1 runtime failure (broker, service).
// `pace` receives how the play kept its pace.
int run_with_broker(simulation& sim, const run_options& o, std::ostream& out, std::ostream& err, pace_report& pace);

// The baseline: no broker, no service, as fast as it goes.
int run_offline(simulation& sim, const run_options& o, std::ostream& out);

// "played 2.50 h in 21.3 s of wall time (asked 480x, achieved 423x); waited ..." for the end of a play.
std::string pace_text(const pace_report& p);

}  // namespace dewmargin::sim
