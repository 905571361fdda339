#pragma once
// Text and JSON views of a simulation: the periodic status line, the end-of-day summary and
// the machine-readable result the tests read.
#include <string>

#include "model/simulation.h"

namespace dewmargin::sim {

// One line: simulated clock, active incidents, worst zone and its margin (as the service
// reports it; the model's own with no service), alarms so far, valves closed, supply water.
std::string status_line(const simulation& sim);

// Several lines: ground truth per zone and by incident; with the service also what it did.
std::string summary_text(const simulation& sim);

// The true state, one CSV row per zone (for plots and for checking the physics).
std::string trace_header();
std::string trace_rows(const simulation& sim);

// The result as one JSON object (see docs/demo.md for the fields).
std::string summary_json(const simulation& sim);

}  // namespace dewmargin::sim
