#include "dewmargin/zone_steps.h"

namespace dewmargin {

band_step step_band_and_alarm(zone_condition& c, const zone_margin& m, bool switch_active, timestamp now,
                              bool suppressed) {
  band_inputs in;
  in.margin_k = m.margin_k;
  in.switch_active = switch_active;
  band_step step;
  step.before = c.bands.current();
  const bool condition_before = c.alarm_condition;
  const alarm_status alarm_before = c.alarm.status();
  step.after = c.bands.update(in, now);
  // While a zone only waits for its first readings its alarm is held as it is (also a
  // restored one), so that a restart neither raises nor clears alarms by itself.
  step.suppressed = suppressed && (step.after == band::tight || step.after == band::alarm);
  if (step.after != band::unknown || m.unknown_is_fault) {
    // Suppressed by design: the alarm sees a band without an alarm condition.
    const band for_alarm = step.suppressed ? band::safe : step.after;
    c.alarm.on_band(for_alarm, m.unknown_is_fault);
    c.alarm_condition = is_alarm_band(for_alarm);
  }
  step.event_due =
      step.after != step.before || c.alarm_condition != condition_before || c.alarm.status() != alarm_before;
  return step;
}

std::optional<valve_decision> step_valve(zone_valve& v, band b, bool unknown_is_fault, std::optional<bool> window_open,
                                         const valve_outlook& outlook, timestamp now) {
  valve_conditions vc;
  vc.zone_band = b;
  vc.unknown_is_fault = unknown_is_fault;
  vc.window_open = window_open.value_or(false);
  vc.has_window = window_open.has_value();
  vc.margin_k = outlook.margin_k;
  vc.minutes_to_condensation = outlook.minutes_to_condensation;
  vc.reset_at_limit = outlook.reset_at_limit;
  vc.dew_point_c = outlook.dew_point_c;
  vc.supply_c = outlook.supply_c;
  vc.supply_awaiting = outlook.supply_awaiting;
  return v.update(vc, now);
}

}  // namespace dewmargin
