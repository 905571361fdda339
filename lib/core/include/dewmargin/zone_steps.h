#pragma once
// The steps that follow a zone's margin (zone_margin.h), in this order:
//   1. band and alarm: the band follows the margin or the condensation switch (band.h), the
//      alarm follows the band (zone_alarm.h) — except while the zone only waits for its
//      first readings (`unknown`, no fault): then its alarm, also a restored one, is held;
//   2. valve: closes or reopens by the band, the window, the margin's trend, the loop's
//      reset and the start-up permissive (zone_valve.h).
#include <optional>

#include "dewmargin/band.h"
#include "dewmargin/zone_alarm.h"
#include "dewmargin/zone_margin.h"
#include "dewmargin/zone_valve.h"

namespace dewmargin {

// A zone's band and alarm, as they persist from one evaluation to the next.
struct zone_condition {
  explicit zone_condition(const band_thresholds& t) : bands(t) {}
  band_tracker bands;
  zone_alarm alarm;
  bool alarm_condition = false;  // ISA-18.2 alarm condition as last judged (held while waiting)
};

struct band_step {
  band before = band::unknown;
  band after = band::unknown;
  bool event_due = false;   // band, alarm condition or alarm state changed: a `band` event
  bool suppressed = false;  // a tight/alarm band kept from the alarm by design (its unit's fault)
};

// `suppressed`: the zone's dehumidifier is in fault (dehumidifier_fault.h): a `tight` or
// `alarm` band does not make the alarm active; `condensing` and `unknown` still do.
band_step step_band_and_alarm(zone_condition& c, const zone_margin& m, bool switch_active, timestamp now,
                              bool suppressed = false);

// What the valve looks at besides the band: the zone's margin and its trend, its loop's
// reset and measured supply.
struct valve_outlook {
  std::optional<double> margin_k{};
  std::optional<double> minutes_to_condensation{};
  bool reset_at_limit = false;
  std::optional<double> dew_point_c{};
  std::optional<double> supply_c{};
  bool supply_awaiting = false;
};

// The valve's decision for the band just judged; `window_open` is empty without a contact.
std::optional<valve_decision> step_valve(zone_valve& v, band b, bool unknown_is_fault, std::optional<bool> window_open,
                                         const valve_outlook& outlook, timestamp now);

}  // namespace dewmargin
