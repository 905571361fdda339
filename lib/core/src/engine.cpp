#include "dewmargin/engine.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <unordered_map>

#include "dewmargin/band.h"
#include "dewmargin/change_gate.h"
#include "dewmargin/command_guard.h"
#include "dewmargin/cooling_output.h"
#include "dewmargin/input_decoder.h"
#include "dewmargin/input_fault.h"
#include "dewmargin/margin_trend.h"
#include "dewmargin/message_json.h"
#include "dewmargin/operator_command.h"
#include "dewmargin/psychro.h"
#include "dewmargin/supply_reset.h"
#include "dewmargin/zone_alarm.h"
#include "dewmargin/zone_valve.h"

namespace dewmargin {
namespace {

// Event thresholds of design.md.
constexpr double k_setpoint_event_k = 0.1;
constexpr double k_dehumidify_event_k = 0.1;
constexpr double k_epsilon = 1e-9;

enum class input_status { awaiting, ok, bad, stale, missing };

const char* input_status_name(input_status s) {
  switch (s) {
    case input_status::awaiting: return "awaiting";
    case input_status::ok: return "ok";
    case input_status::bad: return "bad";
    case input_status::stale: return "stale";
    case input_status::missing: return "missing";
  }
  return "ok";
}

struct input_slot {
  input_kind kind = input_kind::air_temp;
  const input_config* cfg = nullptr;
  bool owner_is_loop = false;
  std::size_t owner = 0;
  double stale_after_s = 0.0;      // 0: never stale
  double grace_s = 0.0;            // after start, how long its zone waits for its first reading
  std::optional<double> value;     // last good value, core units
  bool active = false;             // switches: last good state
  std::optional<timestamp> last_reading;  // last good reading
  std::optional<timestamp> last_message;  // last payload of any kind
  input_status status = input_status::awaiting;
  std::optional<input_fault> fault;  // while bad: the kind of fault reported
  std::string bad_reason;            // while bad: the reason of the first message of that kind
  std::uint64_t bad_messages = 0;    // bad messages since the input last turned bad
  unsigned faults_reported = 0;      // while bad: the kinds of fault already reported (bit per kind)

  [[nodiscard]] bool fresh(timestamp now) const {
    if (!last_reading) return false;
    if (stale_after_s <= 0.0) return true;
    return seconds_between(*last_reading, now) < stale_after_s;
  }
  [[nodiscard]] bool faulted(timestamp now) const { return !fresh(now) && status != input_status::awaiting; }
  // Never reported, and still within the time its zone waits for it after start.
  [[nodiscard]] bool awaited(double since_start_s) const {
    return status == input_status::awaiting && since_start_s < grace_s;
  }
};

struct minute_accumulator {
  std::int64_t minute = -1;  // minutes since the epoch; -1: nothing yet
  std::optional<double> min_margin_k;
  std::optional<double> max_dew_point_c;
  band worst = band::safe;
};

struct zone_rt {
  const zone_config* cfg;
  std::size_t loop;
  std::size_t air_slot = 0;
  std::vector<std::size_t> humidity_slots;
  std::vector<std::size_t> surface_slots;
  std::optional<std::size_t> switch_slot;
  std::optional<std::size_t> window_slot;
  band_tracker bands;
  zone_alarm alarm;
  std::optional<zone_valve> valve;
  margin_trend trend;

  // Last evaluation.
  std::optional<double> dew_point_c, air_temp_c, rh_pct, surface_min_c, supply_c, margin_k;
  const char* margin_source = nullptr;
  bool unknown_is_fault = false;
  std::string unknown_reason;
  bool alarm_condition = false;
  // A restored active alarm is not cleared by the supply fallback: until one of the zone's
  // surfaces has reported since start, the zone is judged on its surfaces only.
  bool hold_restored_alarm = false;

  // Last publication.
  change_gate<7> gate;
  band published_band = band::unknown;
  alarm_status published_alarm;
  valve_position published_valve = valve_position::unset;
  bool published = false;

  minute_accumulator sample;

  zone_rt(const zone_config* c, std::size_t loop_index)
      : cfg(c), loop(loop_index), bands(c->thresholds), trend(c->thresholds.trend_window_s) {}

  [[nodiscard]] bool counts_for_reset() const { return !valve || valve->counts_as_open(); }
};

struct loop_rt {
  const loop_config* cfg;
  std::size_t supply_slot = 0;
  std::optional<std::size_t> return_slot;
  std::optional<std::size_t> flow_slot;
  supply_reset reset;
  std::vector<std::size_t> zones;
  std::optional<double> cooling_kw;

  double last_event_setpoint_c;
  change_gate<5> gate;
  double published_setpoint_c = 0.0;
  setpoint_limit published_limit = setpoint_limit::none;
  std::string published_bare;  // last bare setpoint sent to the plant
  bool published = false;

  loop_rt(const loop_config* c, double initial_c)
      : cfg(c), reset(c->setpoint, initial_c), last_event_setpoint_c(initial_c) {}
};

struct dehumidifier_rt {
  const dehumidifier_config* cfg;
  std::vector<std::size_t> zones;
  std::optional<double> published_request_c;
};

std::optional<double> slot_value(const input_slot& s, timestamp now) {
  if (s.value && s.fresh(now)) return s.value;
  return std::nullopt;
}

std::string format_seconds(double s) {
  char buf[48];
  std::snprintf(buf, sizeof buf, "%.0f s", s);
  return buf;
}

}  // namespace

struct engine::state {
  site_config cfg;
  std::vector<input_slot> slots;
  std::unordered_map<std::string, std::vector<std::size_t>> slots_by_topic;
  std::vector<zone_rt> zones;
  std::vector<loop_rt> loops;
  std::vector<dehumidifier_rt> dehumidifiers;
  std::unordered_map<std::string, std::size_t> zone_index;
  std::string cmd_prefix;
  timestamp start{};
  timestamp last_now{};
  bool begun = false;
  engine_counters counters;
  command_guard commands;

