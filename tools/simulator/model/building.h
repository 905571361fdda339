#pragma once
// The simulated building, as read from a scenario file (docs/scenarios.md): zones with their
// chilled surface, loops, dehumidifiers (dedicated outdoor-air units). Ids are those of the
// service config the simulator runs against. Every field is resolved: the scenario reader
// fills in the defaults below, so the physics never looks a default up.
//
// clang-format off
// Physical constants of the model, with their source. "from memory": a value recalled, not
// looked up; "common practice, no source": a usual modelling choice.
//
// | constant                                   | value                    | source |
// |--------------------------------------------|--------------------------|--------|
// | latent heat of vaporisation at 25 °C       | 2.442 MJ/kg              | steam tables (from memory) |
// | air density, specific heat                 | 1.2 kg/m³, 1006 J/(kg K) | standard air, ASHRAE Fundamentals ch. 1 (from memory) |
// | water density, specific heat (loops)       | 998 kg/m³, 4186 J/(kg K) | near 15–20 °C (from memory) |
// | effective heat capacity of a zone          | 8 × its air's            | common practice, no source (furniture, linings) |
// | coldest supply water the plant can make    | 6 °C                     | common practice, no source |
// | moisture buffering by furnishings          | none                     | modelling choice: humidity moves as fast as the air allows (harder for the service) |
// | condensation removing moisture from air    | not modelled             | modelling choice: slightly overstates humidity while surfaces are wet |
//
// Defaults of the scenario keys (their sources) are in building.cpp and docs/scenarios.md.
// clang-format on
#include <optional>
#include <string>
#include <vector>

#include "dewmargin/config.h"
#include "model/time_series.h"

namespace dewmargin::sim {

inline constexpr double k_latent_heat_j_per_kg = 2.442e6;
inline constexpr double k_air_density_kg_m3 = 1.2;
inline constexpr double k_air_specific_heat_j_kgk = 1006.0;
inline constexpr double k_water_density_kg_m3 = 998.0;
inline constexpr double k_water_specific_heat_j_kgk = 4186.0;
inline constexpr double k_heat_capacity_multiplier = 8.0;
inline constexpr double k_min_supply_water_c = 6.0;

enum class surface_kind { ceiling_panel, slab, wall_panel };
const char* surface_kind_name(surface_kind k);

struct surface_physics {
  double heat_transfer_w_m2k;  // surface ↔ room, convective + radiative
  double water_share;          // steady surface = share·T_water + (1 − share)·T_air, full flow
  double tau_open_s;           // time constant with full flow
  double tau_closed_s;         // with no flow (valve closed, or the room controller satisfied)
};

// Defaults by surface kind (see building.cpp for the sources).
surface_physics default_physics(surface_kind kind);

struct zone_physics {
  std::string id;            // a zone id of the service config
  std::string loop;          // its loop (from the config)
  std::string dehumidifier;  // the unit whose air it gets (from the config); empty: untreated outdoor air
  double floor_m2 = 50.0;
  double height_m = 2.8;
  double surface_m2 = 20.0;  // chilled panel (or slab) area
  surface_kind surface = surface_kind::ceiling_panel;
  surface_physics physics = default_physics(surface_kind::ceiling_panel);
  double design_people = 0.0;
  time_series occupancy = time_series::constant(0.0);  // share of design_people present, 0..1
  double latent_w_per_person = 55.0;
  double sensible_w_per_person = 75.0;
  double ventilation_l_s = 0.0;  // air from its dehumidifier (or outdoors)
  double infiltration_ach = 0.2;
  double envelope_ua_w_k = 50.0;  // conduction through façade and roof
  double solar_peak_w_m2 = 10.0;  // per m² floor, at solar_peak_s
  double solar_peak_s = 13.0 * 3600.0;
  double occupied_gain_w_m2 = 12.0;  // lights and equipment at full occupancy
  double empty_gain_w_m2 = 3.0;      // and with nobody in
  time_series moisture_g_h;          // other moisture sources (kettles, cooking, showers)
  double cooling_from_c = 23.0;      // the room controller: no panel flow below this air temperature,
  double cooling_band_k = 2.0;       // full flow this much above it
};

struct loop_physics {
  std::string id;  // a loop id of the service config
  double design_supply_c = 16.0;
  double flow_l_s = 1.0;  // constant-speed pump with a bypass
  double plant_tau_s = 240.0;
};

struct dehumidifier_physics {
  std::string id;  // a dehumidifier id of the service config
  double design_dew_point_c = 11.0;
  double min_dew_point_c = 8.0;  // the driest the coil can make the air
  double supply_air_c = 18.0;    // after reheat, while the coil works
  double coil_tau_s = 300.0;
  std::optional<double> capacity_kg_h;  // moisture the coil can remove; none: not limited
  // Optional extra sensors the simulator publishes for the unit (not read by the service
  // config schema of today): its fault switch and its measured supply-air dew point.
  std::optional<input_config> fault;
  std::optional<input_config> supply_dew_point;
};

struct building {
  std::string name;
  std::vector<zone_physics> zones;
  std::vector<loop_physics> loops;
  std::vector<dehumidifier_physics> dehumidifiers;
};

}  // namespace dewmargin::sim
