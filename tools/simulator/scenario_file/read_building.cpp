// The building part of a scenario: zones, loops and dehumidifiers keyed by the service
// config's ids, with defaults by surface kind (docs/scenarios.md lists every key).
#include <algorithm>
#include <cmath>

#include "scenario_file/scenario_reading.h"

namespace dewmargin::sim::scenario_detail {
namespace {

template <typename T>
const T* find_id(const std::vector<T>& items, const std::string& id) {
  const auto it = std::find_if(items.begin(), items.end(), [&](const T& x) { return x.id == id; });
  return it == items.end() ? nullptr : &*it;
}

template <typename T>
std::vector<std::string> ids_of(const std::vector<T>& items) {
  std::vector<std::string> out;
  for (const auto& x : items) out.push_back(x.id);
  return out;
}

const std::vector<std::string> k_surface_words = {"ceiling_panel", "slab", "wall_panel"};

surface_kind surface_from_word(const std::string& w) {
  if (w == "slab") return surface_kind::slab;
  if (w == "wall_panel") return surface_kind::wall_panel;
  return surface_kind::ceiling_panel;
}

// clang-format off
// Zone defaults by surface kind. All common practice, no source, except where noted.
// | key          | ceiling_panel | slab        | wall_panel  |
// | height_m     | 2.8           | 3.0         | 2.8         |
// | surface_m2   | 0.4 × floor   | 0.8 × floor | 0.3 × floor |
// clang-format on
double default_height_m(surface_kind k) { return k == surface_kind::slab ? 3.0 : 2.8; }
double default_surface_share(surface_kind k) {
  switch (k) {
    case surface_kind::ceiling_panel:
      return 0.4;
    case surface_kind::slab:
      return 0.8;
    case surface_kind::wall_panel:
      return 0.3;
  }
  return 0.4;
}
// Design supply water by surface kind: the warmest of a loop's zones decides.
double default_design_supply_c(surface_kind k) {
  switch (k) {
    case surface_kind::ceiling_panel:
      return 16.0;
    case surface_kind::slab:
      return 19.0;
    case surface_kind::wall_panel:
      return 17.0;
  }
  return 16.0;
}
constexpr double k_floor_m2_per_person = 10.0;            // European office density (from memory)
constexpr double k_envelope_w_k_per_floor_m2 = 1.0;       // invented, a façade of average insulation
constexpr double k_loop_flow_l_s_per_surface_m2 = 0.008;  // ≈ 70 W/m² at 2 K water rise; common practice, no source

const std::vector<std::string> k_zone_keys = {"surface",
                                              "floor_m2",
                                              "height_m",
                                              "surface_m2",
                                              "people",
                                              "schedule",
                                              "latent_w_per_person",
                                              "sensible_w_per_person",
                                              "ventilation_l_s",
                                              "infiltration_ach",
                                              "envelope_ua_w_k",
                                              "solar_w_m2",
                                              "solar_peak_at",
                                              "occupied_gain_w_m2",
                                              "empty_gain_w_m2",
                                              "moisture_g_h",
                                              "moisture_schedule",
                                              "heat_transfer_w_m2k",
                                              "water_share",
                                              "time_constant_min",
                                              "time_constant_closed_min",
                                              "cooling_from_c",
                                              "cooling_band_k"};

std::optional<name_ref> name_at(const fields& f, std::string_view key) {
  const auto t = f.text(key);
  if (!t) return std::nullopt;
  return name_ref{*t, f.value_place(key), f.src().file};
}

// A node that is either a map of keys or empty ("g-lobby:" or "g-lobby: {}").
bool is_map_or_empty(const YAML::Node& n, const std::string& what, const source& src) {
  if (n.IsMap() || n.IsNull()) return true;
  src.error(place_of(n), what + " must be a map of keys (or empty for the defaults), got " + describe(n));
  return false;
}

std::optional<zone_draft> read_zone(const std::string& id, const YAML::Node& node, const source& src,
                                    const config_view& config) {
  zone_draft d;
  zone_physics& z = d.physics;
  z.id = id;
  if (const zone_config* zc = config.zone(id)) {
    z.loop = zc->loop;
    for (const auto& u : config.cfg.dehumidifiers) {
      if (std::find(u.zones.begin(), u.zones.end(), id) != u.zones.end()) {
        z.dehumidifier = u.id;
        break;
      }
    }
  }
  if (!is_map_or_empty(node, "zone '" + id + "'", src)) return std::nullopt;
  const fields f(node.IsMap() ? node : YAML::Node(YAML::NodeType::Map), "zone '" + id + "'", k_zone_keys, src);
  if (const auto w = f.word("surface", k_surface_words)) z.surface = surface_from_word(*w);
  z.physics = default_physics(z.surface);
  z.height_m = default_height_m(z.surface);
  f.number_into("floor_m2", number_range::positive(), z.floor_m2);
  f.number_into("height_m", number_range::between(2.0, 20.0), z.height_m);
  z.surface_m2 = default_surface_share(z.surface) * z.floor_m2;
  f.number_into("surface_m2", number_range::positive(), z.surface_m2);
  if (const YAML::Node* p = f.node("people")) {
    if (p->IsMap()) {
      d.people_series = f.series("people", number_range::non_negative());
    } else {
      d.people = f.number("people", number_range::non_negative());
    }
  } else {
    d.people = z.floor_m2 / k_floor_m2_per_person;
  }
  d.schedule = name_at(f, "schedule");
  if (d.schedule && d.people_series) {
    f.error_at_value("schedule", "'schedule' scales a number of people; 'people' already gives them over the day");
  }
  f.number_into("latent_w_per_person", number_range::between(0.0, 1000.0), z.latent_w_per_person);
  f.number_into("sensible_w_per_person", number_range::between(0.0, 1000.0), z.sensible_w_per_person);
  if (const auto v = f.number("ventilation_l_s", number_range::non_negative())) {
    z.ventilation_l_s = *v;
    d.ventilation_given = true;
  }
  f.number_into("infiltration_ach", number_range::between(0.0, 50.0), z.infiltration_ach);
  z.envelope_ua_w_k = k_envelope_w_k_per_floor_m2 * z.floor_m2;
  f.number_into("envelope_ua_w_k", number_range::non_negative(), z.envelope_ua_w_k);
  f.number_into("solar_w_m2", number_range::between(0.0, 1000.0), z.solar_peak_w_m2);
  if (const auto t = f.time_of_day("solar_peak_at")) z.solar_peak_s = *t;
  f.number_into("occupied_gain_w_m2", number_range::between(0.0, 500.0), z.occupied_gain_w_m2);
  f.number_into("empty_gain_w_m2", number_range::between(0.0, 500.0), z.empty_gain_w_m2);
  if (const YAML::Node* m = f.node("moisture_g_h")) {
    if (m->IsMap()) {
      d.moisture_series = f.series("moisture_g_h", number_range::non_negative());
    } else if (const auto v = f.number("moisture_g_h", number_range::non_negative())) {
      d.moisture_g_h = *v;
    }
  }
  d.moisture_schedule = name_at(f, "moisture_schedule");
  if (d.moisture_schedule && d.moisture_series) {
    f.error_at_value("moisture_schedule",
                     "'moisture_schedule' scales a number; 'moisture_g_h' already gives it over the day");
  }
  f.number_into("heat_transfer_w_m2k", number_range::positive(), z.physics.heat_transfer_w_m2k);
  if (const auto v = f.number("water_share", number_range{0.0, 1.0, true})) z.physics.water_share = *v;
  if (const auto v = f.number("time_constant_min", number_range::positive())) z.physics.tau_open_s = *v * 60.0;
  if (const auto v = f.number("time_constant_closed_min", number_range::positive())) {
    z.physics.tau_closed_s = *v * 60.0;
  }
  f.number_into("cooling_from_c", number_range::between(10.0, 35.0), z.cooling_from_c);
  f.number_into("cooling_band_k", number_range::positive(), z.cooling_band_k);
  return d;
}

std::optional<input_config> read_unit_sensor(const fields& f, std::string_view key, bool is_switch,
                                             const config_view& config) {
  const YAML::Node* n = f.node(key);
  if (!n) return std::nullopt;
  const std::string context = f.context() + " " + std::string(key);
  if (!n->IsMap()) {
    f.error_at_value(key, "'" + std::string(key) + "' must be a map with 'topic' (and 'field'), got " + describe(*n));
    return std::nullopt;
  }
  std::vector<std::string> keys = {"topic", "field"};
  if (is_switch) keys.push_back("active");
  const fields s(*n, context, keys, f.src());
  input_config in;
  s.require("topic");
  if (const auto t = s.text("topic")) in.topic = *t;
  if (const auto field = s.text("field")) {
    if (field->front() != '/')
      s.error_at_value("field", "'field' must be a JSON pointer starting with '/', got '" + *field + "'");
    in.field = *field;
  } else if (config.cfg.clock.source == clock_source::readings && s.has("topic")) {
    s.src().error(s.where(), context + ": 'field' is needed, the config " + config.label +
                                 " takes time from the readings (clock source readings)");
  }
  if (is_switch) {
    in.active = {"fault"};
    if (const auto a = s.text("active")) in.active = {*a};
    if (!in.active.empty() && in.active.front() == "ok")
      s.error_at_value("active", "'active' cannot be 'ok' (the word sent when the unit runs)");
  }
  if (in.topic.empty()) return std::nullopt;
  return in;
}

std::optional<dehumidifier_physics> read_dehumidifier(const std::string& id, const YAML::Node& node, const source& src,
                                                      const config_view& config) {
  dehumidifier_physics d;
  d.id = id;
  if (!is_map_or_empty(node, "dehumidifier '" + id + "'", src)) return std::nullopt;
  const fields f(node.IsMap() ? node : YAML::Node(YAML::NodeType::Map), "dehumidifier '" + id + "'",
                 {"design_dew_point_c", "min_dew_point_c", "supply_air_c", "lag_min", "capacity_kg_h", "fault",
                  "supply_dew_point"},
                 src);
  f.number_into("design_dew_point_c", number_range::between(0.0, 25.0), d.design_dew_point_c);
  f.number_into("min_dew_point_c", number_range::between(0.0, 25.0), d.min_dew_point_c);
  f.number_into("supply_air_c", number_range::between(5.0, 35.0), d.supply_air_c);
  if (const auto v = f.number("lag_min", number_range::positive())) d.coil_tau_s = *v * 60.0;
  d.capacity_kg_h = f.number("capacity_kg_h", number_range::positive());
  if (d.min_dew_point_c > d.design_dew_point_c) {
    src.error(f.has("min_dew_point_c") ? f.value_place("min_dew_point_c") : f.value_place("design_dew_point_c"),
              "dehumidifier '" + id + "': 'min_dew_point_c' " + number_text(d.min_dew_point_c) +
                  " is above 'design_dew_point_c' " + number_text(d.design_dew_point_c));
  }
  d.fault = read_unit_sensor(f, "fault", true, config);
  d.supply_dew_point = read_unit_sensor(f, "supply_dew_point", false, config);
  return d;
}

std::optional<loop_physics> read_loop(const std::string& id, const YAML::Node& node, const source& src,
                                      std::optional<double>& design_given, std::optional<double>& flow_given) {
  loop_physics l;
  l.id = id;
  if (!is_map_or_empty(node, "loop '" + id + "'", src)) return std::nullopt;
  const fields f(node.IsMap() ? node : YAML::Node(YAML::NodeType::Map), "loop '" + id + "'",
                 {"design_supply_c", "flow_l_s", "plant_lag_min"}, src);
  design_given = f.number("design_supply_c", number_range::between(5.0, 30.0));
  flow_given = f.number("flow_l_s", number_range::positive());
  if (const auto v = f.number("plant_lag_min", number_range::positive())) l.plant_tau_s = *v * 60.0;
  return l;
}

}  // namespace

const zone_config* config_view::zone(const std::string& id) const { return find_id(cfg.zones, id); }
const loop_config* config_view::loop(const std::string& id) const { return find_id(cfg.loops, id); }
const dehumidifier_config* config_view::dehumidifier(const std::string& id) const {
  return find_id(cfg.dehumidifiers, id);
}
std::vector<std::string> config_view::zone_ids() const { return ids_of(cfg.zones); }
std::vector<std::string> config_view::loop_ids() const { return ids_of(cfg.loops); }
std::vector<std::string> config_view::dehumidifier_ids() const { return ids_of(cfg.dehumidifiers); }

std::string unknown_id(const std::string& what, const std::string& id, const std::vector<std::string>& known,
                       const config_view& config) {
  std::string message = what + " '" + id + "' is not in the config " + config.label;
  if (auto near = nearest_word(id, known)) {
    message += "; did you mean '" + *near + "'?";
  } else if (known.empty()) {
    message += " (it has none)";
  } else {
    message += " (it has " + one_of(known) + ")";
  }
  return message;
}

std::optional<building_draft> read_building(const YAML::Node& node, const source& src, const config_view& config) {
  if (!node.IsMap()) {
    src.error(place_of(node),
              "the building must be a map with 'zones' (and 'name', 'loops', 'dehumidifiers'), got " + describe(node));
    return std::nullopt;
  }
  const fields top(node, "building", {"name", "zones", "loops", "dehumidifiers"}, src);
  building_draft b;
  b.name = top.text("name").value_or("building");
  bool ok = top.require("zones");

  // Zones: every zone of the config, each once.
  std::vector<std::string> named;
  for (const auto& e : top.entries("zones")) {
    named.push_back(e.id);
    if (!config.zone(e.id)) {
      src.error(e.at, unknown_id("zone", e.id, config.zone_ids(), config));
      ok = false;
      continue;
    }
    if (auto z = read_zone(e.id, e.value, src, config)) {
      b.zones.push_back(std::move(*z));
    } else {
      ok = false;
    }
  }
  std::vector<std::string> missing;
  for (const auto& zc : config.cfg.zones) {
    if (std::find(named.begin(), named.end(), zc.id) == named.end()) missing.push_back(zc.id);
  }
  if (top.has("zones") && !missing.empty()) {
    src.error(top.key_place("zones"), "zones: the config " + config.label + " also has " + one_of(missing) +
                                          " (every zone of the config needs an entry; an empty one takes the "
                                          "defaults)");
    ok = false;
  }

  // Loops: those named, then every other loop of the config with its defaults.
  struct loop_given {
    std::optional<double> design_c;
    std::optional<double> flow_l_s;
  };
  std::vector<loop_given> given;
  for (const auto& e : top.entries("loops")) {
    if (!config.loop(e.id)) {
      src.error(e.at, unknown_id("loop", e.id, config.loop_ids(), config));
      ok = false;
      continue;
    }
    loop_given g;
    if (auto l = read_loop(e.id, e.value, src, g.design_c, g.flow_l_s)) {
      b.loops.push_back(*l);
      given.push_back(g);
    } else {
      ok = false;
    }
  }
  for (const auto& lc : config.cfg.loops) {
    if (find_id(b.loops, lc.id)) continue;
    loop_physics l;
    l.id = lc.id;
    b.loops.push_back(l);
    given.emplace_back();
  }
  // Loop defaults from its zones: the warmest design supply of their surface kinds, a flow
  // for their panel area.
  for (std::size_t i = 0; i < b.loops.size(); ++i) {
    loop_physics& l = b.loops[i];
    double design_c = 0.0;
    double area_m2 = 0.0;
    for (const auto& z : b.zones) {
      if (z.physics.loop != l.id) continue;
      design_c = std::max(design_c, default_design_supply_c(z.physics.surface));
      area_m2 += z.physics.surface_m2;
    }
    l.design_supply_c = given[i].design_c.value_or(design_c > 0.0 ? design_c : 16.0);
    l.flow_l_s = given[i].flow_l_s.value_or(std::max(0.1, k_loop_flow_l_s_per_surface_m2 * area_m2));
  }

  // Dehumidifiers: the same.
  for (const auto& e : top.entries("dehumidifiers")) {
    if (!config.dehumidifier(e.id)) {
      src.error(e.at, unknown_id("dehumidifier", e.id, config.dehumidifier_ids(), config));
      ok = false;
      continue;
    }
    if (auto d = read_dehumidifier(e.id, e.value, src, config)) {
      b.dehumidifiers.push_back(std::move(*d));
    } else {
      ok = false;
    }
  }
  for (const auto& dc : config.cfg.dehumidifiers) {
    if (find_id(b.dehumidifiers, dc.id)) continue;
    dehumidifier_physics d;
    d.id = dc.id;
    b.dehumidifiers.push_back(d);
  }
  // In the config's order, so that the building reads like the config.
  std::vector<zone_draft> ordered;
  for (const auto& zc : config.cfg.zones) {
    const auto it =
        std::find_if(b.zones.begin(), b.zones.end(), [&](const zone_draft& d) { return d.physics.id == zc.id; });
    if (it != b.zones.end()) ordered.push_back(std::move(*it));
  }
  b.zones = std::move(ordered);
  std::vector<loop_physics> loops;
  for (const auto& lc : config.cfg.loops) loops.push_back(*find_id(b.loops, lc.id));
  b.loops = std::move(loops);
  std::vector<dehumidifier_physics> units;
  for (const auto& dc : config.cfg.dehumidifiers) units.push_back(*find_id(b.dehumidifiers, dc.id));
  b.dehumidifiers = std::move(units);
  if (!ok) return std::nullopt;
  return b;
}

}  // namespace dewmargin::sim::scenario_detail