  explicit state(site_config c) : cfg(std::move(c)) {}

  // ---- construction -------------------------------------------------------------
  std::size_t add_slot(input_kind kind, const input_config& ic, bool owner_is_loop, std::size_t owner,
                       double default_stale_s) {
    input_slot s;
    s.kind = kind;
    s.cfg = &ic;
    s.owner_is_loop = owner_is_loop;
    s.owner = owner;
    // Switches and contacts usually report only on change: never stale unless their own
    // stale_after_s says otherwise.
    s.stale_after_s = ic.stale_after_s.value_or(is_switch_kind(kind) ? 0.0 : default_stale_s);
    // A never-stale input still cannot keep its zone waiting for ever.
    s.grace_s = s.stale_after_s > 0.0 ? s.stale_after_s : default_stale_s;
    slots.push_back(std::move(s));
    const std::size_t id = slots.size() - 1;
    slots_by_topic[ic.topic].push_back(id);
    return id;
  }

  void build() {
    cmd_prefix = cfg.publish.prefix + "/cmd/";
    std::unordered_map<std::string, std::size_t> loop_index;
    loops.reserve(cfg.loops.size());
    for (std::size_t i = 0; i < cfg.loops.size(); ++i) {
      const loop_config& lc = cfg.loops[i];
      loops.emplace_back(&lc, lc.setpoint.max_c);  // fail safe until readings say otherwise
      loop_rt& l = loops.back();
      l.supply_slot = add_slot(input_kind::supply_temp, lc.supply_temp, true, i, lc.stale_after_s);
      if (lc.return_temp) l.return_slot = add_slot(input_kind::return_temp, *lc.return_temp, true, i, lc.stale_after_s);
      if (lc.flow) l.flow_slot = add_slot(input_kind::flow, *lc.flow, true, i, lc.stale_after_s);
      loop_index[lc.id] = i;
    }
    zones.reserve(cfg.zones.size());
    for (std::size_t i = 0; i < cfg.zones.size(); ++i) {
      const zone_config& zc = cfg.zones[i];
      const auto li = loop_index.find(zc.loop);
      // The loader rejects unknown loops; a programmatic config must not get this far.
      const std::size_t loop = li == loop_index.end() ? 0 : li->second;
      zones.emplace_back(&zc, loop);
      zone_rt& z = zones.back();
      const double stale_s = zc.thresholds.stale_after_s;
      z.air_slot = add_slot(input_kind::air_temp, zc.air_temp, false, i, stale_s);
      for (const auto& h : zc.humidity) z.humidity_slots.push_back(add_slot(input_kind::humidity, h, false, i, stale_s));
      for (const auto& s : zc.surfaces) z.surface_slots.push_back(add_slot(input_kind::surface, s, false, i, stale_s));
      if (zc.condensation_switch) {
        z.switch_slot = add_slot(input_kind::condensation_switch, *zc.condensation_switch, false, i, stale_s);
      }
      if (zc.window_contact) z.window_slot = add_slot(input_kind::window_contact, *zc.window_contact, false, i, stale_s);
      if (zc.valve) z.valve.emplace(zc.valve->reopen_after_s);
      if (li != loop_index.end()) loops[loop].zones.push_back(i);
      zone_index[zc.id] = i;
    }
    for (const auto& dc : cfg.dehumidifiers) {
      dehumidifier_rt d{&dc, {}, std::nullopt};
      for (const auto& zid : dc.zones) {
        const auto it = zone_index.find(zid);
        if (it != zone_index.end()) d.zones.push_back(it->second);
      }
      dehumidifiers.push_back(std::move(d));
    }
  }

  timestamp advance(timestamp now) {
    if (now < last_now) now = last_now;
    last_now = now;
    return now;
  }

  // ---- output helpers -------------------------------------------------------------
  void emit_event(engine_output& out, timestamp ts, subject_type st, const std::string& id, const char* kind,
                  const event_json& e, bool alarm_related) {
    std::string json = e.dump();
    out.messages.push_back({cfg.publish.prefix + "/events", json, false,
                            alarm_related ? message_class::alarm_event : message_class::event});
    out.events.push_back({ts, st, id, kind, std::move(json)});
  }

  void emit_input_event(engine_output& out, timestamp now, const input_slot& s, input_status from, input_status to,
                        const std::string& reason) {
    const std::string& id = s.owner_is_loop ? loops[s.owner].cfg->id : zones[s.owner].cfg->id;
    const subject_type st = s.owner_is_loop ? subject_type::loop : subject_type::zone;
    event_json e(cfg.site, now, st, id, "input");
    e.text("from", input_status_name(from)).text("to", input_status_name(to)).text("topic", s.cfg->topic);
    if (!s.cfg->field.empty()) e.text("field", s.cfg->field);
    e.text("input", input_kind_name(s.kind)).text("reason", reason);
    if (to == input_status::bad && s.fault) e.text("fault", input_fault_name(*s.fault));
    if (from == input_status::bad && to != input_status::bad) e.integer("bad_messages", static_cast<long long>(s.bad_messages));
    emit_event(out, now, st, id, "input", e, false);
  }

