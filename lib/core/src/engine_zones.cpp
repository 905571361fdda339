// Zone evaluation, in three steps: the margin from the zone's inputs (zone_margin.h), then
// the band and alarm, then the valve (zone_steps.h); and the zone's published state.
#include <algorithm>
#include <string_view>

#include "dewmargin/psychro.h"
#include "engine_state.h"

namespace dewmargin {
namespace {

margin_input margin_input_of(const input_slot& s, timestamp now) {
  return {s.fresh_value(now), s.value, s.faulted(now), input_status_name(s.status)};
}

// The room air's relative humidity at the coldest measured surface (EN ISO 13788's mould
// criterion); null without a fresh surface, air temperature and humidity.
std::optional<double> surface_rh_of(const zone_margin& m) {
  if (!m.surface_min_c || !m.air_temp_c || !m.rh_pct) return std::nullopt;
  const auto rh = psychro::surface_rh_pct(*m.air_temp_c, *m.rh_pct, *m.surface_min_c);
  if (!rh) return std::nullopt;
  return rh.value();
}

}  // namespace

// A zone is judged only once each of its own inputs (air, every humidity, every surface;
// the loop's supply for a zone without surfaces) has reported or gone missing.
// Fills the engine's one scratch zone_readings (every zone, every tick: its vectors keep
// their capacity instead of two allocations per evaluation).
const zone_readings& engine::state::readings_of(const zone_rt& z, timestamp now) {
  const double since_start_s = seconds_between(start, now);
  const auto awaited = [&](std::size_t id) { return inputs[id].awaited(since_start_s); };
  const input_slot& supply = inputs[loops[z.loop].supply_slot];
  zone_readings& r = scratch_readings;
  r.humidity_pct.clear();
  r.surfaces_c.clear();
  r.air_temp_c = margin_input_of(inputs[z.air_slot], now);
  for (std::size_t id : z.humidity_slots) r.humidity_pct.push_back(margin_input_of(inputs[id], now));
  for (std::size_t id : z.surface_slots) r.surfaces_c.push_back(margin_input_of(inputs[id], now));
  r.supply_c = margin_input_of(supply, now);
  r.supply_awaiting = supply.status == input_status::awaiting;
  r.supply_allowed = !(z.hold_restored_alarm && !z.surface_slots.empty());
  r.waiting = awaited(z.air_slot) || std::any_of(z.humidity_slots.begin(), z.humidity_slots.end(), awaited) ||
              std::any_of(z.surface_slots.begin(), z.surface_slots.end(), awaited) ||
              (z.surface_slots.empty() && awaited(loops[z.loop].supply_slot));
  return r;
}

void engine::state::evaluate_zone(std::size_t zi, timestamp now, engine_output& out) {
  zone_rt& z = zones[zi];
  const bool surface_seen = std::any_of(z.surface_slots.begin(), z.surface_slots.end(),
                                        [&](std::size_t id) { return inputs[id].last_reading.has_value(); });
  if (surface_seen) z.hold_restored_alarm = false;
  z.margin = compute_zone_margin(readings_of(z, now));

  const bool switch_active = z.switch_slot && inputs[*z.switch_slot].active;
  const std::string* suppressor = suppressor_of(zi);
  const band_step step = step_band_and_alarm(z.condition, z.margin, switch_active, now, suppressor != nullptr);
  // Every zone on every tick: no string assignment unless the suppressor changed.
  if (!step.suppressed) {
    z.suppressed_by.clear();
  } else if (z.suppressed_by != *suppressor) {
    z.suppressed_by = *suppressor;
  }
  if (step.event_due) emit_band_event(z, step, switch_active, now, out);
  // The trend first: the valve closes ahead of condensation by it.
  if (z.margin.margin_k) z.trend.add(now, *z.margin.margin_k);
  const bool valve_moved = move_valve(z, step.after, now, out);
  if (step.event_due || valve_moved) emit_zone_snapshot(out, z, now);

  if (auto finished = z.sample.add(now, z.margin, z.condition.bands.current(), z.cfg->id)) {
    out.samples.push_back(std::move(*finished));
  }
  // A rise of the loop's supply-water setpoint goes out at once; falls wait for the tick.
  loop_rt& l = loops[z.loop];
  if (drive_on_zone(l.reset, {&z.cfg->id, z.counts_for_reset(), z.margin.dew_point_c}, now)) {
    loop_outputs(l, now, out);
  }
  publish_zone(z, now, out, false);
}

void engine::state::emit_band_event(const zone_rt& z, const band_step& step, bool switch_active, timestamp now,
                                    engine_output& out) {
  const zone_margin& m = z.margin;
  const bool alarm_related = is_alarm_band(step.before) || is_alarm_band(step.after);
  events.emit(
      out, now, z.subject(), event_kind::band,
      [&](event_json& e) {
        e.text("from", band_name(step.before)).text("to", band_name(step.after));
        e.number("margin_k", m.margin_k).number("dew_point_c", m.dew_point_c);
        e.number("surface_min_c", m.surface_min_c).number("supply_c", m.supply_c);
        if (m.margin_source) {
          e.text("margin_source", m.margin_source);
        } else {
          e.null("margin_source");
        }
        if (switch_active) {
          e.text("reason", "condensation switch active");
        } else if (step.after == band::unknown) {
          e.text("reason", m.unknown_reason);
        }
        e.alarm(z.condition.alarm.status());
        // A tight/alarm transition while the zone's unit is in fault: logged, not annunciated.
        if (!z.suppressed_by.empty()) e.text("suppressed_by", z.suppressed_by);
      },
      alarm_related);
}

const std::string* engine::state::suppressor_of(std::size_t zi) const {
  for (std::size_t ui : units_of_zone[zi]) {
    if (dehumidifiers[ui].fault.fault()) return &dehumidifiers[ui].cfg->id;
  }
  return nullptr;
}

// True when the valve moved (an event and a command went out).
bool engine::state::move_valve(zone_rt& z, band b, timestamp now, engine_output& out) {
  if (!z.valve) return false;
  const std::optional<bool> window_open =
      z.window_slot ? std::optional<bool>(inputs[*z.window_slot].active) : std::nullopt;
  const loop_rt& l = loops[z.loop];
  const input_slot& supply = inputs[l.supply_slot];
  valve_outlook o;
  o.margin_k = z.margin.margin_k;
  o.minutes_to_condensation = z.margin.margin_k ? z.trend.minutes_to_condensation(now) : std::nullopt;
  // The reset can do no more for this zone: the water is at max_c and the zone's own dew
  // point asks for more (not merely the fail-safe max_c of the start).
  const setpoint_config& sp = l.cfg->setpoint;
  o.reset_at_limit = l.reset.setpoint_c() >= sp.max_c - 1e-9 && z.margin.dew_point_c &&
                     *z.margin.dew_point_c + sp.reset_margin_k >= sp.max_c - 1e-9;
  o.dew_point_c = z.margin.dew_point_c;
  o.supply_c = supply.fresh_value(now);
  o.supply_awaiting = supply.status == input_status::awaiting;
  const auto d = step_valve(*z.valve, b, z.margin.unknown_is_fault, window_open, o, now);
  if (!d) return false;
  events.emit(out, now, z.subject(), event_kind::valve, [&](event_json& e) {
    e.text_or_null("from", valve_position_name(d->from)).text("to", valve_position_name(d->to));
    e.text("reason", d->reason);
  });
  publish_valve(z, d->to, out);
  return true;
}

void engine::state::publish_valve(const zone_rt& z, valve_position p, engine_output& out) const {
  const valve_config& vcfg = *z.cfg->valve;
  out.messages.push_back(
      {vcfg.topic, p == valve_position::open ? vcfg.open_payload : vcfg.closed_payload, true, message_class::command});
}

void engine::state::expire_shelving(zone_rt& z, timestamp now, engine_output& out) {
  if (!z.condition.alarm.expire_shelving(now)) return;
  events.emit(
      out, now, z.subject(), event_kind::unshelve,
      [&](event_json& e) {
        e.text("from", "shelved").text("to", "unshelved").null("by").text("reason", "shelving expired");
        e.alarm(z.condition.alarm.status());
      },
      true);
  emit_zone_snapshot(out, z, now);
}

void engine::state::publish_zone(zone_rt& z, timestamp now, engine_output& out, bool force) {
  const zone_margin& m = z.margin;
  const alarm_status& alarm = z.condition.alarm.status();
  const band current = z.condition.bands.current();
  const valve_position vp = z.valve ? z.valve->position() : valve_position::unset;
  const std::string& hold = z.valve ? z.valve->hold_reason() : z.published_hold;
  const bool significant = force || !z.published || current != z.published_band || alarm != z.published_alarm ||
                           vp != z.published_valve || hold != z.published_hold ||
                           z.suppressed_by != z.published_suppressed_by;
  const std::optional<double> minutes = m.margin_k ? z.trend.minutes_to_condensation(now) : std::nullopt;
  // minutes_to_condensation comes and goes with the trend: it waits for min_interval_s.
  const change_gate<7>::values values{m.dew_point_c, m.air_temp_c, m.rh_pct, m.surface_min_c,
                                      m.supply_c,    m.margin_k,   minutes};
  const change_gate<7>::values inputs_only{m.dew_point_c, m.air_temp_c, m.rh_pct,           m.surface_min_c,
                                           m.supply_c,    m.margin_k,   z.published_minutes};
  const std::string_view source = m.margin_source ? std::string_view(m.margin_source) : std::string_view();
  const bool news = source != z.published_source || z.gate.presence_changed(inputs_only);
  if (!z.gate.should_publish(significant || news, values, now, cfg.publish.min_interval_s)) return;
  const zone_state_view v{cfg.site,
                          z.cfg->id,
                          now,
                          band_name(current),
                          m.dew_point_c,
                          m.air_temp_c,
                          m.rh_pct,
                          m.surface_min_c,
                          m.supply_c,
                          m.margin_k,
                          m.margin_source,
                          vp == valve_position::unset ? nullptr : valve_position_name(vp),
                          alarm,
                          minutes,
                          hold.empty() ? nullptr : hold.c_str(),
                          z.suppressed_by.empty() ? nullptr : z.suppressed_by.c_str(),
                          surface_rh_of(m)};
  out.messages.push_back(
      {cfg.publish.prefix + "/zone/" + z.cfg->id + "/state", format_zone_state(v), true, message_class::state});
  z.gate.commit(values, now);
  z.published_band = current;
  z.published_alarm = alarm;
  z.published_valve = vp;
  z.published_hold = hold;
  z.published_suppressed_by = z.suppressed_by;
  z.published_source = source;
  z.published_minutes = minutes;
  z.published = true;
}

}  // namespace dewmargin
