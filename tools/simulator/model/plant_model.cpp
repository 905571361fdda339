#include "model/plant_model.h"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "model/moist_air.h"

namespace dewmargin::sim {
namespace {

// Invented start-up state of the plant (the chiller has just started, the lobby slab was cooled
// overnight).
constexpr double k_initial_supply_water_c = 20.0;
constexpr double k_initial_slab_c = 23.0;
constexpr double k_door_propped_m3_s = 1.5;
constexpr double k_min_supply_water_c = 6.0;  // the plant cannot make colder water

}  // namespace

double follow(double x, double target, double tau_s, double dt_s) {
  return target + (x - target) * std::exp(-dt_s / tau_s);
}

plant_model::plant_model(building b, const scenario& s) : building_(std::move(b)), scenario_(s) {
  for (const auto& l : building_.loops) {
    loop_state st;
    st.setpoint_c = l.design_supply_c;
    st.supply_c = k_initial_supply_water_c;
    st.return_c = st.supply_c;
    loops_.push_back(st);
  }
  const double w0 = humidity_ratio_from_dew_point(s.initial_dew_point_c);
  for (const auto& z : building_.zones) {
    const auto it = std::find_if(building_.loops.begin(), building_.loops.end(),
                                 [&](const loop_physics& l) { return l.id == z.loop; });
    if (it == building_.loops.end()) throw std::invalid_argument("zone " + z.id + ": unknown loop " + z.loop);
    zone_loop_.push_back(static_cast<std::size_t>(it - building_.loops.begin()));
    zone_state st;
    st.air_c = s.initial_air_c;
    st.humidity_ratio = w0;
    st.surface_c = z.surface == surface_kind::slab_floor ? k_initial_slab_c : s.initial_air_c;
    st.dew_point_c = s.initial_dew_point_c;
    zones_.push_back(st);
  }
  outdoor_ = {s.outdoor_temp_c.at(s.start_s), s.outdoor_dew_point_c.at(s.start_s)};
  doas_.request_c = building_.doas.design_dew_point_c;
  // The unit starts from outdoor air: its coil needs a few minutes to pull the dew point down.
  doas_.supply_dew_point_c = outdoor_.dew_point_c;
  doas_.supply_air_c = outdoor_.air_c;
}

void plant_model::set_setpoint_c(std::size_t loop, double setpoint_c) { loops_.at(loop).setpoint_c = setpoint_c; }
void plant_model::set_valve_open(std::size_t zone, bool open) { zones_.at(zone).valve_open = open; }
void plant_model::set_dew_point_request_c(double dew_point_c) { doas_.request_c = dew_point_c; }

void plant_model::step_doas(double t_s, double dt_s) {
  const doas_physics& d = building_.doas;
  double target_dp = outdoor_.dew_point_c;
  double target_air = outdoor_.air_c;
  if (!scenario_.coil_tripped(t_s)) {
    // The coil can dry down to its limit, and cannot make the air wetter than it came in.
    target_dp = std::clamp(doas_.request_c, d.min_dew_point_c, outdoor_.dew_point_c);
    target_air = d.supply_air_c;
  }
  doas_.supply_dew_point_c = follow(doas_.supply_dew_point_c, target_dp, d.coil_tau_s, dt_s);
  doas_.supply_air_c = follow(doas_.supply_air_c, target_air, d.coil_tau_s, dt_s);
}

void plant_model::step_zone(std::size_t i, double t_s, double dt_s) {
  const zone_physics& p = building_.zones[i];
  zone_state& z = zones_[i];
  const loop_state& loop = loops_[zone_loop_[i]];
  const surface_physics sp = physics_of(p.surface);

  const double share = scenario_.occupancy.share_at(t_s);
  const incident* crowd = scenario_.active(incident_kind::crowd, p.id, t_s);
  z.people = crowd ? crowd->people : p.design_people * share;

  const double volume_m3 = p.floor_m2 * p.height_m;
  const double air_mass_kg = k_air_density_kg_m3 * volume_m3;
  const double supply_kg_s = k_air_density_kg_m3 * p.supply_air_l_s / 1000.0;
  double infiltration_m3_s = p.infiltration_ach * volume_m3 / 3600.0;
  if (scenario_.active(incident_kind::door_propped, p.id, t_s)) infiltration_m3_s += k_door_propped_m3_s;
  const double infiltration_kg_s = k_air_density_kg_m3 * infiltration_m3_s;

  // Moisture: dry DOAS air in, humid outdoor air in, the people's breath and sweat.
  const double w_supply = humidity_ratio_from_dew_point(doas_.supply_dew_point_c);
  const double w_outdoor = humidity_ratio_from_dew_point(outdoor_.dew_point_c);
  double moisture_kg_s = z.people * k_latent_gain_per_person_w / k_latent_heat_j_per_kg;
  if (p.extra_moisture_g_h > 0.0 && scenario_.occupancy.lunch_at(t_s)) moisture_kg_s += p.extra_moisture_g_h / 3.6e6;
  const double dw_dt = (supply_kg_s * (w_supply - z.humidity_ratio) +
                        infiltration_kg_s * (w_outdoor - z.humidity_ratio) + moisture_kg_s) /
                       air_mass_kg;

  // Heat: people, lights and equipment, sun, air flows, façade, and the chilled surface.
  const double equipment_w_m2 = k_equipment_empty_w_m2 + (k_equipment_occupied_w_m2 - k_equipment_empty_w_m2) * share;
  const double sun = std::max(0.0, std::cos(3.141592653589793 * (t_s / 3600.0 - p.solar_peak_hour) / 14.0));
  const double gains_w =
      z.people * k_sensible_gain_per_person_w + equipment_w_m2 * p.floor_m2 + p.solar_peak_w_m2 * p.floor_m2 * sun;
  const double cp = k_air_specific_heat_j_kgk;
  z.surface_cooling_w = sp.heat_transfer_w_m2k * p.surface_m2 * (z.air_c - z.surface_c);
  const double flows_w = supply_kg_s * cp * (doas_.supply_air_c - z.air_c) +
                         infiltration_kg_s * cp * (outdoor_.air_c - z.air_c) +
                         p.envelope_ua_w_k * (outdoor_.air_c - z.air_c);
  const double capacity_j_k = k_heat_capacity_multiplier * air_mass_kg * cp;
  const double dt_air_dt = (gains_w + flows_w - z.surface_cooling_w) / capacity_j_k;

  // The surface follows its water while the valve is open and drifts to the room when closed.
  // The room controller throttles the flow when the room is cool (part load); no flow at all
  // while the service's valve is closed.
  const double demand =
      z.valve_open ? std::clamp((z.air_c - k_room_control_from_c) / k_room_control_band_k, 0.0, 1.0) : 0.0;
  const double water_share = sp.water_share * demand;
  const double surface_target_c = water_share * loop.supply_c + (1.0 - water_share) * z.air_c;
  const double tau_s = sp.tau_closed_s + (sp.tau_open_s - sp.tau_closed_s) * demand;
  z.surface_c = follow(z.surface_c, surface_target_c, tau_s, dt_s);
  z.humidity_ratio += dw_dt * dt_s;
  z.air_c += dt_air_dt * dt_s;
  z.dew_point_c = dew_point_from_humidity_ratio(z.humidity_ratio);
}

void plant_model::step(double t_s, double dt_s) {
  outdoor_ = {scenario_.outdoor_temp_c.at(t_s), scenario_.outdoor_dew_point_c.at(t_s)};
  step_doas(t_s, dt_s);
  for (std::size_t i = 0; i < zones_.size(); ++i) step_zone(i, t_s, dt_s);
  for (std::size_t l = 0; l < loops_.size(); ++l) {
    loop_state& loop = loops_[l];
    const loop_physics& lp = building_.loops[l];
    loop.supply_c = follow(loop.supply_c, std::max(loop.setpoint_c, k_min_supply_water_c), lp.plant_tau_s, dt_s);
    loop.cooling_w = 0.0;
    for (std::size_t i = 0; i < zones_.size(); ++i) {
      if (zone_loop_[i] == l && zones_[i].valve_open) loop.cooling_w += zones_[i].surface_cooling_w;
    }
    const double flow_kg_s = k_water_density_kg_m3 * lp.flow_l_s / 1000.0;
    loop.return_c = loop.supply_c + loop.cooling_w / (flow_kg_s * k_water_specific_heat_j_kgk);
  }
}

}  // namespace dewmargin::sim
