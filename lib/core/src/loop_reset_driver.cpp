#include "dewmargin/loop_reset_driver.h"

namespace dewmargin {

reset_demand loop_demand(const std::vector<zone_demand>& zones) {
  reset_demand d;
  d.no_counted_zone = true;
  // Every loop on every tick: the governing zone's id is copied once, not at each new maximum.
  const std::string* governing = nullptr;
  for (const zone_demand& z : zones) {
    if (!z.counted) continue;
    d.no_counted_zone = false;
    if (!z.dew_point_c) {
      d.dew_point_unknown = true;
      governing = z.zone;
      break;
    }
    if (!d.max_dew_point_c || *z.dew_point_c > *d.max_dew_point_c) {
      d.max_dew_point_c = z.dew_point_c;
      governing = z.zone;
    }
  }
  if (governing) d.governing_zone = *governing;
  return d;
}

bool drive_on_tick(supply_reset& reset, const std::vector<zone_demand>& zones, timestamp now) {
  return reset.update(loop_demand(zones), now);
}

bool drive_on_zone(supply_reset& reset, const zone_demand& zone, timestamp now) {
  if (!zone.counted) return false;
  return zone.dew_point_c ? reset.raise_for(*zone.dew_point_c, *zone.zone, now) : reset.raise_to_max(*zone.zone, now);
}

}  // namespace dewmargin
