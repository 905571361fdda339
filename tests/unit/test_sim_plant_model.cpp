// The simulator's physics (tools/simulator/model/plant_model.h) on a one-zone building whose
// steady states can be worked out by hand.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>

#include "model/moist_air.h"
#include "model/plant_model.h"

namespace dewmargin::sim {
namespace {

constexpr double k_step_s = 5.0;

building one_room() {
  building b;
  b.name = "one-room";
  zone_physics z;
  z.id = "room";
  z.loop = "loop";
  z.dehumidifier = "doas";
  z.floor_m2 = 50.0;
  z.height_m = 3.0;
  z.surface_m2 = 20.0;
  z.design_people = 0.0;
  z.ventilation_l_s = 100.0;
  z.infiltration_ach = 0.0;
  z.envelope_ua_w_k = 40.0;
  b.zones.push_back(z);
  b.loops = {{"loop", 16.0, 1.0, 240.0}};
  dehumidifier_physics d;
  d.id = "doas";
  b.dehumidifiers = {d};  // 11 °C design, 8 °C at the most, 18 °C air, 5 min lag
  return b;
}

incident make_incident(incident_kind kind, std::string target, double start_s, double end_s, double value = 0.0) {
  incident i;
  i.kind = kind;
  i.target = std::move(target);
  i.start_s = start_s;
  i.end_s = end_s;
  i.value = value;
  return i;
}

// Constant weather all day, so that the steady states do not move; ten people in the room
// (enough heat for the room controller to want the panel).
scenario still_day() {
  scenario s;
  s.name = "still";
  s.start_s = 0.0;
  s.end_s = 24.0 * 3600.0;
  s.outdoor_c = time_series::constant(30.0);
  s.outdoor_dew_point_c = time_series::constant(23.0);
  s.initial = {26.5, 18.5, 20.0, 23.0};
  s.incidents = {make_incident(incident_kind::crowd, "room", 0.0, s.end_s, 10.0)};
  return s;
}

void run(plant_model& p, double from_s, double to_s) {
  for (double t = from_s; t < to_s - 1e-9; t += k_step_s) p.step(t, k_step_s);
}

TEST(SimPlantModel, RoomHumidityRatioSettlesAtSupplyPlusPeopleOverAirFlow) {
  // Moisture balance at steady state, no infiltration: W = W_supply + G / (rho * Q).
  plant_model p(one_room(), still_day());
  run(p, 0.0, 10.0 * 3600.0);
  const double g_kg_s = 10.0 * one_room().zones[0].latent_w_per_person / k_latent_heat_j_per_kg;
  const double expected = humidity_ratio_from_dew_point(11.0) + g_kg_s / (k_air_density_kg_m3 * 0.1);
  EXPECT_NEAR(p.zones()[0].humidity_ratio, expected, 1e-6);
  // Ten people at 81 g/h in 100 L/s: +1.9 g/kg, about 3 K of dew point above the supply air.
  EXPECT_NEAR(p.zones()[0].dew_point_c - 11.0, 3.0, 0.3);
}

TEST(SimPlantModel, ProppedDoorPullsTheDewPointTowardsOutdoors) {
  scenario s = still_day();
  s.incidents.push_back(make_incident(incident_kind::door_open, "room", 3.0 * 3600.0, 4.0 * 3600.0, 1.5));
  plant_model p(one_room(), s);
  run(p, 0.0, 3.0 * 3600.0);  // the morning's humidity flushed out (time constant 25 min)
  const double before_c = p.zones()[0].dew_point_c;
  run(p, 3.0 * 3600.0, 4.0 * 3600.0);
  // 1.5 m3/s of 23 °C dew-point air against 0.1 m3/s of 11 °C: the mix is near 22.5 °C.
  EXPECT_LT(before_c, 15.0);
  EXPECT_GT(p.zones()[0].dew_point_c, 21.5);
  EXPECT_LT(p.zones()[0].dew_point_c, 23.0);
}

TEST(SimPlantModel, SupplyWaterFollowsItsSetpointWithThePlantLag) {
  plant_model p(one_room(), still_day());
  run(p, 0.0, 3.0 * 3600.0);  // settled at the design 16 °C
  ASSERT_NEAR(p.loops()[0].supply_c, 16.0, 1e-6);
  p.set_setpoint_c(0, 20.0);
  run(p, 3.0 * 3600.0, 3.0 * 3600.0 + 240.0);  // one time constant
  EXPECT_NEAR(p.loops()[0].supply_c, 20.0 - 4.0 * std::exp(-1.0), 1e-9);
}

TEST(SimPlantModel, OpenPanelSettlesBetweenWaterAndRoomClosedPanelAtRoom) {
  plant_model p(one_room(), still_day());
  run(p, 0.0, 6.0 * 3600.0);
  const zone_state& z = p.zones()[0];
  const surface_physics sp = default_physics(surface_kind::ceiling_panel);
  const double demand = std::clamp((z.air_c - 23.0) / 2.0, 0.0, 1.0);
  const double share = sp.water_share * demand;
  EXPECT_NEAR(z.surface_c, share * p.loops()[0].supply_c + (1.0 - share) * z.air_c, 0.02);
  EXPECT_GT(demand, 0.2);
  EXPECT_LT(z.surface_c, z.air_c - 1.0);

  const double z_air_before_c = z.air_c;
  p.set_valve_open(0, false);
  run(p, 6.0 * 3600.0, 8.0 * 3600.0);  // 10 time constants of a closed metal panel
  // The room warms without its panel; the panel follows it 12 min behind.
  EXPECT_GT(p.zones()[0].air_c, z_air_before_c);
  EXPECT_NEAR(p.zones()[0].surface_c, p.zones()[0].air_c, 0.2);
  EXPECT_LT(std::fabs(p.zones()[0].surface_cooling_w), 50.0);  // W, against about 1 kW while open
}

TEST(SimPlantModel, TrippedCoilPassesOutdoorAirAndRecoversAfterwards) {
  scenario s = still_day();
  s.incidents.push_back(make_incident(incident_kind::coil_trip, "doas", 3600.0, 7200.0));
  plant_model p(one_room(), s);
  run(p, 0.0, 3600.0);
  EXPECT_NEAR(p.dehumidifiers()[0].supply_dew_point_c, 11.0, 1e-3);
  EXPECT_FALSE(p.dehumidifiers()[0].tripped);
  run(p, 3600.0, 7200.0);
  EXPECT_TRUE(p.dehumidifiers()[0].tripped);
  EXPECT_NEAR(p.dehumidifiers()[0].supply_dew_point_c, 23.0, 1e-3);
  EXPECT_NEAR(p.dehumidifiers()[0].supply_air_c, 30.0, 1e-3);
  run(p, 7200.0, 10800.0);
  EXPECT_NEAR(p.dehumidifiers()[0].supply_dew_point_c, 11.0, 1e-3);
}

TEST(SimPlantModel, DryerRequestIsFollowedDownToTheCoilLimitOnly) {
  plant_model p(one_room(), still_day());
  p.set_dew_point_request_c(0, 9.0);
  run(p, 0.0, 3600.0);
  EXPECT_NEAR(p.dehumidifiers()[0].supply_dew_point_c, 9.0, 1e-3);
  p.set_dew_point_request_c(0, 5.0);  // below what the coil can do (8 °C)
  run(p, 3600.0, 7200.0);
  EXPECT_NEAR(p.dehumidifiers()[0].supply_dew_point_c, 8.0, 1e-3);
}

TEST(SimPlantModel, ReturnWaterCarriesTheRoomsHeat) {
  plant_model p(one_room(), still_day());
  run(p, 0.0, 6.0 * 3600.0);
  const loop_state& l = p.loops()[0];
  const double flow_kg_s = k_water_density_kg_m3 * 1.0 / 1000.0;
  EXPECT_GT(l.cooling_w, 0.0);
  EXPECT_NEAR(l.return_c - l.supply_c, l.cooling_w / (flow_kg_s * k_water_specific_heat_j_kgk), 1e-9);
}

TEST(SimPlantModel, CoilCapacityLimitsHowDryTheSupplyAirGets) {
  // 100 L/s = 0.12 kg/s of 23 °C dew-point air (about 17.9 g/kg); a coil removing at most
  // 2 kg/h takes 4.6 g/kg out of it: about 13.3 g/kg, a dew point near 18.2 °C, whatever is asked.
  building b = one_room();
  b.dehumidifiers[0].capacity_kg_h = 2.0;
  plant_model p(b, still_day());
  run(p, 0.0, 3600.0);
  const double w_expected = humidity_ratio_from_dew_point(23.0) - 2.0 / 3600.0 / 0.12;
  EXPECT_NEAR(p.dehumidifiers()[0].supply_dew_point_c, dew_point_from_humidity_ratio(w_expected), 1e-3);
  EXPECT_NEAR(p.dehumidifiers()[0].supply_dew_point_c, 18.2, 0.2);
  // Without the limit the same coil reaches its design 11 °C.
  plant_model unlimited(one_room(), still_day());
  run(unlimited, 0.0, 3600.0);
  EXPECT_NEAR(unlimited.dehumidifiers()[0].supply_dew_point_c, 11.0, 1e-3);
}

TEST(SimPlantModel, ZoneWithoutDehumidifierBreathesOutdoorAir) {
  building b = one_room();
  b.zones[0].dehumidifier.clear();
  scenario s = still_day();
  s.incidents.clear();  // nobody in: the room settles at the supply air's humidity
  plant_model p(b, s);
  run(p, 0.0, 6.0 * 3600.0);
  EXPECT_NEAR(p.zones()[0].dew_point_c, 23.0, 0.01);
}

TEST(SimPlantModel, OpenWindowLetsInLessAirThanADoor) {
  const auto dew_point_after = [](double m3_s) {
    scenario s = still_day();
    s.incidents.push_back(make_incident(incident_kind::window_open, "room", 3.0 * 3600.0, 3.5 * 3600.0, m3_s));
    plant_model p(one_room(), s);
    run(p, 0.0, 3.5 * 3600.0);
    return p.zones()[0].dew_point_c;
  };
  const double none = dew_point_after(1e-9), window = dew_point_after(0.3), door = dew_point_after(1.5);
  EXPECT_GT(window, none + 1.0);
  EXPECT_GT(door, window + 1.0);
}

TEST(SimPlantModel, SupplyHighKeepsTheWaterColderThanTheRaisedSetpoint) {
  scenario s = still_day();
  s.incidents.push_back(make_incident(incident_kind::supply_high, "loop", 3600.0, 7200.0, 16.0));
  plant_model p(one_room(), s);
  run(p, 0.0, 1800.0);
  p.set_setpoint_c(0, 20.0);
  run(p, 1800.0, 3600.0);  // 30 min, 7.5 time constants: the water follows the raised setpoint
  EXPECT_NEAR(p.loops()[0].supply_c, 20.0, 0.01);
  run(p, 3600.0, 7200.0);  // the mixing valve sticks: the water falls back to 16 °C
  EXPECT_NEAR(p.loops()[0].supply_c, 16.0, 0.01);
  run(p, 7200.0, 9000.0);
  EXPECT_NEAR(p.loops()[0].supply_c, 20.0, 0.01);
}

TEST(SimPlantModel, SurfaceKindsDifferAsTheirDefaultsSay) {
  // A wall panel follows its water more slowly than a ceiling panel, a slab far more slowly.
  const auto surface_after_10_min = [](surface_kind k) {
    building b = one_room();
    b.zones[0].surface = k;
    b.zones[0].physics = default_physics(k);
    scenario s = still_day();
    s.initial.slab_c = s.initial.air_c;  // all three start at the room's temperature
    plant_model p(b, s);
    run(p, 0.0, 600.0);
    return p.zones()[0].surface_c;
  };
  const double ceiling = surface_after_10_min(surface_kind::ceiling_panel);
  const double wall = surface_after_10_min(surface_kind::wall_panel);
  const double slab = surface_after_10_min(surface_kind::slab);
  EXPECT_LT(ceiling, wall);
  EXPECT_LT(wall, slab);
  EXPECT_GT(slab, 25.5);  // 90 min time constant: hardly moved
}

}  // namespace
}  // namespace dewmargin::sim
