#pragma once
// Rule: a loop's supply-water setpoint is driven by its counted zones — every zone of the
// loop whose valve is not closed. Target: the highest dew point among them + reset_margin_k,
// within min_c..max_c; a counted zone without a dew point drives it to max_c (fail safe);
// with no counted zone it goes to min_c. A zone's reading that raises the target raises
// the setpoint at once; the once-a-second tick moves it down, no faster than
// fall_k_per_min (supply_reset.h has the arithmetic).
#include <optional>
#include <string>
#include <vector>

#include "dewmargin/supply_reset.h"
#include "dewmargin/timestamp.h"

namespace dewmargin {

struct zone_demand {
  const std::string* zone = nullptr;  // its id
  bool counted = true;                // its valve is not closed
  std::optional<double> dew_point_c;
};

// What the loop's zones demand, in the loop's zone order (the first unknown one governs).
reset_demand loop_demand(const std::vector<zone_demand>& zones);

// On the tick: the setpoint moves towards the demand. True when it or its limit changed.
bool drive_on_tick(supply_reset& reset, const std::vector<zone_demand>& zones, timestamp now);

// On one zone's evaluation: a counted zone raises the setpoint at once when it demands more
// (or has no dew point). True when the setpoint rose.
bool drive_on_zone(supply_reset& reset, const zone_demand& zone, timestamp now);

}  // namespace dewmargin