  static zone_snapshot snapshot_of(const zone_rt& z, timestamp now) {
    zone_snapshot snap;
    snap.zone = z.cfg->id;
    snap.band = band_name(z.bands.current());
    snap.alarm_active = z.alarm.status().active;
    snap.acknowledged = z.alarm.status().acknowledged;
    snap.shelved_until = z.alarm.status().shelved_until;
    snap.valve = z.valve ? valve_position_name(z.valve->position()) : "";
    snap.ts = now;
    return snap;
  }

  void emit_zone_snapshot(engine_output& out, const zone_rt& z, timestamp now) {
    out.zone_snapshots.push_back(snapshot_of(z, now));
  }

  change_gate<7>::values zone_values(const zone_rt& z, std::optional<double> minutes) const {
    return {z.dew_point_c, z.air_temp_c, z.rh_pct, z.surface_min_c, z.supply_c, z.margin_k, minutes};
  }

  void publish_zone(zone_rt& z, timestamp now, engine_output& out, bool force) {
    const valve_position vp = z.valve ? z.valve->position() : valve_position::unset;
    const bool significant = force || !z.published || z.bands.current() != z.published_band ||
                             z.alarm.status() != z.published_alarm || vp != z.published_valve;
    const std::optional<double> minutes = z.margin_k ? z.trend.minutes_to_condensation(now) : std::nullopt;
    const auto values = zone_values(z, minutes);
    if (!z.gate.should_publish(significant, values, now, cfg.publish.min_interval_s)) return;
    zone_state_view v{cfg.site,      z.cfg->id,       now,         band_name(z.bands.current()),
                      z.dew_point_c, z.air_temp_c,    z.rh_pct,    z.surface_min_c,
                      z.supply_c,    z.margin_k,      z.margin_source,
                      vp == valve_position::unset ? nullptr : valve_position_name(vp),
                      z.alarm.status(), minutes};
    out.messages.push_back(
        {cfg.publish.prefix + "/zone/" + z.cfg->id + "/state", format_zone_state(v), true, message_class::state});
    z.gate.commit(values, now);
    z.published_band = z.bands.current();
    z.published_alarm = z.alarm.status();
    z.published_valve = vp;
    z.published = true;
  }

