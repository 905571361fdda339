#pragma once
// The simulated building: an invented four-storey office on a quay in a humid coastal
// climate ("quayside-four"). Ten zones: chilled metal ceiling panels on two loops (north and
// south façade), a cooled slab floor in the lobby on a third loop, and one dedicated
// outdoor-air unit (DOAS) on the roof that dries the ventilation air for every zone.
//
// clang-format off
// Every main constant of the model, with its source. "from memory": a value recalled, not
// looked up; "common practice, no source": a usual modelling choice; "invented": demo data.
//
// | constant                                   | value                    | source |
// |--------------------------------------------|--------------------------|--------|
// | occupant latent gain, office work          | 55 W ≈ 81 g/h per person | ASHRAE Handbook—Fundamentals, ch. 18, Table 1, "moderately active office work" (from memory) |
// | occupant sensible gain, office work        | 75 W per person          | same table (from memory) |
// | latent heat of vaporisation at 25 °C       | 2.442 MJ/kg              | steam tables (from memory) |
// | air density, specific heat                 | 1.2 kg/m³, 1006 J/(kg K) | standard air, ASHRAE Fundamentals ch. 1 (from memory) |
// | water density, specific heat (loops)       | 998 kg/m³, 4186 J/(kg K) | near 15–20 °C (from memory) |
// | chilled ceiling surface–room coefficient   | 10.8 W/(m² K)            | EN 1264-5 / ISO 11855 total heat exchange coefficient, cooling ceiling (from memory) |
// | cooled floor surface–room coefficient      | 7.0 W/(m² K)             | same standards, cooling floor (from memory) |
// | panel surface: share of water temperature  | 0.85 metal, 0.55 slab    | common practice, no source (a metal panel sits close to its water, a screed does not) |
// | surface time constant, valve open          | 3 min metal, 90 min slab | common practice, no source |
// | surface time constant, valve closed        | 12 min metal, 4 h slab   | common practice, no source (stagnant water and panel mass warm to the room) |
// | supply-water plant lag                     | 4 min                    | common practice, no source (mixing valve and pipe transport) |
// | DOAS coil lag                              | 5 min                    | common practice, no source |
// | ventilation air                            | 10 L/s per design person | common European office design value (from memory) |
// | DOAS design supply dew point, air temp.    | 11 °C, 18 °C             | invented design (typical for chilled-ceiling buildings, from memory) |
// | design supply water                        | 16 °C ceilings, 19 °C slab | invented design (typical, from memory) |
// | room temperature control (the BMS's own)   | 23–25 °C proportional band | common practice, no source (scales the panel's water share; the service's valve is a separate on/off valve) |
// | lighting and equipment                     | 12 W/m² occupied, 3 W/m² empty | common practice, no source |
// | effective heat capacity of a zone          | 8 × its air's            | common practice, no source (furniture, linings) |
// | moisture buffering by furnishings          | none                     | modelling choice: humidity moves as fast as the air allows (harder for the service) |
// | infiltration                               | 0.15–0.5 air changes per hour | invented, leaky coastal building |
// | propped lobby door                         | +1.5 m³/s of outdoor air | invented (a wide entrance door propped open in a sea breeze) |
// | condensation removing moisture from air    | not modelled             | modelling choice: slightly overstates humidity while surfaces are wet |
// clang-format on
#include <string>
#include <vector>

namespace dewmargin::sim {

inline constexpr double k_latent_gain_per_person_w = 55.0;
inline constexpr double k_sensible_gain_per_person_w = 75.0;
inline constexpr double k_latent_heat_j_per_kg = 2.442e6;
inline constexpr double k_air_density_kg_m3 = 1.2;
inline constexpr double k_air_specific_heat_j_kgk = 1006.0;
inline constexpr double k_water_density_kg_m3 = 998.0;
inline constexpr double k_water_specific_heat_j_kgk = 4186.0;
inline constexpr double k_heat_capacity_multiplier = 8.0;
inline constexpr double k_equipment_occupied_w_m2 = 12.0;
inline constexpr double k_equipment_empty_w_m2 = 3.0;
// The room controller throttles the panel's water flow: full above 25 °C, none below 23 °C.
inline constexpr double k_room_control_from_c = 23.0;
inline constexpr double k_room_control_band_k = 2.0;

enum class surface_kind { metal_ceiling, slab_floor };

struct surface_physics {
  double heat_transfer_w_m2k;  // surface ↔ room, convective + radiative
  double water_share;          // steady surface = share·T_water + (1 − share)·T_air, valve open
  double tau_open_s;
  double tau_closed_s;
};

surface_physics physics_of(surface_kind kind);

struct zone_physics {
  std::string id;    // must match a zone id of the shared config
  std::string loop;  // loop id
  double floor_m2 = 0.0;
  double height_m = 0.0;
  double surface_m2 = 0.0;  // chilled panel (or slab) area
  surface_kind surface = surface_kind::metal_ceiling;
  double design_people = 0.0;
  double supply_air_l_s = 0.0;  // DOAS air delivered to the zone
  double infiltration_ach = 0.0;
  double envelope_ua_w_k = 0.0;  // conduction through façade and roof
  double solar_peak_w_m2 = 0.0;  // per m² floor, at solar_peak_hour
  double solar_peak_hour = 13.0;
  double extra_moisture_g_h = 0.0;  // kettles, dishwasher (pantry), over the lunch hours
};

struct loop_physics {
  std::string id;  // must match a loop id of the shared config
  double design_supply_c = 16.0;
  double flow_l_s = 1.0;  // constant-speed pump with a bypass
  double plant_tau_s = 240.0;
};

struct doas_physics {
  std::string id;  // must match a dehumidifier id of the shared config
  double design_dew_point_c = 11.0;
  double min_dew_point_c = 8.0;  // the driest the coil can make the air
  double supply_air_c = 18.0;    // after reheat, while the coil works
  double coil_tau_s = 300.0;
};

struct building {
  std::string name;
  std::vector<zone_physics> zones;
  std::vector<loop_physics> loops;
  doas_physics doas;
};

// The demo building described above.
building quayside_four();

}  // namespace dewmargin::sim
