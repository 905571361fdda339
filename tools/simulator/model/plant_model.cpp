#include "model/plant_model.h"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "model/moist_air.h"

namespace dewmargin::sim {
namespace {

constexpr double k_pi = 3.141592653589793;
// The driest air a capacity-limited coil is credited with: keeps the humidity ratio positive.
constexpr double k_min_humidity_ratio = 1e-4;

template <typename T>
std::size_t index_of(const std::vector<T>& items, const std::string& id) {
  const auto it = std::find_if(items.begin(), items.end(), [&](const T& x) { return x.id == id; });
  return it == items.end() ? plant_model::npos : static_cast<std::size_t>(it - items.begin());
}

}  // namespace

double follow(double x, double target, double tau_s, double dt_s) {
  return target + (x - target) * std::exp(-dt_s / tau_s);
}

plant_model::plant_model(building b, const scenario& s) : building_(std::move(b)), scenario_(s) {
  for (const auto& l : building_.loops) {
    loop_state st;
    st.setpoint_c = l.design_supply_c;
    st.supply_c = s.initial.supply_water_c;
    st.return_c = st.supply_c;
    loops_.push_back(st);
  }
  outdoor_ = {s.outdoor_c.at(s.start_s), s.outdoor_dew_point_c.at(s.start_s)};
  for (const auto& d : building_.dehumidifiers) {
    dehumidifier_state st;
    st.request_c = d.design_dew_point_c;
    // The unit starts from outdoor air: its coil needs a few minutes to pull the dew point down.
    st.supply_dew_point_c = outdoor_.dew_point_c;
    st.supply_air_c = outdoor_.air_c;
    units_.push_back(st);
  }
  unit_air_kg_s_.assign(units_.size(), 0.0);
  const double w0 = humidity_ratio_from_dew_point(s.initial.dew_point_c);
  for (const auto& z : building_.zones) {
    const std::size_t loop = index_of(building_.loops, z.loop);
    if (loop == npos) throw std::invalid_argument("zone " + z.id + ": unknown loop " + z.loop);
    zone_loop_.push_back(loop);
    std::size_t unit = npos;
    if (!z.dehumidifier.empty()) {
      unit = index_of(building_.dehumidifiers, z.dehumidifier);
      if (unit == npos) throw std::invalid_argument("zone " + z.id + ": unknown dehumidifier " + z.dehumidifier);
      unit_air_kg_s_[unit] += k_air_density_kg_m3 * z.ventilation_l_s / 1000.0;
    }
    zone_unit_.push_back(unit);
    zone_state st;
    st.air_c = s.initial.air_c;
    st.humidity_ratio = w0;
    st.surface_c = z.surface == surface_kind::slab ? s.initial.slab_c : s.initial.air_c;
    st.dew_point_c = s.initial.dew_point_c;
    zones_.push_back(st);
  }
}

void plant_model::set_setpoint_c(std::size_t loop, double setpoint_c) { loops_.at(loop).setpoint_c = setpoint_c; }
void plant_model::set_valve_open(std::size_t zone, bool open) { zones_.at(zone).valve_open = open; }
void plant_model::set_dew_point_request_c(std::size_t unit, double dew_point_c) {
  units_.at(unit).request_c = dew_point_c;
}

void plant_model::step_dehumidifier(std::size_t u, double t_s, double dt_s) {
  const dehumidifier_physics& d = building_.dehumidifiers[u];
  dehumidifier_state& st = units_[u];
  st.tripped = scenario_.active(incident_kind::coil_trip, d.id, t_s) != nullptr;
  double target_dp = outdoor_.dew_point_c;
  double target_air = outdoor_.air_c;
  if (!st.tripped) {
    // The coil can dry down to its limit, and cannot make the air wetter than it came in.
    double driest_c = d.min_dew_point_c;
    if (d.capacity_kg_h && unit_air_kg_s_[u] > 0.0) {
      // The coil removes at most its capacity: W_supply >= W_outdoor - capacity / air flow.
      const double w_out = humidity_ratio_from_dew_point(outdoor_.dew_point_c);
      const double w_min = std::max(w_out - *d.capacity_kg_h / 3600.0 / unit_air_kg_s_[u], k_min_humidity_ratio);
      driest_c = std::max(driest_c, dew_point_from_humidity_ratio(w_min));
    }
    target_dp = std::min(std::max(st.request_c, driest_c), outdoor_.dew_point_c);
    target_air = d.supply_air_c;
  }
  st.supply_dew_point_c = follow(st.supply_dew_point_c, target_dp, d.coil_tau_s, dt_s);
  st.supply_air_c = follow(st.supply_air_c, target_air, d.coil_tau_s, dt_s);
}

void plant_model::step_zone(std::size_t i, double t_s, double dt_s) {
  const zone_physics& p = building_.zones[i];
  zone_state& z = zones_[i];
  const loop_state& loop = loops_[zone_loop_[i]];
  const surface_physics& sp = p.physics;

  const double share = p.occupancy.at(t_s);
  const incident* crowd = scenario_.active(incident_kind::crowd, p.id, t_s);
  z.people = crowd ? crowd->value : p.design_people * share;

  const double volume_m3 = p.floor_m2 * p.height_m;
  const double air_mass_kg = k_air_density_kg_m3 * volume_m3;
  const double supply_kg_s = k_air_density_kg_m3 * p.ventilation_l_s / 1000.0;
  double infiltration_m3_s = p.infiltration_ach * volume_m3 / 3600.0;
  for (incident_kind open : {incident_kind::door_open, incident_kind::window_open}) {
    if (const incident* o = scenario_.active(open, p.id, t_s)) infiltration_m3_s += o->value;
  }
  const double infiltration_kg_s = k_air_density_kg_m3 * infiltration_m3_s;

  // The zone's supply air: its dehumidifier's, or outdoor air where none serves it.
  double supply_dew_point_c = outdoor_.dew_point_c;
  double supply_air_c = outdoor_.air_c;
  if (zone_unit_[i] != npos) {
    supply_dew_point_c = units_[zone_unit_[i]].supply_dew_point_c;
    supply_air_c = units_[zone_unit_[i]].supply_air_c;
  }

  // Moisture: dry supply air in, humid outdoor air in, the people's breath and sweat, other sources.
  const double w_supply = humidity_ratio_from_dew_point(supply_dew_point_c);
  const double w_outdoor = humidity_ratio_from_dew_point(outdoor_.dew_point_c);
  const double moisture_kg_s =
      z.people * p.latent_w_per_person / k_latent_heat_j_per_kg + std::max(0.0, p.moisture_g_h.at(t_s)) / 3.6e6;
  const double dw_dt = (supply_kg_s * (w_supply - z.humidity_ratio) +
                        infiltration_kg_s * (w_outdoor - z.humidity_ratio) + moisture_kg_s) /
                       air_mass_kg;

  // Heat: people, lights and equipment, sun, air flows, façade, and the chilled surface.
  const double equipment_w_m2 = p.empty_gain_w_m2 + (p.occupied_gain_w_m2 - p.empty_gain_w_m2) * share;
  const double sun = std::max(0.0, std::cos(k_pi * (t_s - p.solar_peak_s) / (14.0 * 3600.0)));
  const double gains_w =
      z.people * p.sensible_w_per_person + equipment_w_m2 * p.floor_m2 + p.solar_peak_w_m2 * p.floor_m2 * sun;
  const double cp = k_air_specific_heat_j_kgk;
  z.surface_cooling_w = sp.heat_transfer_w_m2k * p.surface_m2 * (z.air_c - z.surface_c);
  const double flows_w = supply_kg_s * cp * (supply_air_c - z.air_c) +
                         infiltration_kg_s * cp * (outdoor_.air_c - z.air_c) +
                         p.envelope_ua_w_k * (outdoor_.air_c - z.air_c);
  const double capacity_j_k = k_heat_capacity_multiplier * air_mass_kg * cp;
  const double dt_air_dt = (gains_w + flows_w - z.surface_cooling_w) / capacity_j_k;

  // The surface follows its water while the valve is open and drifts to the room when closed.
  // The room controller throttles the flow when the room is cool (part load); no flow at all
  // while the service's valve is closed.
  const double demand = z.valve_open ? std::clamp((z.air_c - p.cooling_from_c) / p.cooling_band_k, 0.0, 1.0) : 0.0;
  const double water_share = sp.water_share * demand;
  const double surface_target_c = water_share * loop.supply_c + (1.0 - water_share) * z.air_c;
  const double tau_s = sp.tau_closed_s + (sp.tau_open_s - sp.tau_closed_s) * demand;
  z.surface_c = follow(z.surface_c, surface_target_c, tau_s, dt_s);
  z.humidity_ratio += dw_dt * dt_s;
  z.air_c += dt_air_dt * dt_s;
  z.dew_point_c = dew_point_from_humidity_ratio(z.humidity_ratio);
}

void plant_model::step_loop(std::size_t l, double t_s, double dt_s) {
  loop_state& loop = loops_[l];
  const loop_physics& lp = building_.loops[l];
  double target_c = std::max(loop.setpoint_c, k_min_supply_water_c);
  // A stuck mixing valve or an overcooling chiller: the water cannot get warmer than the limit.
  if (const incident* high = scenario_.active(incident_kind::supply_high, lp.id, t_s)) {
    target_c = std::min(target_c, high->value);
  }
  loop.supply_c = follow(loop.supply_c, target_c, lp.plant_tau_s, dt_s);
  loop.cooling_w = 0.0;
  for (std::size_t i = 0; i < zones_.size(); ++i) {
    if (zone_loop_[i] == l && zones_[i].valve_open) loop.cooling_w += zones_[i].surface_cooling_w;
  }
  const double flow_kg_s = k_water_density_kg_m3 * lp.flow_l_s / 1000.0;
  loop.return_c = loop.supply_c + loop.cooling_w / (flow_kg_s * k_water_specific_heat_j_kgk);
}

void plant_model::step(double t_s, double dt_s) {
  outdoor_ = {scenario_.outdoor_c.at(t_s), scenario_.outdoor_dew_point_c.at(t_s)};
  for (std::size_t u = 0; u < units_.size(); ++u) step_dehumidifier(u, t_s, dt_s);
  for (std::size_t i = 0; i < zones_.size(); ++i) step_zone(i, t_s, dt_s);
  for (std::size_t l = 0; l < loops_.size(); ++l) step_loop(l, t_s, dt_s);
}

}  // namespace dewmargin::sim
