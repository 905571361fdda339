#include "model/sensor_feed.h"

#include <algorithm>
#include <cmath>
#include <nlohmann/json.hpp>
#include <set>
#include <stdexcept>

#include "dewmargin/units.h"
#include "model/moist_air.h"

namespace dewmargin::sim {
namespace {

constexpr double k_switch_repeat_s = 300.0;

const char* quantity_name(quantity q) {
  switch (q) {
    case quantity::air_temp:
      return "air_temp";
    case quantity::humidity:
      return "humidity";
    case quantity::surface:
      return "surface";
    case quantity::supply:
      return "supply";
    case quantity::return_water:
      return "return";
    case quantity::flow:
      return "flow";
    case quantity::condensation_switch:
      return "switch";
    case quantity::door_contact:
      return "contact";
    case quantity::unit_fault:
      return "fault";
    case quantity::unit_supply_dew_point:
      return "supply_dew_point";
  }
  return "sensor";
}

bool is_state(quantity q) {
  return q == quantity::condensation_switch || q == quantity::door_contact || q == quantity::unit_fault;
}

bool is_loop_quantity(quantity q) {
  return q == quantity::supply || q == quantity::return_water || q == quantity::flow;
}

// The scenario's name for the input a stream reports, if a sensor incident can hit it.
bool hits(const incident& i, quantity q) {
  if (!i.input) return false;
  switch (*i.input) {
    case sensor_input::air_temp:
      return q == quantity::air_temp;
    case sensor_input::humidity:
      return q == quantity::humidity;
    case sensor_input::surface:
      return q == quantity::surface;
    case sensor_input::supply_temp:
      return q == quantity::supply;
    case sensor_input::return_temp:
      return q == quantity::return_water;
    case sensor_input::flow:
      return q == quantity::flow;
  }
  return false;
}

bool is_sensor_incident(incident_kind k) {
  return k == incident_kind::sensor_silent || k == incident_kind::sensor_stuck || k == incident_kind::sensor_drift;
}

// From the model's units (°C, %, L/s) to the unit the config says the sensor sends.
double in_sensor_units(double v, input_unit unit) {
  switch (unit) {
    case input_unit::fahrenheit:
      return units::celsius_to_fahrenheit(v);
    case input_unit::fraction:
      return v / 100.0;
    case input_unit::cubic_metres_per_hour:
      return v * 3.6;
    case input_unit::us_gallons_per_minute:
      return v * 60.0 / units::k_litres_per_us_gallon;
    case input_unit::none:
    case input_unit::celsius:
    case input_unit::percent:
    case input_unit::litres_per_second:
      return v;
  }
  return v;
}

double rounded(double v, int decimals) {
  const double f = std::pow(10.0, decimals);
  const double r = std::round(v * f) / f;
  return r == 0.0 ? 0.0 : r;
}

}  // namespace

sensor_feed::sensor_feed(const site_config& cfg, const site_binding& binding, const building& b, const scenario& sc,
                         std::uint64_t seed, double step_s)
    : clock_(cfg.clock), seed_(seed), step_s_(step_s) {
  for (std::size_t l = 0; l < b.loops.size(); ++l) {
    const loop_config& lc = binding.loop(l);
    add(quantity::supply, l, lc.supply_temp, 5.0, 0.05, 2);
    if (lc.return_temp) add(quantity::return_water, l, *lc.return_temp, 10.0, 0.05, 2);
    if (lc.flow) add(quantity::flow, l, *lc.flow, 30.0, 0.01, 3);
  }
  for (std::size_t z = 0; z < b.zones.size(); ++z) {
    const zone_config& zc = binding.zone(z);
    add(quantity::air_temp, z, zc.air_temp, 60.0, 0.1, 2);
    for (const auto& h : zc.humidity) add(quantity::humidity, z, h, 30.0, 1.0, 1);
    for (const auto& s : zc.surfaces) add(quantity::surface, z, s, 30.0, 0.1, 2);
    if (zc.condensation_switch) add(quantity::condensation_switch, z, *zc.condensation_switch, k_switch_repeat_s, 0, 0);
    if (zc.window_contact) add(quantity::door_contact, z, *zc.window_contact, k_switch_repeat_s, 0, 0);
  }
  for (std::size_t u = 0; u < b.dehumidifiers.size(); ++u) {
    const dehumidifier_physics& d = b.dehumidifiers[u];
    if (d.fault) add(quantity::unit_fault, u, *d.fault, k_switch_repeat_s, 0, 0);
    if (d.supply_dew_point) add(quantity::unit_supply_dew_point, u, *d.supply_dew_point, 30.0, 0.2, 2);
  }
  std::set<std::string> topics;
  for (auto& s : streams_) {
    if (!topics.insert(s.input->topic).second) {
      throw std::invalid_argument("topic " + s.input->topic +
                                  ": the simulator needs one topic per input (it publishes each sensor alone)");
    }
    if (clock_.source == clock_source::readings && s.input->field.empty()) {
      throw std::invalid_argument("topic " + s.input->topic +
                                  ": with clock source readings every input needs a field (the payload carries "
                                  "the time at " +
                                  clock_.field + ")");
    }
    if (clock_.source == clock_source::readings && s.input->field == clock_.field) {
      throw std::invalid_argument("topic " + s.input->topic + ": field " + s.input->field + " is also the clock field");
    }
    if (is_state(s.what)) continue;
    const std::string& owner = is_loop_quantity(s.what)                    ? b.loops[s.index].id
                               : s.what == quantity::unit_supply_dew_point ? b.dehumidifiers[s.index].id
                                                                           : b.zones[s.index].id;
    for (const auto& i : sc.incidents) {
      if (is_sensor_incident(i.kind) && i.target == owner && hits(i, s.what) &&
          (i.topic.empty() || i.topic == s.input->topic)) {
        s.incidents.push_back(&i);
      }
    }
  }
}

void sensor_feed::add(quantity what, std::size_t index, const input_config& in, double interval_s, double sigma,
                      int decimals) {
  if (in.unit == input_unit::fraction) decimals += 2;  // 61.5 % is 0.615
  const std::string name = std::string(quantity_name(what)) + "/" + in.topic;
  random_stream noise(seed_, name);
  const double slots = std::floor(interval_s / step_s_);
  const double phase_s = std::floor(noise.uniform() * slots) * step_s_;
  std::string inactive = what == quantity::condensation_switch ? "dry" : what == quantity::unit_fault ? "ok" : "closed";
  if (is_state(what)) {
    if (in.active.empty()) throw std::invalid_argument("topic " + in.topic + ": a switch needs an `active` word");
    for (const auto& a : in.active) {
      if (a == inactive) throw std::invalid_argument("topic " + in.topic + ": '" + inactive + "' cannot be active");
    }
  }
  streams_.push_back({what, index, &in, interval_s, phase_s, sigma, decimals, noise, -1, inactive, {}});
}

std::string sensor_feed::payload(const stream& s, double value, timestamp ts) const {
  const double v = rounded(value, s.decimals);
  if (s.input->field.empty()) {
    char buf[48];
    std::snprintf(buf, sizeof buf, "%.*f", s.decimals, v);
    return buf;
  }
  nlohmann::json j = nlohmann::json::object();
  j[nlohmann::json::json_pointer(s.input->field)] = v;
  if (clock_.source == clock_source::readings) j[nlohmann::json::json_pointer(clock_.field)] = format_iso8601_utc(ts);
  return j.dump();
}

std::string sensor_feed::payload(const stream& s, const std::string& word, timestamp ts) const {
  if (s.input->field.empty()) return word;
  nlohmann::json j = nlohmann::json::object();
  j[nlohmann::json::json_pointer(s.input->field)] = word;
  if (clock_.source == clock_source::readings) j[nlohmann::json::json_pointer(clock_.field)] = format_iso8601_utc(ts);
  return j.dump();
}

bool sensor_feed::state_active(const stream& s, double t_s, const plant_model& plant, const scenario& sc) const {
  const building& b = plant.layout();
  switch (s.what) {
    case quantity::condensation_switch:
      return sc.active(incident_kind::switch_wet, b.zones[s.index].id, t_s) != nullptr;
    case quantity::door_contact:
      return sc.active(incident_kind::door_open, b.zones[s.index].id, t_s) != nullptr ||
             sc.active(incident_kind::window_open, b.zones[s.index].id, t_s) != nullptr;
    case quantity::unit_fault:
      return plant.dehumidifiers()[s.index].tripped;
    default:
      return false;
  }
}

void sensor_feed::sample(double t_s, timestamp ts, const plant_model& plant, const scenario& sc,
                         std::vector<outbound>& out) {
  const auto& zones = plant.zones();
  const auto& loops = plant.loops();
  const auto& layout = plant.layout();
  for (stream& s : streams_) {
    const double since = t_s - sc.start_s - s.phase_s;
    const bool periodic_due = since >= 0.0 && std::fmod(since + 1e-6, s.interval_s) < 1e-3;
    if (is_state(s.what)) {
      const bool active = state_active(s, t_s, plant, sc);
      const int state = active ? 1 : 0;
      if (state == s.last_state && !periodic_due) continue;
      s.last_state = state;
      out.push_back({s.input->topic, payload(s, active ? s.input->active.front() : s.inactive_word, ts), true, 1});
      continue;
    }
    if (!periodic_due) continue;
    double value = 0.0;
    double sigma = s.sigma;
    switch (s.what) {
      case quantity::air_temp:
        value = zones[s.index].air_c;
        break;
      case quantity::humidity:
        value = relative_humidity_pct(zones[s.index].air_c, zones[s.index].dew_point_c);
        break;
      case quantity::surface:
        value = zones[s.index].surface_c;
        break;
      case quantity::supply:
        value = loops[s.index].supply_c;
        break;
      case quantity::return_water:
        value = loops[s.index].return_c;
        break;
      case quantity::flow:
        value = layout.loops[s.index].flow_l_s;
        sigma = s.sigma * value;
        break;
      case quantity::unit_supply_dew_point:
        value = plant.dehumidifiers()[s.index].supply_dew_point_c;
        break;
      case quantity::condensation_switch:
      case quantity::door_contact:
      case quantity::unit_fault:
        break;
    }
    bool silent = false;
    bool stuck = false;
    for (const incident* i : s.incidents) {
      if (!i->active_at(t_s)) continue;
      if (i->kind == incident_kind::sensor_silent) silent = true;
      if (i->kind == incident_kind::sensor_stuck) {
        stuck = true;
        value = i->value;
      }
      if (i->kind == incident_kind::sensor_drift && !stuck) {
        const double hours = (t_s - i->start_s) / 3600.0;
        // Flow drifts in % of its value; temperatures in K and humidity in %RH are absolute.
        value += s.what == quantity::flow ? value * i->value / 100.0 * hours : i->value * hours;
      }
    }
    if (silent) continue;
    if (!stuck) value += s.noise.normal(sigma);
    if (s.what == quantity::humidity) value = std::clamp(value, 0.1, 100.0);
    out.push_back({s.input->topic, payload(s, in_sensor_units(value, s.input->unit), ts), false, 0});
  }
}

}  // namespace dewmargin::sim