  void publish_loop(loop_rt& l, timestamp now, engine_output& out, bool force) {
    const double sp = l.reset.setpoint_c();
    const bool significant = force || !l.published || std::fabs(sp - l.published_setpoint_c) >= k_setpoint_event_k - k_epsilon ||
                             l.reset.limited() != l.published_limit;
    const change_gate<5>::values values{sp, slot_value(slots[l.supply_slot], now),
                                        l.return_slot ? slot_value(slots[*l.return_slot], now) : std::nullopt,
                                        l.flow_slot ? slot_value(slots[*l.flow_slot], now) : std::nullopt,
                                        l.cooling_kw};
    if (!l.gate.should_publish(significant, values, now, cfg.publish.min_interval_s)) return;
    loop_state_view v{cfg.site,  l.cfg->id, now,       sp, values[1], values[2], values[3], l.reset.reason(),
                      setpoint_limit_name(l.reset.limited()), l.cooling_kw};
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

  // Setpoint event (every 0.1 K of movement) and the loop's publication.
  void loop_outputs(loop_rt& l, timestamp now, engine_output& out) {
    const double sp = l.reset.setpoint_c();
    if (std::fabs(sp - l.last_event_setpoint_c) >= k_setpoint_event_k - k_epsilon) {
      event_json e(cfg.site, now, subject_type::loop, l.cfg->id, "setpoint");
      e.number("from", l.last_event_setpoint_c).number("to", sp).text("reason", l.reset.reason());
      e.text("limited", setpoint_limit_name(l.reset.limited()));
      emit_event(out, now, subject_type::loop, l.cfg->id, "setpoint", e, false);
      l.last_event_setpoint_c = sp;
      out.loop_snapshots.push_back({l.cfg->id, sp, now});
    }
    publish_loop(l, now, out, false);
  }

  // ---- zone evaluation ---------------------------------------------------------------
  // A zone is judged only once each of its own inputs (air, every humidity, every surface;
  // the loop's supply for a zone without surfaces) has reported or gone missing.
  bool awaiting_own_inputs(const zone_rt& z, timestamp now) const {
    const double since_start_s = seconds_between(start, now);
    const auto awaited = [&](std::size_t id) { return slots[id].awaited(since_start_s); };
    if (awaited(z.air_slot)) return true;
    if (std::any_of(z.humidity_slots.begin(), z.humidity_slots.end(), awaited)) return true;
    if (std::any_of(z.surface_slots.begin(), z.surface_slots.end(), awaited)) return true;
    return z.surface_slots.empty() && awaited(loops[z.loop].supply_slot);
  }

  void evaluate_zone(std::size_t zi, timestamp now, engine_output& out) {
    zone_rt& z = zones[zi];
    const input_slot& air = slots[z.air_slot];
    z.air_temp_c = slot_value(air, now);
    z.dew_point_c.reset();
    z.rh_pct.reset();
    std::string dew_point_error;
    bool humidity_faulted = true;
    for (std::size_t h : z.humidity_slots) {
      const input_slot& hs = slots[h];
      if (!hs.faulted(now)) humidity_faulted = false;
      const auto rh = slot_value(hs, now);
      if (!rh || !z.air_temp_c) continue;
      const auto dp = psychro::dew_point_c(*z.air_temp_c, *rh);
      if (!dp) {
        dew_point_error = dp.err().message;
        continue;
      }
      if (!z.dew_point_c || dp.value() > *z.dew_point_c) {
        z.dew_point_c = dp.value();
        z.rh_pct = rh;
      }
    }
    if (!z.rh_pct && !z.humidity_slots.empty()) z.rh_pct = slot_value(slots[z.humidity_slots.front()], now);

    z.surface_min_c.reset();
    bool surface_seen = false;
    for (std::size_t s : z.surface_slots) {
      const input_slot& ss = slots[s];
      if (ss.last_reading) surface_seen = true;
      const auto v = slot_value(ss, now);
      if (v && (!z.surface_min_c || *v < *z.surface_min_c)) z.surface_min_c = v;
    }
    if (surface_seen) z.hold_restored_alarm = false;
    const bool supply_allowed = !(z.hold_restored_alarm && !z.surface_slots.empty());
    const input_slot& supply = slots[loops[z.loop].supply_slot];
    z.supply_c = slot_value(supply, now);
    const std::optional<double> fallback_c = supply_allowed ? z.supply_c : std::nullopt;
    const std::optional<double> reference_c = z.surface_min_c ? z.surface_min_c : fallback_c;
    z.margin_source = z.surface_min_c ? "surface" : (fallback_c ? "supply" : nullptr);
    z.margin_k.reset();
    const bool waiting = awaiting_own_inputs(z, now);
    if (reference_c && z.dew_point_c && !waiting) z.margin_k = *reference_c - *z.dew_point_c;

    // Unknown because of a fault, or only because the first readings have not come yet?
    const bool air_faulted = air.faulted(now);
    const bool reference_faulted = !reference_c && (!supply_allowed || supply.status != input_status::awaiting);
    z.unknown_is_fault = !waiting && !z.margin_k &&
                         (air_faulted || (humidity_faulted && !z.dew_point_c) || reference_faulted ||
                          !dew_point_error.empty());
    if (z.margin_k) {
      z.unknown_reason.clear();
    } else if (waiting) {
      z.unknown_reason = "waiting for the first readings";
    } else if (!z.air_temp_c) {
      z.unknown_reason = std::string("air temperature ") + input_status_name(air.status);
    } else if (!z.dew_point_c) {
      z.unknown_reason = dew_point_error.empty() ? "no fresh humidity reading" : dew_point_error;
    } else {
      z.unknown_reason = "no fresh surface or supply temperature";
    }

    band_inputs bi;
    bi.margin_k = z.margin_k;
    bi.switch_active = z.switch_slot && slots[*z.switch_slot].active;
    const band before = z.bands.current();
    const bool alarm_condition_before = z.alarm_condition;
    const alarm_status alarm_before = z.alarm.status();
    const band after = z.bands.update(bi, now);
    // While a zone only waits for its first readings its alarm is held as it is (also a
    // restored one), so that a restart neither raises nor clears alarms by itself.
    if (after != band::unknown || z.unknown_is_fault) {
      z.alarm.on_band(after, z.unknown_is_fault);
      z.alarm_condition = is_alarm_band(after);
    }

    bool snapshot_due = false;
    if (after != before || z.alarm_condition != alarm_condition_before || z.alarm.status() != alarm_before) {
      event_json e(cfg.site, now, subject_type::zone, z.cfg->id, "band");
      e.text("from", band_name(before)).text("to", band_name(after));
      e.number("margin_k", z.margin_k).number("dew_point_c", z.dew_point_c);
      e.number("surface_min_c", z.surface_min_c).number("supply_c", z.supply_c);
      if (z.margin_source) {
        e.text("margin_source", z.margin_source);
      } else {
        e.null("margin_source");
      }
      if (bi.switch_active) e.text("reason", "condensation switch active");
      else if (after == band::unknown) e.text("reason", z.unknown_reason);
      e.alarm(z.alarm.status());
      emit_event(out, now, subject_type::zone, z.cfg->id, "band", e,
                 is_alarm_band(before) || is_alarm_band(after));
      snapshot_due = true;
    }

    if (z.valve) {
      valve_conditions vc;
      vc.zone_band = after;
      vc.unknown_is_fault = z.unknown_is_fault;
      vc.window_open = z.window_slot && slots[*z.window_slot].active;
      vc.has_window = z.window_slot.has_value();
      if (const auto d = z.valve->update(vc, now)) {
        event_json e(cfg.site, now, subject_type::zone, z.cfg->id, "valve");
        e.text_or_null("from", valve_position_name(d->from)).text("to", valve_position_name(d->to));
        e.text("reason", d->reason);
        emit_event(out, now, subject_type::zone, z.cfg->id, "valve", e, false);
        const auto& vcfg = *z.cfg->valve;
        out.messages.push_back({vcfg.topic, d->to == valve_position::open ? vcfg.open_payload : vcfg.closed_payload,
                                true, message_class::command});
        snapshot_due = true;
      }
    }
    if (snapshot_due) emit_zone_snapshot(out, z, now);

    if (z.margin_k) z.trend.add(now, *z.margin_k);
    accumulate_sample(z, now, out);

    // A rise of the loop's supply-water setpoint goes out at once; falls wait for the tick.
    if (z.counts_for_reset()) {
      loop_rt& l = loops[z.loop];
      const bool raised = z.dew_point_c ? l.reset.raise_for(*z.dew_point_c, z.cfg->id, now)
                                        : l.reset.raise_to_max(z.cfg->id, now);
      if (raised) loop_outputs(l, now, out);
    }
    publish_zone(z, now, out, false);
  }

  void accumulate_sample(zone_rt& z, timestamp now, engine_output& out) {
    const std::int64_t minute = to_unix_ms(now) / 60000;
    if (z.sample.minute != minute) {
      if (z.sample.minute >= 0) emit_sample(z, out);
      z.sample = minute_accumulator{};
      z.sample.minute = minute;
    }
    if (z.margin_k && (!z.sample.min_margin_k || *z.margin_k < *z.sample.min_margin_k)) {
      z.sample.min_margin_k = z.margin_k;
    }
    if (z.dew_point_c && (!z.sample.max_dew_point_c || *z.dew_point_c > *z.sample.max_dew_point_c)) {
      z.sample.max_dew_point_c = z.dew_point_c;
    }
    if (band_severity(z.bands.current()) > band_severity(z.sample.worst)) z.sample.worst = z.bands.current();
  }

  void emit_sample(const zone_rt& z, engine_output& out) const {
    zone_sample s;
    s.minute_start = from_unix_ms(z.sample.minute * 60000);
    s.zone = z.cfg->id;
    s.min_margin_k = z.sample.min_margin_k;
    s.max_dew_point_c = z.sample.max_dew_point_c;
    s.worst_band = band_name(z.sample.worst);
    s.air_temp_c = z.air_temp_c;
    s.rh_pct = z.rh_pct;
    s.surface_min_c = z.surface_min_c;
    s.supply_c = z.supply_c;
    out.samples.push_back(std::move(s));
  }

  // ---- readings ----------------------------------------------------------------------
  // Returns true when the slot's value or state changed.
  bool apply_reading(input_slot& s, std::string_view payload, timestamp reading_ts, timestamp now,
                     engine_output& out) {
    s.last_message = now;
    std::optional<error> fault_error;
    std::optional<input_fault> fault;  // set where the stage alone names it
    double value = 0.0;
    bool active = false;
    if (s.last_reading && reading_ts < *s.last_reading) {
      fault = input_fault::out_of_order;
      fault_error = make_error(error_code::out_of_range, "reading older than the last one (" +
                                                            format_iso8601_utc(reading_ts) + " < " +
                                                            format_iso8601_utc(*s.last_reading) + ")");
    } else if (is_switch_kind(s.kind)) {
      auto r = decode_switch(payload, *s.cfg);
      if (r) active = r.value();
      else fault_error = r.err();
    } else if (auto r = decode_number(payload, *s.cfg, s.kind); !r) {
      fault_error = r.err();
    } else if (auto p = check_plausible(r.value(), s.kind, cfg.plausibility); !p) {
      fault = input_fault::out_of_range;
      fault_error = p.err();
    } else {
      value = p.value();
    }
    if (fault_error) {
      note_bad_reading(s, fault.value_or(classify_decode_error(*fault_error)), fault_error->message, now, out);
      return false;
    }
    ++counters.readings;
    const input_status before = s.status;
    if (is_switch_kind(s.kind)) {
      s.active = active;
    } else {
      s.value = value;
    }
    s.last_reading = reading_ts;
    if (before != input_status::ok && before != input_status::awaiting) {
      emit_input_event(out, now, s, before, input_status::ok, "reading accepted again");
    }
    s.status = input_status::ok;
    s.fault.reset();
    s.bad_reason.clear();
    s.bad_messages = 0;
    return true;
  }

  // One event when the input turns bad and one for each further kind of fault while it stays
  // bad (so two bad payloads taking turns are two events, not one per message); the rest
  // are counted. The event keeps the reason of the first message of its kind.
  void note_bad_reading(input_slot& s, input_fault fault, const std::string& reason, timestamp now,
                        engine_output& out) {
    ++counters.bad_readings;
    const unsigned bit = 1U << static_cast<unsigned>(fault);
    if (s.status != input_status::bad) {
      s.bad_messages = 0;
      s.faults_reported = 0;
    }
    ++s.bad_messages;
    if (s.faults_reported & bit) {
      ++counters.suppressed_input_events;
      return;
    }
    s.faults_reported |= bit;
    const input_status from = s.status;
    s.status = input_status::bad;
    s.fault = fault;
    s.bad_reason = reason;
    emit_input_event(out, now, s, from, input_status::bad, reason);
  }

  void on_reading(const std::vector<std::size_t>& ids, std::string_view payload, timestamp reading_ts, timestamp now,
                  engine_output& out) {
    for (std::size_t id : ids) {
      input_slot& s = slots[id];
      apply_reading(s, payload, reading_ts, now, out);
      if (!s.owner_is_loop) {
        evaluate_zone(s.owner, now, out);
      } else {
        loop_rt& l = loops[s.owner];
        if (s.kind == input_kind::supply_temp) {
          // Zones without a fresh surface use the supply temperature as their reference.
          for (std::size_t zi : l.zones) {
            if (!zones[zi].surface_min_c) evaluate_zone(zi, now, out);
          }
        }
        update_cooling(l, now);
        publish_loop(l, now, out, false);
      }
    }
  }

  void update_cooling(loop_rt& l, timestamp now) {
    l.cooling_kw.reset();
    if (!l.return_slot || !l.flow_slot) return;
    const auto sup = slot_value(slots[l.supply_slot], now);
    const auto ret = slot_value(slots[*l.return_slot], now);
    const auto flow = slot_value(slots[*l.flow_slot], now);
    if (!sup || !ret || !flow) return;
    const auto kw = loop_cooling_kw(*sup, *ret, *flow);
    if (kw) l.cooling_kw = kw.value();
  }

  // ---- commands ---------------------------------------------------------------------
  void reject(const std::string& topic, const std::string& verb, const std::string& zone, rejection_kind kind,
              const std::string& reason, timestamp now, engine_output& out) {
    ++counters.rejected;
    if (!commands.report_rejection(topic, kind, now)) {
      ++counters.suppressed_rejections;
      return;
    }
    emit_rejected(topic, verb, zone, reason, now, out);
  }

  void emit_rejected(const std::string& topic, const std::string& verb, const std::string& zone,
                     const std::string& reason, timestamp now, engine_output& out) {
    const bool known = zone_index.count(zone) > 0;
    const subject_type st = known ? subject_type::zone : subject_type::site;
    event_json e(cfg.site, now, st, zone, "rejected");
    if (!known && !zone.empty()) e.text("zone", zone);
    e.text("topic", topic).text("command", verb).text("reason", reason);
    emit_event(out, now, st, known ? zone : std::string{}, "rejected", e, false);
  }

  void on_command(const std::string& topic, std::string_view payload, timestamp now, engine_output& out) {
    const std::string verb = topic.substr(cmd_prefix.size());
    if (!commands.admit(now)) {
      ++counters.rate_limited;
      if (commands.report_rate_limit(now)) {
        char reason[96];
        std::snprintf(reason, sizeof reason, "too many commands: more than %.0f a second (bursts of %.0f)",
                      k_command_rate_per_s, k_command_burst);
        emit_rejected(topic, verb, "", reason, now, out);
      }
      return;
    }
    std::string zone_named;
    auto parsed = parse_operator_command(verb, payload, zone_named);
    if (!parsed) {
      const rejection_kind kind = payload.size() > k_max_command_bytes ? rejection_kind::too_large
                                  : !parse_command_verb(verb)          ? rejection_kind::unknown_command
                                                                       : rejection_kind::malformed;
      return reject(topic, verb, zone_named, kind, parsed.err().message, now, out);
    }
    const operator_command& c = parsed.value();
    const auto it = zone_index.find(c.zone);
    if (it == zone_index.end()) {
      return reject(topic, verb, c.zone, rejection_kind::unknown_zone, "unknown zone '" + c.zone + "'", now, out);
    }
    zone_rt& z = zones[it->second];

    const alarm_status before = z.alarm.status();
    std::string why;
    switch (c.verb) {
      case command_verb::ack: why = z.alarm.acknowledge(); break;
      case command_verb::shelve: why = z.alarm.shelve(c.minutes, now); break;
      case command_verb::unshelve: why = z.alarm.unshelve(); break;
    }
    if (!why.empty()) return reject(topic, verb, c.zone, rejection_kind::refused, why, now, out);
    ++counters.commands;

    event_json e(cfg.site, now, subject_type::zone, z.cfg->id, command_verb_name(c.verb));
    switch (c.verb) {
      case command_verb::ack:
        // ISA-18.2: an alarm that cleared while unacknowledged is latched (return to normal, unacknowledged).
        e.text("from", before.active ? "unacknowledged" : "latched").text("to", "acknowledged").text("by", c.by);
        e.text_or_null("note", c.note);
        break;
      case command_verb::shelve:
        e.text("from", before.shelved_until ? "shelved" : "unshelved").text("to", "shelved").text("by", c.by);
        e.integer("minutes", c.minutes).text("until", format_iso8601_utc(*z.alarm.status().shelved_until));
        e.text_or_null("reason", c.reason);
        break;
      case command_verb::unshelve:
        e.text("from", "shelved").text("to", "unshelved").text("by", c.by).text_or_null("reason", c.reason);
        break;
    }
    e.alarm(z.alarm.status());
    emit_event(out, now, subject_type::zone, z.cfg->id, command_verb_name(c.verb), e, true);
    emit_zone_snapshot(out, z, now);
    publish_zone(z, now, out, false);
  }

  // ---- tick -------------------------------------------------------------------------
  void check_staleness(timestamp now, engine_output& out) {
    const double since_start_s = seconds_between(start, now);
    for (input_slot& s : slots) {
      if (s.stale_after_s <= 0.0 || s.fresh(now)) continue;
      // An input that keeps sending bad payloads is bad, not silent.
      const bool still_talking = s.last_message && seconds_between(*s.last_message, now) < s.stale_after_s;
      if (s.status == input_status::bad && still_talking) continue;
      if (s.last_reading) {
        if (s.status == input_status::stale) continue;
        emit_input_event(out, now, s, s.status, input_status::stale,
                         "no reading for " + format_seconds(s.stale_after_s));
        s.status = input_status::stale;
        s.fault.reset();
        s.bad_reason.clear();
        s.bad_messages = 0;
      } else if (since_start_s >= s.stale_after_s && s.status != input_status::missing) {
        emit_input_event(out, now, s, s.status, input_status::missing,
                         "no reading in the " + format_seconds(s.stale_after_s) + " since start");
        s.status = input_status::missing;
        s.fault.reset();
        s.bad_reason.clear();
        s.bad_messages = 0;
      }
    }
  }

  void tick_loops(timestamp now, engine_output& out) {
    for (loop_rt& l : loops) {
      reset_demand d;
      d.no_counted_zone = true;
      for (std::size_t zi : l.zones) {
        const zone_rt& z = zones[zi];
        if (!z.counts_for_reset()) continue;
        d.no_counted_zone = false;
        if (!z.dew_point_c) {
          d.dew_point_unknown = true;
          d.governing_zone = z.cfg->id;
          break;
        }
        if (!d.max_dew_point_c || *z.dew_point_c > *d.max_dew_point_c) {
          d.max_dew_point_c = z.dew_point_c;
          d.governing_zone = z.cfg->id;
        }
      }
      l.reset.update(d, now);
      update_cooling(l, now);
      loop_outputs(l, now, out);
    }
  }

  void tick_dehumidifiers(timestamp now, engine_output& out) {
    for (dehumidifier_rt& d : dehumidifiers) {
      const auto& rc = d.cfg->dew_point_request;
      std::optional<double> coldest_c;
      std::string governing;
      const char* source = "";
      for (std::size_t zi : d.zones) {
        const zone_rt& z = zones[zi];
        const std::optional<double> ref = z.surface_min_c ? z.surface_min_c : z.supply_c;
        if (ref && (!coldest_c || *ref < *coldest_c)) {
          coldest_c = ref;
          governing = z.cfg->id;
          source = z.surface_min_c ? "surface" : "supply";
        }
      }
      double request_c = rc.min_c;
      char reason[200];
      if (coldest_c) {
        request_c = std::clamp(*coldest_c - rc.offset_k, rc.min_c, rc.max_c);
        std::snprintf(reason, sizeof reason, "coldest %s %.2f °C in %s - %.2f K", source, *coldest_c,
                      governing.c_str(), rc.offset_k);
      } else {
        std::snprintf(reason, sizeof reason, "no surface or supply temperature known: driest request");
      }
      if (d.published_request_c && std::fabs(request_c - *d.published_request_c) < k_dehumidify_event_k - k_epsilon) {
        continue;
      }
      event_json e(cfg.site, now, subject_type::dehumidifier, d.cfg->id, "dehumidify");
      e.number("from", d.published_request_c).number("to", request_c).text("reason", reason);
      emit_event(out, now, subject_type::dehumidifier, d.cfg->id, "dehumidify", e, false);
      out.messages.push_back({rc.topic, format_bare_number(request_c), true, message_class::command});
      d.published_request_c = request_c;
    }
  }

  void tick(timestamp now, engine_output& out) {
    check_staleness(now, out);
    for (std::size_t zi = 0; zi < zones.size(); ++zi) {
      zone_rt& z = zones[zi];
      if (z.alarm.expire_shelving(now)) {
        event_json e(cfg.site, now, subject_type::zone, z.cfg->id, "unshelve");
        e.text("from", "shelved").text("to", "unshelved").null("by").text("reason", "shelving expired");
        e.alarm(z.alarm.status());
        emit_event(out, now, subject_type::zone, z.cfg->id, "unshelve", e, true);
        emit_zone_snapshot(out, z, now);
      }
      evaluate_zone(zi, now, out);
    }
    tick_loops(now, out);
    tick_dehumidifiers(now, out);
  }

  void publish_all(timestamp now, engine_output& out) {
    for (zone_rt& z : zones) {
      publish_zone(z, now, out, true);
      if (z.valve && z.valve->position() != valve_position::unset) {
        const auto& vcfg = *z.cfg->valve;
        out.messages.push_back({vcfg.topic,
                                z.valve->position() == valve_position::open ? vcfg.open_payload : vcfg.closed_payload,
                                true, message_class::command});
      }
    }
    for (loop_rt& l : loops) publish_loop(l, now, out, true);
  }

  // `from_storage`: a restart (the alarms are held until the zones' own inputs report),
  // not a reload (which carries the readings over too).
  void restore(const restored_state& r, bool from_storage) {
    for (const auto& zs : r.zones) {
      const auto it = zone_index.find(zs.zone);
      if (it == zone_index.end()) continue;  // zone removed from the config since
      zone_rt& z = zones[it->second];
      alarm_status a;
      a.active = zs.alarm_active;
      a.acknowledged = zs.acknowledged;
      a.shelved_until = zs.shelved_until;
      band alarm_band = band::safe;
      for (band b : {band::alarm, band::condensing, band::unknown}) {
        if (zs.band == band_name(b)) alarm_band = b;
      }
      if (a.active && alarm_band == band::safe) alarm_band = band::alarm;
      z.alarm.restore(a, alarm_band);
      z.alarm_condition = a.active;
      z.hold_restored_alarm = from_storage && a.active;
      if (z.valve) {
        if (zs.valve == "open") z.valve->restore(valve_position::open);
        if (zs.valve == "closed") z.valve->restore(valve_position::closed);
      }
    }
    for (const auto& ls : r.loops) {
      for (loop_rt& l : loops) {
        if (l.cfg->id != ls.loop) continue;
        const double sp = std::clamp(ls.setpoint_c, l.cfg->setpoint.min_c, l.cfg->setpoint.max_c);
        l.reset.restore(sp);
        l.last_event_setpoint_c = sp;
      }
    }
  }
};

engine::engine(site_config config) : s_(std::make_unique<state>(std::move(config))) { s_->build(); }
engine::~engine() = default;

void engine::begin(timestamp now, const restored_state& restored, engine_output& out) {
  s_->start = now;
  s_->last_now = now;
  s_->begun = true;
  s_->restore(restored, true);
  s_->publish_all(now, out);
}

void engine::adopt(const engine& previous, timestamp now, engine_output& out) {
  const state& p = *previous.s_;
  s_->start = p.start;
  s_->last_now = std::max(now, p.last_now);
  now = s_->last_now;
  s_->begun = true;
  s_->restore(previous.snapshot(), false);
  // Carry readings over by (topic, field) so a reload neither waits for fresh data
  // nor treats the zones as unknown.
  for (input_slot& s : s_->slots) {
    const auto it = p.slots_by_topic.find(s.cfg->topic);
    if (it == p.slots_by_topic.end()) continue;
    for (std::size_t id : it->second) {
      const input_slot& old = p.slots[id];
      if (old.cfg->field != s.cfg->field || is_switch_kind(old.kind) != is_switch_kind(s.kind)) continue;
      s.value = old.value;
      s.active = old.active;
      s.last_reading = old.last_reading;
      s.last_message = old.last_message;
      s.status = old.status;
      s.bad_reason = old.bad_reason;
    }
  }
  for (zone_rt& z : s_->zones) {
    const auto it = p.zone_index.find(z.cfg->id);
    if (it != p.zone_index.end()) z.bands.force(p.zones[it->second].bands.current());
  }
  for (loop_rt& l : s_->loops) {
    for (const loop_rt& old : p.loops) {
      if (old.cfg->id == l.cfg->id) l.published_bare = old.published_bare;
    }
  }
  // What the plant was last told stays the reference for the 0.1 K republish rule.
  for (dehumidifier_rt& d : s_->dehumidifiers) {
    for (const dehumidifier_rt& old : p.dehumidifiers) {
      if (old.cfg->id == d.cfg->id) d.published_request_c = old.published_request_c;
    }
  }
  s_->publish_all(now, out);
}

void engine::on_message(const std::string& topic, std::string_view payload, timestamp now, engine_output& out,
                        bool retained) {
  state& s = *s_;
  ++s.counters.messages;
  const timestamp reading_ts = now;
  now = s.advance(now);
  if (topic.compare(0, s.cmd_prefix.size(), s.cmd_prefix) == 0) {
    if (retained) {
      ++s.counters.retained_ignored;
      return;
    }
    s.on_command(topic, payload, now, out);
    return;
  }
  const auto it = s.slots_by_topic.find(topic);
  if (it == s.slots_by_topic.end()) {
    ++s.counters.unrouted;
    return;
  }
  if (!retained) {
    s.on_reading(it->second, payload, reading_ts, now, out);
    return;
  }
  std::vector<std::size_t> switches;
  for (std::size_t id : it->second) {
    if (is_switch_kind(s.slots[id].kind)) switches.push_back(id);
  }
  if (switches.size() != it->second.size()) ++s.counters.retained_ignored;
  if (!switches.empty()) s.on_reading(switches, payload, reading_ts, now, out);
}

void engine::tick(timestamp now, engine_output& out) { s_->tick(s_->advance(now), out); }

void engine::flush(timestamp now, engine_output& out) {
  now = s_->advance(now);
  for (zone_rt& z : s_->zones) {
    if (z.sample.minute >= 0) {
      s_->emit_sample(z, out);
      z.sample = minute_accumulator{};
    }
    s_->emit_zone_snapshot(out, z, now);
  }
  for (const loop_rt& l : s_->loops) out.loop_snapshots.push_back({l.cfg->id, l.reset.setpoint_c(), now});
}

std::vector<std::string> engine::subscriptions() const {
  std::vector<std::string> topics;
  topics.reserve(s_->slots_by_topic.size() + 1);
  for (const auto& kv : s_->slots_by_topic) topics.push_back(kv.first);
  std::sort(topics.begin(), topics.end());
  topics.push_back(s_->cmd_prefix + "#");
  return topics;
}

const site_config& engine::config() const { return s_->cfg; }
const engine_counters& engine::counters() const { return s_->counters; }

restored_state engine::snapshot() const {
  restored_state r;
  for (const zone_rt& z : s_->zones) r.zones.push_back(state::snapshot_of(z, s_->last_now));
  for (const loop_rt& l : s_->loops) r.loops.push_back({l.cfg->id, l.reset.setpoint_c(), s_->last_now});
  return r;
}

std::string engine::status_topic() const { return s_->cfg.publish.prefix + "/status"; }
std::string engine::events_topic() const { return s_->cfg.publish.prefix + "/events"; }
std::string engine::command_prefix() const { return s_->cmd_prefix; }

void engine::service_event(timestamp now, const std::string& from, const std::string& to, const std::string& reason,
                           engine_output& out) const {
  event_json e(s_->cfg.site, now, subject_type::site, "", "service");
  e.text_or_null("from", from).text("to", to).text("reason", reason);
  std::string json = e.dump();
  out.messages.push_back({events_topic(), json, false, message_class::event});
  out.events.push_back({now, subject_type::site, "", "service", std::move(json)});
}

}  // namespace dewmargin
