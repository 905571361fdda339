#pragma once
// The verdict on a simulated day, per zone: how long its chilled surface was really wet (the
// ground truth), its lowest margin and when, and — with the service — when the service first
// raised the zone's alarm and how much warning that gave before the surface got wet.
// `compare` puts a baseline run (no service) and a supervised run of the same day side by side.
#include <optional>
#include <string>
#include <vector>

#include "model/simulation.h"

namespace dewmargin::sim {

struct zone_verdict {
  std::string zone;
  double wet_min = 0.0;
  double lowest_margin_k = 0.0;
  double lowest_margin_at_s = 0.0;
  std::optional<double> first_wet_s;
  int alarms = 0;                       // alarms the service raised for the zone
  std::optional<double> first_alarm_s;  // the first of them
  // Minutes from the last alarm raised at or before the first wet moment to that moment; none
  // when the zone stayed dry, or got wet without an alarm before it.
  std::optional<double> warning_min;
};

struct run_verdict {
  bool with_service = false;
  double wet_zone_min = 0.0;
  std::vector<zone_verdict> zones;  // in the building's order
};

run_verdict verdict_of(const simulation& sim);

// A table, one row per zone and a total.
std::string verdict_table(const run_verdict& v);
// Baseline and supervised runs side by side, one row per zone and a total.
std::string compare_table(const run_verdict& baseline, const run_verdict& supervised);

struct compare_outcome {
  bool pass = false;
  std::string line;  // "verdict: pass ..." / "verdict: FAIL ..."
};
// Passes when the supervised run has at most `max_wet_zone_min` wet zone-minutes.
compare_outcome judge(const run_verdict& baseline, const run_verdict& supervised, double max_wet_zone_min);

}  // namespace dewmargin::sim
