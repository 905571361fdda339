// loops:, zones: and dehumidifiers: — the plant the service supervises.
#include <algorithm>

#include "config_reading.h"

namespace dewmargin::config_detail {
namespace {

// "zone 'level2-east'", or "zone #2" while the id is missing or unusable.
// Looks by iterating: yaml-cpp's operator[] on a missing key yields a node whose
// accessors throw.
std::string entity_context(const yaml_node& item, const char* what, int index) {
  for (const auto& kv : item.pairs()) {
    if (kv.key.is_scalar() && kv.key.scalar() == "id" && kv.value.is_scalar() && !kv.value.scalar().empty()) {
      return std::string(what) + " '" + kv.value.scalar() + "'";
    }
  }
  return std::string(what) + " #" + std::to_string(index);
}

// A list section; empty (`zones:` with nothing under it) counts as no entries.
bool expect_list(const yaml_node& node, const char* name, const char* entries, source_mark at, diagnostics& diag) {
  if (node.is_sequence() || node.is_null()) return true;
  diag.error(at, std::string("'") + name + "' must be a list of " + entries + ", got " + describe(node));
  return false;
}

std::optional<std::string> read_id(const map_reader& m, const char* what, std::vector<id_record>& ids,
                                   diagnostics& diag) {
  auto id = m.text("id", presence::required);
  if (!id) return std::nullopt;
  // Kept even when unusable (already reported), so references to it add no second error.
  if (!id->value.empty()) ids.push_back({id->value, id->at});
  if (!check_id(*id, what, diag)) return std::nullopt;
  return id->value;
}

// `min_c`/`max_c` of a setpoint or a dew point request; min above max is reported at min.
bool read_range_c(const map_reader& m, double& min_c, double& max_c) {
  const auto lo = m.number("min_c", number_rule::any, presence::required);
  const auto hi = m.number("max_c", number_rule::any, presence::required);
  if (!lo || !hi) return false;
  if (lo->value > hi->value) {
    m.diag().error(lo->at, m.context() + ": 'min_c' (" + format_number(lo->value) + ") must not be above 'max_c' (" +
                               format_number(hi->value) + ")");
    return false;
  }
  min_c = lo->value;
  max_c = hi->value;
  return true;
}

std::optional<setpoint_config> read_setpoint(const yaml_node& node, source_mark at, const std::string& owner,
                                             reading& r) {
  if (!expect_map(node, "setpoint", " like { topic: ..., min_c: ..., max_c: ... }", at, r.diag)) return std::nullopt;
  const map_reader m(node, owner, {"topic", "min_c", "max_c", "reset_margin_k", "fall_k_per_min"}, r.diag);
  setpoint_config s;
  bool ok = true;
  if (auto topic = read_output_topic(m, owner, r)) {
    s.topic = *topic;
  } else {
    ok = false;
  }
  if (!read_range_c(m, s.min_c, s.max_c)) ok = false;
  if (!m.number_into("reset_margin_k", number_rule::non_negative, s.reset_margin_k)) ok = false;
  if (!m.number_into("fall_k_per_min", number_rule::positive, s.fall_k_per_min)) ok = false;
  if (!ok) return std::nullopt;
  return s;
}

// Optional single input: absent is fine; present must be valid.
// Target: std::optional<input_config> or heap_optional<input_config>.
template <typename Optional>
bool read_optional_input(const map_reader& m, const char* key, input_kind kind, Optional& target, reading& r) {
  if (!m.has(key)) return true;
  target = read_input(*m.value(key), m.value_mark(key), key, m.context() + " " + key, kind, r);
  return target.has_value();
}

bool read_required_input(const map_reader& m, const char* key, input_kind kind, input_config& target, reading& r) {
  if (!m.require(key)) return false;
  auto in = read_input(*m.value(key), m.value_mark(key), key, m.context() + " " + key, kind, r);
  if (!in) return false;
  target = std::move(*in);
  return true;
}

// One map or a list of maps (`humidity:`, `surfaces:`).
bool read_input_list(const map_reader& m, const char* key, input_kind kind, bool at_least_one,
                     std::vector<input_config>& target, reading& r) {
  if (!m.has(key)) return !at_least_one || m.require(key);
  const yaml_node& node = *m.value(key);
  const source_mark at = m.value_mark(key);
  const std::string owner = m.context() + " " + key;
  if (node.is_map()) {
    auto in = read_input(node, at, key, owner, kind, r);
    if (in) target.push_back(std::move(*in));
    return in.has_value();
  }
  if (node.is_null() && !at_least_one) return true;
  if (!node.is_sequence() || (at_least_one && node.size() == 0)) {
    r.diag.error(at, std::string("'") + key + "' must be a map like { topic: ... } or a list of them" +
                         (at_least_one ? " (at least one)" : "") + ", got " + describe(node));
    return false;
  }
  bool ok = true;
  for (const auto& item : node.items()) {
    auto in = read_input(item, mark_of(item), key, owner, kind, r);
    if (in) {
      target.push_back(std::move(*in));
    } else {
      ok = false;
    }
  }
  return ok;
}

void check_margin_order(const std::string& context, const band_thresholds& t, const threshold_marks& own, bool inherits,
                        diagnostics& diag) {
  if (!own.valid || t.margin_alarm_k < t.margin_warn_k) return;
  // Reported where this map wrote a threshold; a map that wrote neither inherits a
  // pair already reported at `defaults:`.
  const auto at = own.alarm_at ? own.alarm_at : own.warn_at;
  if (!at) return;
  std::string message = context + ": margin_alarm_k (" + format_number(t.margin_alarm_k) +
                        ") must be below margin_warn_k (" + format_number(t.margin_warn_k) + ")";
  if (inherits && !own.warn_at) message += ", which comes from defaults";
  if (inherits && !own.alarm_at) message += ", and margin_alarm_k comes from defaults";
  diag.error(*at, message);
}

}  // namespace

const std::vector<std::string>& threshold_keys() {
  static const std::vector<std::string> keys{"margin_warn_k", "margin_alarm_k", "hysteresis_k",
                                             "confirm_s",     "stale_after_s",  "trend_window_s"};
  return keys;
}

threshold_marks read_thresholds(const map_reader& m, band_thresholds& t) {
  threshold_marks marks;
  const auto read = [&](const char* key, number_rule rule, double& target) {
    if (!m.number_into(key, rule, target)) marks.valid = false;
  };
  read("margin_warn_k", number_rule::positive, t.margin_warn_k);
  read("margin_alarm_k", number_rule::positive, t.margin_alarm_k);
  read("hysteresis_k", number_rule::non_negative, t.hysteresis_k);
  read("confirm_s", number_rule::non_negative, t.confirm_s);
  read("stale_after_s", number_rule::non_negative, t.stale_after_s);
  read("trend_window_s", number_rule::positive, t.trend_window_s);
  if (m.has("margin_warn_k")) marks.warn_at = m.value_mark("margin_warn_k");
  if (m.has("margin_alarm_k")) marks.alarm_at = m.value_mark("margin_alarm_k");
  return marks;
}

void check_defaults_margins(const band_thresholds& t, const threshold_marks& marks, diagnostics& diag) {
  check_margin_order("defaults", t, marks, false, diag);
}

void read_loops(const yaml_node& node, source_mark at, reading& r) {
  if (!expect_list(node, "loops", "loops", at, r.diag)) return;
  int index = 0;
  for (const auto& item : node.items()) {
    ++index;
    if (!item.is_map()) {
      r.diag.error(mark_of(item), "each loop must be a map with id, supply_temp and setpoint, got " + describe(item));
      continue;
    }
    const map_reader m(item, entity_context(item, "loop", index),
                       {"id", "supply_temp", "return_temp", "flow", "setpoint", "stale_after_s"}, r.diag);
    loop_config loop;
    loop.stale_after_s = r.config.defaults.stale_after_s;
    if (auto id = read_id(m, "loop", r.index.loop_ids, r.diag)) loop.id = *id;
    read_required_input(m, "supply_temp", input_kind::temperature, loop.supply_temp, r);
    read_optional_input(m, "return_temp", input_kind::temperature, loop.return_temp, r);
    read_optional_input(m, "flow", input_kind::flow, loop.flow, r);
    if (m.require("setpoint")) {
      if (auto s = read_setpoint(*m.value("setpoint"), m.value_mark("setpoint"), m.context() + " setpoint", r)) {
        loop.setpoint = *s;
      }
    }
    m.number_into("stale_after_s", number_rule::non_negative, loop.stale_after_s);
    r.config.loops.push_back(std::move(loop));
  }
}

void read_zones(const yaml_node& node, source_mark at, reading& r) {
  if (!expect_list(node, "zones", "zones", at, r.diag)) return;
  if (node.is_null() || node.size() == 0) {
    r.diag.error(at, "'zones' must list at least one zone");
    return;
  }
  std::vector<std::string> keys{
      "id", "loop", "air_temp", "humidity", "surfaces", "condensation_switch", "window_contact", "valve"};
  keys.insert(keys.end(), threshold_keys().begin(), threshold_keys().end());
  // A zone record is large: no copies while the list grows. Only maps become zones, so a
  // long list of junk items reserves nothing.
  const auto items = node.items();
  r.config.zones.reserve(static_cast<std::size_t>(
      std::count_if(items.begin(), items.end(), [](const yaml_node& n) { return n.is_map(); })));
  int index = 0;
  for (const auto& item : items) {
    ++index;
    if (!item.is_map()) {
      r.diag.error(mark_of(item),
                   "each zone must be a map with id, loop, air_temp and humidity, got " + describe(item));
      continue;
    }
    const map_reader m(item, entity_context(item, "zone", index), keys, r.diag);
    zone_config zone;
    if (auto id = read_id(m, "zone", r.index.zone_ids, r.diag)) zone.id = *id;
    if (auto loop = m.text("loop", presence::required)) {
      zone.loop = loop->value;
      r.index.zone_loops.push_back({m.context(), loop->value, loop->at});
    }
    read_required_input(m, "air_temp", input_kind::temperature, zone.air_temp, r);
    read_input_list(m, "humidity", input_kind::humidity, true, zone.humidity, r);
    read_input_list(m, "surfaces", input_kind::temperature, false, zone.surfaces, r);
    read_optional_input(m, "condensation_switch", input_kind::binary, zone.condensation_switch, r);
    read_optional_input(m, "window_contact", input_kind::binary, zone.window_contact, r);
    if (m.has("valve")) zone.valve = read_valve(*m.value("valve"), m.value_mark("valve"), m.context() + " valve", r);

    zone.thresholds = r.config.defaults;
    const threshold_marks own = read_thresholds(m, zone.thresholds);
    // With a bad default (already reported) only a zone that writes both can be judged.
    if (r.index.defaults.valid || (own.warn_at && own.alarm_at)) {
      check_margin_order(m.context(), zone.thresholds, own, true, r.diag);
    }
    r.config.zones.push_back(std::move(zone));
  }
}

void read_dehumidifiers(const yaml_node& node, source_mark at, reading& r) {
  if (!expect_list(node, "dehumidifiers", "dehumidifiers", at, r.diag)) return;
  int index = 0;
  for (const auto& item : node.items()) {
    ++index;
    if (!item.is_map()) {
      r.diag.error(mark_of(item),
                   "each dehumidifier must be a map with id, zones and dew_point_request, got " + describe(item));
      continue;
    }
    const map_reader m(item, entity_context(item, "dehumidifier", index),
                       {"id", "zones", "dew_point_request", "fault", "supply_dew_point", "fault_k", "fault_after_s"},
                       r.diag);
    dehumidifier_config d;
    if (auto id = read_id(m, "dehumidifier", r.index.dehumidifier_ids, r.diag)) d.id = *id;
    if (m.require("zones")) {
      const yaml_node& zones = *m.value("zones");
      if (!zones.is_sequence() || zones.size() == 0) {
        r.diag.error(m.value_mark("zones"), "'zones' must be a non-empty list of zone ids, got " + describe(zones));
      } else {
        for (const auto& z : zones.items()) {
          const source_mark z_at = mark_of(z);
          auto name = scalar_text(z, "a zone id", z_at, r.diag);
          if (!name) continue;
          if (std::find(d.zones.begin(), d.zones.end(), *name) != d.zones.end()) {
            r.diag.error(z_at, m.context() + ": zone '" + *name + "' is listed twice");
            continue;
          }
          d.zones.push_back(*name);
          r.index.dehumidifier_zones.push_back({m.context(), *name, z_at});
        }
      }
    }
    if (m.require("dew_point_request")) {
      const yaml_node& req = *m.value("dew_point_request");
      const std::string owner = m.context() + " dew_point_request";
      if (expect_map(req, "dew_point_request", " like { topic: ..., min_c: ..., max_c: ... }",
                     m.value_mark("dew_point_request"), r.diag)) {
        const map_reader rm(
            req, owner, {"topic", "min_c", "max_c", "offset_k", "step_s", "respond_k", "max_step_k", "trim_k"}, r.diag);
        dew_point_request_config& q = d.dew_point_request;
        if (auto topic = read_output_topic(rm, owner, r)) q.topic = *topic;
        read_range_c(rm, q.min_c, q.max_c);
        rm.number_into("offset_k", number_rule::non_negative, q.offset_k);
        rm.number_into("step_s", number_rule::positive, q.step_s);
        rm.number_into("respond_k", number_rule::non_negative, q.respond_k);
        rm.number_into("max_step_k", number_rule::non_negative, q.max_step_k);
        rm.number_into("trim_k", number_rule::non_negative, q.trim_k);
      }
    }
    read_optional_input(m, "fault", input_kind::binary, d.fault, r);
    read_optional_input(m, "supply_dew_point", input_kind::temperature, d.supply_dew_point, r);
    m.number_into("fault_k", number_rule::non_negative, d.fault_k);
    m.number_into("fault_after_s", number_rule::non_negative, d.fault_after_s);
    r.config.dehumidifiers.push_back(std::move(d));
  }
}

}  // namespace dewmargin::config_detail
