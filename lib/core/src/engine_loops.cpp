// Loops (the supply-water setpoint, by loop_reset_driver.h; the loop's state and cooling
// output) and dehumidifiers (the dew-point request, by dehumidifier_request.h).
#include <cmath>

#include "dewmargin/cooling_output.h"
#include "dewmargin/dehumidifier_request.h"
#include "engine_state.h"

namespace dewmargin {
namespace {

constexpr double k_setpoint_publish_k = 0.1;  // the retained state goes out at once on this move
constexpr double k_epsilon = 1e-9;
constexpr double k_setpoint_settle_s = 300.0;  // a new limit or governing zone must stand this long

// A fall held to fall_k_per_min is a transient, not a limit: as an event it counts as none,
// or every small rise and fall of a dew point would make two events.
setpoint_limit event_limit(setpoint_limit l) { return l == setpoint_limit::rate ? setpoint_limit::none : l; }

}  // namespace

const std::vector<zone_demand>& engine::state::demands_of(const loop_rt& l) {
  std::vector<zone_demand>& demands = scratch_demands;
  demands.clear();
  for (std::size_t zi : l.zones) {
    const zone_rt& z = zones[zi];
    demands.push_back({&z.cfg->id, z.counts_for_reset(), z.margin.dew_point_c});
  }
  return demands;
}

void engine::state::tick_loops(timestamp now, engine_output& out) {
  for (loop_rt& l : loops) {
    drive_on_tick(l.reset, demands_of(l), now);
    update_cooling(l, now);
    loop_outputs(l, now, out);
  }
}

// Setpoint event (a move of publish.setpoint_event_k, or a new limit or governing zone) and
// the loop's publication, which follows every 0.05 K.
void engine::state::loop_outputs(loop_rt& l, timestamp now, engine_output& out) {
  const double sp = l.reset.setpoint_c();
  const setpoint_limit limit = event_limit(l.reset.limited());
  const bool moved = std::fabs(sp - l.last_event_setpoint_c) >= cfg.publish.setpoint_event_k - k_epsilon &&
                     sp != l.last_event_setpoint_c;
  // A new limit or governing zone is news once it has stood for k_setpoint_settle_s: zones
  // that share the same outdoor air have dew points within hundredths of a kelvin and take
  // turns governing, and a target near min_c or max_c flips in and out of the limit.
  const std::string& governing = l.reset.governing_zone();
  const bool differs = limit != l.last_event_limit || (!governing.empty() && governing != l.last_event_governing);
  if (!differs) {
    l.change_since.reset();
  } else if (!l.change_since || limit != l.pending_limit || governing != l.pending_governing) {
    l.change_since = now;
    l.pending_limit = limit;
    l.pending_governing = governing;
  }
  const bool settled = differs && seconds_between(*l.change_since, now) >= k_setpoint_settle_s;
  if (moved || settled) {
    events.emit(out, now, l.subject(), event_kind::setpoint, [&](event_json& e) {
      e.number("from", l.last_event_setpoint_c).number("to", sp).text("reason", l.reset.reason());
      e.text("limited", setpoint_limit_name(l.reset.limited()));
      e.text_or_null("governing_zone", l.reset.governing_zone());
    });
    l.last_event_setpoint_c = sp;
    l.last_event_limit = limit;
    if (!governing.empty()) l.last_event_governing = governing;
    l.change_since.reset();
    out.loop_snapshots.push_back({l.cfg->id, sp, now});
  }
  publish_loop(l, now, out, false);
}

void engine::state::publish_loop(loop_rt& l, timestamp now, engine_output& out, bool force) {
  const double sp = l.reset.setpoint_c();
  const bool significant = force || !l.published ||
                           std::fabs(sp - l.published_setpoint_c) >= k_setpoint_publish_k - k_epsilon ||
                           l.reset.limited() != l.published_limit;
  const auto value_of = [&](const std::optional<std::size_t>& slot) {
    return slot ? inputs.fresh_value(*slot, now) : std::nullopt;
  };
  const change_gate<5>::values values{sp, inputs.fresh_value(l.supply_slot, now), value_of(l.return_slot),
                                      value_of(l.flow_slot), l.cooling_kw};
  if (!l.gate.should_publish(significant, values, now, cfg.publish.min_interval_s)) return;
  const loop_state_view v{cfg.site,    l.cfg->id,        now,
                          sp,          values[1],        values[2],
                          values[3],   l.reset.reason(), setpoint_limit_name(l.reset.limited()),
                          l.cooling_kw};
  out.messages.push_back(
      {cfg.publish.prefix + "/loop/" + l.cfg->id + "/state", format_loop_state(v), true, message_class::state});
  std::string bare = format_bare_number(sp);
  if (bare != l.published_bare) {
    out.messages.push_back({l.cfg->setpoint.topic, bare, true, message_class::command});
    l.published_bare = std::move(bare);
  }
  l.gate.commit(values, now);
  l.published_setpoint_c = sp;
  l.published_limit = l.reset.limited();
  l.published = true;
}

void engine::state::update_cooling(loop_rt& l, timestamp now) {
  l.cooling_kw.reset();
  if (!l.return_slot || !l.flow_slot) return;
  const auto sup = inputs.fresh_value(l.supply_slot, now);
  const auto ret = inputs.fresh_value(*l.return_slot, now);
  const auto flow = inputs.fresh_value(*l.flow_slot, now);
  if (!sup || !ret || !flow) return;
  const auto kw = loop_cooling_kw(*sup, *ret, *flow);
  if (kw) l.cooling_kw = kw.value();
}

void engine::state::tick_dehumidifiers(timestamp now, engine_output& out) {
  for (dehumidifier_rt& d : dehumidifiers) {
    std::vector<zone_reference> refs;
    refs.reserve(d.zones.size());
    for (std::size_t zi : d.zones) {
      const zone_rt& z = zones[zi];
      refs.push_back({&z.cfg->id, z.margin.surface_min_c, z.margin.supply_c, z.condition.bands.current(),
                      z.margin.margin_k, z.margin.unknown_is_fault, z.valve_held()});
    }
    const auto& rc = d.cfg->dew_point_request;
    const dehumidifier_request r = d.trim.update(refs, rc, now);
    const bool moved = dehumidifier_request_moved(d.published_request_c, r.request_c);
    if (moved) {
      events.emit(out, now, d.subject(), event_kind::dehumidify, [&](event_json& e) {
        e.number("from", d.published_request_c).number("to", r.request_c).text("reason", r.reason);
      });
      publish_request(d, r.request_c, out);
      d.published_request_c = r.request_c;
    }
    judge_unit_fault(d, now, out);
    bool shelving_ended = false;
    if (d.alarm.expire_shelving(now)) {
      shelving_ended = true;
      events.emit(
          out, now, d.subject(), event_kind::unshelve,
          [&](event_json& e) {
            e.text("from", "shelved").text("to", "unshelved").null("by").text("reason", "shelving expired");
            e.alarm(d.alarm.status());
          },
          true);
    }
    publish_dehumidifier(d, now, out, moved || shelving_ended);
  }
}

// The unit's own alarm: one `band` event (normal <-> fault) per change, alarm-related.
void engine::state::judge_unit_fault(dehumidifier_rt& d, timestamp now, engine_output& out) {
  if (!d.fault_slot && !d.supply_dew_point_slot) return;
  unit_fault_inputs in;
  in.switch_active = d.fault_slot && inputs[*d.fault_slot].active;
  if (d.supply_dew_point_slot) in.supply_dew_point_c = inputs.fresh_value(*d.supply_dew_point_slot, now);
  in.request_c = d.published_request_c;
  const alarm_status before = d.alarm.status();
  const bool changed = d.fault.update(in, now);
  d.alarm.on_band(d.fault.fault() ? band::alarm : band::safe, false);
  if (!changed && d.alarm.status() == before) return;
  events.emit(
      out, now, d.subject(), event_kind::band,
      [&](event_json& e) {
        const bool was_fault = changed ? !d.fault.fault() : d.fault.fault();
        e.text("from", was_fault ? "fault" : "normal").text("to", d.fault.fault() ? "fault" : "normal");
        e.number("supply_dew_point_c", in.supply_dew_point_c).number("request_c", in.request_c);
        e.text("reason", d.fault.fault() ? d.fault.reason() : "no fault");
        e.alarm(d.alarm.status());
      },
      true);
  publish_dehumidifier(d, now, out, true);
}

// The unit's dew-point request: a bare number, retained like every plant command (a unit that
// restarts finds it on the broker).
void engine::state::publish_request(const dehumidifier_rt& d, double request_c, engine_output& out) const {
  out.messages.push_back({d.cfg->dew_point_request.topic, format_bare_number(request_c), true, message_class::command});
}

void engine::state::publish_dehumidifier(dehumidifier_rt& d, timestamp now, engine_output& out, bool force) {
  if (!d.fault_slot && !d.supply_dew_point_slot) return;  // a unit without its own inputs has no state
  const std::optional<double> measured_c =
      d.supply_dew_point_slot ? inputs.fresh_value(*d.supply_dew_point_slot, now) : std::nullopt;
  const bool moved = measured_c.has_value() != d.published_supply_dew_point_c.has_value() ||
                     (measured_c && std::fabs(*measured_c - *d.published_supply_dew_point_c) >= 0.1 - k_epsilon);
  if (!force && d.published && !moved) return;
  const dehumidifier_state_view v{
      cfg.site, d.cfg->id, now, d.published_request_c, measured_c, d.fault.fault(), d.fault.reason(), d.alarm.status()};
  out.messages.push_back({cfg.publish.prefix + "/dehumidifier/" + d.cfg->id + "/state", format_dehumidifier_state(v),
                          true, message_class::state});
  d.published = true;
  d.published_supply_dew_point_c = measured_c;
}

}  // namespace dewmargin
