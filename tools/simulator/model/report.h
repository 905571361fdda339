#pragma once
// Text and JSON views of a simulation: the periodic status line, the end-of-day summary and
// the machine-readable result the tests read.
#include <optional>
#include <string>

#include "model/pace.h"
#include "model/simulation.h"

namespace dewmargin::sim {

// One line: simulated clock, active incidents, worst zone and its margin (as the service
// reports it; the model's own with no service), alarms so far, valves closed, supply water.
std::string status_line(const simulation& sim);

// Several lines: the verdict per zone and the wet time by incident; with the service also
// what it did.
std::string summary_text(const simulation& sim);
// What the service did, as seen on MQTT and by the plant.
std::string service_text(const simulation& sim);
// The same day without and with the service, side by side.
std::string compare_text(const simulation& baseline, const simulation& supervised);

// The true state, one CSV row per zone (for plots and for checking the physics).
std::string trace_header();
std::string trace_rows(const simulation& sim);

// The result as one JSON object (see docs/scenarios.md for the fields); `pace` may be null.
std::string summary_json(const simulation& sim, const pace_report* pace = nullptr);
// {"scenario", "building", "max_wet_zone_min", "verdict": pass|fail|none, "baseline": {...}, "service": {...}}
std::string compare_json(const simulation& baseline, const simulation& supervised, const pace_report* pace,
                         std::optional<double> max_wet_zone_min);

}  // namespace dewmargin::sim
