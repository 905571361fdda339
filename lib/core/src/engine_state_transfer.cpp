// Everything that outlives one engine, in one place:
//   snapshot / restore  what a restarted service gets back from storage (engine_output.h
//                       zone_snapshot, loop_snapshot): alarms, acknowledgement, shelving,
//                       valve positions, setpoints;
//   adopt               what a reloaded config takes over from the running engine: all of
//                       that, and also the readings, the band, the valve's reopen timer, the
//                       current minute's sample, a held restored alarm, and what the plant
//                       was last told.
// A new piece of state that must survive is added here: to carry_over() for a reload, and
// to snapshot_of()/restore() as well when it must survive a restart.
#include <algorithm>

#include "engine_state.h"

namespace dewmargin {
namespace {

valve_position parse_valve_position(const std::string& text) {
  if (text == "open") return valve_position::open;
  if (text == "closed") return valve_position::closed;
  return valve_position::unset;
}

// The band that raised a restored alarm, from the stored band name.
band restored_alarm_band(const zone_snapshot& zs) {
  band alarm_band = band::safe;
  for (band b : {band::alarm, band::condensing, band::unknown}) {
    if (zs.band == band_name(b)) alarm_band = b;
  }
  if (zs.alarm_active && alarm_band == band::safe) alarm_band = band::alarm;
  return alarm_band;
}

// A reload: the zone's state goes on under the new config (thresholds, delays).
void carry_over(zone_rt& to, const zone_rt& from) {
  to.condition.alarm = from.condition.alarm;
  to.condition.alarm_condition = from.condition.alarm_condition;
  to.condition.bands.force(from.condition.bands.current());
  if (to.valve && from.valve) to.valve->carry_over(*from.valve);
  to.sample = from.sample;
  to.hold_restored_alarm = from.hold_restored_alarm;
}

}  // namespace

zone_snapshot engine::state::snapshot_of(const zone_rt& z, timestamp now) {
  const alarm_status& a = z.condition.alarm.status();
  zone_snapshot snap;
  snap.zone = z.cfg->id;
  snap.band = band_name(z.condition.bands.current());
  snap.alarm_active = a.active;
  snap.acknowledged = a.acknowledged;
  snap.shelved_until = a.shelved_until;
  snap.valve = z.valve ? valve_position_name(z.valve->position()) : "";
  snap.ts = now;
  return snap;
}

void engine::state::emit_zone_snapshot(engine_output& out, const zone_rt& z, timestamp now) const {
  out.zone_snapshots.push_back(snapshot_of(z, now));
}

// A restart: the alarms are held until the zones' own inputs report (zone_rt).
void engine::state::restore(const restored_state& r, bool from_storage, timestamp now) {
  for (const auto& zs : r.zones) {
    const auto it = zone_index.find(zs.zone);
    if (it == zone_index.end()) continue;  // zone removed from the config since
    zone_rt& z = zones[it->second];
    alarm_status a;
    a.active = zs.alarm_active;
    a.acknowledged = zs.acknowledged;
    a.shelved_until = zs.shelved_until;
    // A stored end beyond what a command can ask (an edited or damaged row) is cut to the
    // longest shelving, so that no file can hide an alarm for good.
    const timestamp longest = now + std::chrono::minutes(k_max_shelve_minutes);
    if (a.shelved_until && *a.shelved_until > longest) a.shelved_until = longest;
    z.condition.alarm.restore(a, restored_alarm_band(zs));
    z.condition.alarm_condition = a.active;
    z.hold_restored_alarm = from_storage && a.active;
    const valve_position p = parse_valve_position(zs.valve);
    if (z.valve && p != valve_position::unset) z.valve->restore(p);
  }
  // The loops' setpoints are not taken from storage: at start each stays at its fail-safe max_c
  // until its zones have reported, and then falls no faster than fall_k_per_min. A stored low
  // setpoint sent to the plant before any reading would be colder water on old knowledge.
  (void)r.loops;
}

void engine::state::restore_setpoint(const std::string& loop, double setpoint_c) {
  for (loop_rt& l : loops) {
    if (l.cfg->id != loop) continue;
    const double sp = std::clamp(setpoint_c, l.cfg->setpoint.min_c, l.cfg->setpoint.max_c);
    l.reset.restore(sp);
    l.last_event_setpoint_c = sp;
  }
}

void engine::state::adopt(const state& p) {
  start = p.start;
  last_now = p.last_now;
  // Setpoints (clamped to the new limits) the way a restart restores them.
  for (const loop_rt& l : p.loops) restore_setpoint(l.cfg->id, l.reset.setpoint_c());
  // Readings by (topic, field), so a reload neither waits for fresh data nor treats the
  // zones as unknown.
  inputs.adopt(p.inputs);
  for (zone_rt& z : zones) {
    const auto it = p.zone_index.find(z.cfg->id);
    if (it != p.zone_index.end()) carry_over(z, p.zones[it->second]);
  }
  // What the plant was last told stays the reference for the republish rules, as long as it
  // was told on the same topic: a new topic has been told nothing yet.
  for (loop_rt& l : loops) {
    for (const loop_rt& old : p.loops) {
      if (old.cfg->id != l.cfg->id) continue;
      if (old.cfg->setpoint.topic == l.cfg->setpoint.topic) l.published_bare = old.published_bare;
      // And the last setpoint event, so that a reload alone makes none.
      l.last_event_limit = old.last_event_limit;
      l.last_event_governing = old.last_event_governing;
    }
  }
  for (dehumidifier_rt& d : dehumidifiers) {
    for (const dehumidifier_rt& old : p.dehumidifiers) {
      if (old.cfg->id == d.cfg->id) {
        if (old.cfg->dew_point_request.topic == d.cfg->dew_point_request.topic) {
          d.published_request_c = old.published_request_c;
        }
        d.trim = old.trim;  // the trimmed request and its step timer go on
        d.fault.carry_over(old.fault);
        d.alarm = old.alarm;
      }
    }
  }
}

// After begin() or adopt(): every zone's and loop's state, and the valve positions known.
void engine::state::publish_all(timestamp now, engine_output& out) {
  for (zone_rt& z : zones) {
    publish_zone(z, now, out, true);
    if (z.valve && z.valve->position() != valve_position::unset) publish_valve(z, z.valve->position(), out);
  }
  for (loop_rt& l : loops) publish_loop(l, now, out, true);
}

// After a reconnect: what the plant was told is told again first (a valve close must not
// wait behind thousands of states in the outbox), then every state as it stands now.
void engine::state::republish(timestamp now, engine_output& out) {
  for (const zone_rt& z : zones) {
    if (z.valve && z.valve->position() != valve_position::unset) publish_valve(z, z.valve->position(), out);
  }
  for (const loop_rt& l : loops) {
    if (!l.published_bare.empty()) {
      out.messages.push_back({l.cfg->setpoint.topic, l.published_bare, true, message_class::command});
    }
  }
  for (const dehumidifier_rt& d : dehumidifiers) {
    if (d.published_request_c) publish_request(d, *d.published_request_c, out);
  }
  for (zone_rt& z : zones) publish_zone(z, now, out, true);
  for (loop_rt& l : loops) publish_loop(l, now, out, true);  // and a setpoint moved since, if any
  for (dehumidifier_rt& d : dehumidifiers) publish_dehumidifier(d, now, out, true);
}

// Shutdown: the current minute's samples and the state to restore next time.
void engine::state::flush(timestamp now, engine_output& out) {
  for (zone_rt& z : zones) {
    if (auto s = z.sample.close(z.margin, z.cfg->id)) out.samples.push_back(std::move(*s));
    emit_zone_snapshot(out, z, now);
  }
  for (const loop_rt& l : loops) out.loop_snapshots.push_back({l.cfg->id, l.reset.setpoint_c(), now});
}

}  // namespace dewmargin
