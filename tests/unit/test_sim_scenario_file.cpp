// The scenario reader (tools/simulator/scenario_file): every mistake of a file located as
// FILE:LINE:COL, the defaults of a file that only names the zones, and the demo's own days.
#include <gtest/gtest.h>

#include <cmath>

#include "scenario_file/scenario_loader.h"
#include "test_sim_helpers.h"

namespace dewmargin::sim {
namespace {

const std::string k_data = std::string(DEWMARGIN_TEST_DATA_DIR) + "/scenarios/";

site_config demo_config() {
  const auto loaded = testing::load_demo();
  EXPECT_TRUE(loaded.ok());
  return *loaded.config;
}

scenario_load_result load(const std::string& relative) {
  return load_scenario_file(k_data + relative, demo_config(), "config/demo.yaml");
}

// "LINE:COL: message" with the fixture directory taken out of the message.
std::vector<std::string> located(const scenario_load_result& r, const std::string& file) {
  std::vector<std::string> out;
  for (const auto& e : r.errors) {
    EXPECT_EQ(e.file, file);
    std::string message = e.message;
    for (std::size_t at = message.find(k_data); at != std::string::npos; at = message.find(k_data)) {
      message.replace(at, k_data.size(), "");
    }
    out.push_back(std::to_string(e.line) + ":" + std::to_string(e.column) + ": " + message);
  }
  return out;
}

TEST(SimScenarioFile, BadFilesGiveLocatedErrors) {
  struct bad_case {
    const char* fixture;
    std::vector<std::string> errors;
  };
  const std::string kinds =
      "door_open, window_open, crowd, coil_trip, sensor_silent, sensor_stuck, sensor_drift, switch_wet, supply_high "
      "or broker_outage";
  const std::vector<bad_case> cases = {
      {"not_a_map.yaml", {"1:1: a scenario must be a map of keys (building, weather, incidents, ...), got a list"}},
      {"yaml_syntax.yaml", {"3:10: YAML syntax: end of map flow not found"}},
      {"unknown_key.yaml", {"2:1: unknown key 'wether' at the top level; did you mean 'weather'?"}},
      {"unknown_zone.yaml",
       {"2:3: zones: the config config/demo.yaml also has g-lobby (every zone of the config needs an entry; an empty "
        "one takes the defaults)",
        "3:5: zone 'g-lobbby' is not in the config config/demo.yaml; did you mean 'g-lobby'?"}},
      {"missing_zones.yaml",
       {"2:3: zones: the config config/demo.yaml also has l1-north-open, l1-north-pantry, l1-south-open, "
        "l2-north-offices, l2-south-meeting, l2-south-open, l3-north-open or l3-south-open (every zone of the config "
        "needs an entry; an empty one takes the defaults)"}},
      {"bad_time.yaml", {"2:8: 'start' must be a time of day HH:MM from 00:00 to 24:00, got '25:00'"}},
      {"end_before_start.yaml", {"3:6: 'end' 09:00 is not after 'start' 14:00"}},
      {"bad_surface.yaml", {"3:25: 'surface' must be ceiling_panel, slab or wall_panel, got 'floor'"}},
      {"negative_area.yaml", {"3:41: 'floor_m2' must be greater than 0, got -260"}},
      {"unknown_kind.yaml", {"4:13: 'kind' must be " + kinds + ", got 'door_opn'; did you mean 'door_open'?"}},
      {"wrong_target.yaml",
       {"4:5: incident 1 (coil_trip): missing required key 'dehumidifier'",
        "4:24: incident 1 (coil_trip): a coil_trip incident targets a dehumidifier, not a 'zone'"}},
      {"outside_day.yaml", {"6:70: incident 1 (crowd): 08:00-09:00 is outside the day 06:00-08:30"}},
      {"drift_unit.yaml", {"7:5: incident 1 (sensor_drift): input 'humidity' drifts in 'pct_per_h', not 'k_per_h'"}},
      {"dew_point_above_air.yaml",
       {"4:16: weather: the dew point 25 °C at 06:00 is above the outdoor temperature 24 °C"}},
      {"unknown_schedule.yaml",
       {"4:28: schedule 'meetings' is not defined under 'schedules' in bad/unknown_schedule.yaml; did you mean "
        "'meeting'?"}},
      {"missing_building_file.yaml",
       {"1:11: building file bad/no-such-building.yaml: cannot read: No such file or directory"}},
      {"switch_without_switch.yaml",
       {"4:31: incident 1 (switch_wet): zone 'g-meeting' has no condensation_switch in the config config/demo.yaml"}},
      {"key_for_other_kind.yaml", {"4:56: incident 1 (crowd): 'value' does not apply to a crowd incident"}},
      {"three_mistakes.yaml",
       {"3:6: 'end' must be a time of day HH:MM from 00:00 to 24:00, got '26:00'",
        "6:38: dehumidifier 'doas-rooof' is not in the config config/demo.yaml; did you mean 'doas-roof'?",
        "7:66: 'value' must be between 0 and 100, got 140"}},
  };
  for (const auto& c : cases) {
    SCOPED_TRACE(c.fixture);
    const auto r = load(std::string("bad/") + c.fixture);
    EXPECT_FALSE(r.ok());
    EXPECT_FALSE(r.house.has_value());
    EXPECT_EQ(located(r, k_data + "bad/" + c.fixture), c.errors);
  }
}

TEST(SimScenarioFile, UnreadableFileIsNamedWithoutAPlace) {
  const auto r = load("bad/no-such-scenario.yaml");
  ASSERT_EQ(r.errors.size(), 1u);
  EXPECT_EQ(r.errors[0].to_string(), k_data + "bad/no-such-scenario.yaml: cannot read: No such file or directory");
}

TEST(SimScenarioFile, FileThatOnlyNamesTheZonesTakesTheDefaults) {
  const auto r = load("good/minimal.yaml");
  ASSERT_TRUE(r.ok()) << (r.errors.empty() ? "" : r.errors.front().to_string());
  const building& b = *r.house;
  const scenario& s = *r.day;
  EXPECT_EQ(s.name, "minimal");
  EXPECT_EQ(s.date, "2026-07-14");
  EXPECT_DOUBLE_EQ(s.start_s, 6 * 3600.0);
  EXPECT_DOUBLE_EQ(s.end_s, 20 * 3600.0);
  EXPECT_FALSE(s.seed.has_value());
  EXPECT_TRUE(s.incidents.empty());
  EXPECT_DOUBLE_EQ(s.outdoor_c.at(12 * 3600.0), 28.0);
  ASSERT_EQ(b.zones.size(), 10u);
  const zone_physics& lobby = b.zones[0];
  EXPECT_EQ(lobby.id, "g-lobby");
  EXPECT_EQ(lobby.loop, "slab-lobby");
  EXPECT_EQ(lobby.dehumidifier, "doas-roof");
  EXPECT_EQ(lobby.surface, surface_kind::slab);
  EXPECT_DOUBLE_EQ(lobby.physics.tau_open_s, default_physics(surface_kind::slab).tau_open_s);
  EXPECT_DOUBLE_EQ(lobby.floor_m2, 50.0);
  EXPECT_DOUBLE_EQ(lobby.height_m, 3.0);
  EXPECT_DOUBLE_EQ(lobby.surface_m2, 40.0);                // 0.8 of the floor
  EXPECT_DOUBLE_EQ(lobby.design_people, 5.0);              // 10 m² each
  EXPECT_DOUBLE_EQ(lobby.ventilation_l_s, 50.0);           // 10 L/s each
  EXPECT_DOUBLE_EQ(lobby.occupancy.at(10 * 3600.0), 1.0);  // the default office day
  EXPECT_DOUBLE_EQ(lobby.occupancy.at(12.5 * 3600.0), 0.6);
  EXPECT_DOUBLE_EQ(lobby.occupancy.at(20 * 3600.0), 0.0);
  const zone_physics& meeting = b.zones[1];
  EXPECT_EQ(meeting.surface, surface_kind::ceiling_panel);
  EXPECT_DOUBLE_EQ(meeting.surface_m2, 20.0);  // 0.4 of the floor
  EXPECT_DOUBLE_EQ(meeting.height_m, 2.8);
  ASSERT_EQ(b.loops.size(), 3u);
  EXPECT_EQ(b.loops[0].id, "ceiling-north");
  EXPECT_DOUBLE_EQ(b.loops[0].design_supply_c, 16.0);
  EXPECT_DOUBLE_EQ(b.loops[2].design_supply_c, 19.0);  // slab-lobby: its zone is a slab
  EXPECT_DOUBLE_EQ(b.loops[2].flow_l_s, 0.32);         // 0.008 L/s per m² of its 40 m²
  ASSERT_EQ(b.dehumidifiers.size(), 1u);
  EXPECT_DOUBLE_EQ(b.dehumidifiers[0].design_dew_point_c, 11.0);
  EXPECT_FALSE(b.dehumidifiers[0].capacity_kg_h.has_value());
}

TEST(SimScenarioFile, TheDemoDaysReadAsTheyAreDocumented) {
  const auto day = testing::demo_scenario("day");
  EXPECT_EQ(day.house.name, "quayside-four");
  EXPECT_EQ(day.day.seed, 20260714u);
  EXPECT_DOUBLE_EQ(day.day.outdoor_c.at(15 * 3600.0), 31.0);
  EXPECT_DOUBLE_EQ(day.day.outdoor_dew_point_c.at(15.5 * 3600.0), 23.8);
  ASSERT_EQ(day.day.incidents.size(), 5u);
  EXPECT_EQ(day.day.incidents[0].kind, incident_kind::sensor_silent);
  EXPECT_EQ(day.day.incidents[0].input, sensor_input::humidity);
  EXPECT_EQ(day.day.incidents[1].kind, incident_kind::coil_trip);
  EXPECT_EQ(day.day.incidents[1].target, "doas-roof");
  EXPECT_DOUBLE_EQ(day.day.incidents[2].value, 16.0);  // the packed meeting
  EXPECT_DOUBLE_EQ(day.day.incidents[3].value, 1.5);   // the door's default outdoor air, m³/s
  EXPECT_EQ(day.day.incidents[4].description, "condensation switch in l1-south-open wet (dripping pipe fitting)");
  const zone_physics& pantry = day.house.zones[3];
  EXPECT_EQ(pantry.id, "l1-north-pantry");
  EXPECT_DOUBLE_EQ(pantry.moisture_g_h.at(12.5 * 3600.0), 300.0);
  EXPECT_DOUBLE_EQ(pantry.moisture_g_h.at(14 * 3600.0), 0.0);
  EXPECT_DOUBLE_EQ(pantry.ventilation_l_s, 40.0);
  EXPECT_DOUBLE_EQ(day.house.zones[2].ventilation_l_s, 220.0);  // 22 people × 10 L/s
  const auto short_day = testing::demo_scenario("short");
  EXPECT_DOUBLE_EQ(short_day.day.end_s, 8.5 * 3600.0);
  EXPECT_DOUBLE_EQ(short_day.house.zones[2].occupancy.at(7.6 * 3600.0), 0.6);
}

TEST(SimScenarioFile, IncidentDefaultsAndDescriptions) {
  const std::string text = R"(
building: demo-zones.building.yaml
weather: { outdoor_c: 28, dew_point_c: 20 }
incidents:
  - { kind: supply_high, loop: slab-lobby, start: "10:00", end: "11:00" }
  - { kind: supply_high, loop: ceiling-north, max_c: 14.5, start: "10:00", end: "11:00" }
  - { kind: window_open, zone: g-meeting, start: "10:00", end: "11:00" }
  - { kind: sensor_drift, loop: ceiling-south, input: supply_temp, k_per_h: -0.5, start: "10:00", end: "11:00" }
  - { kind: sensor_stuck, zone: g-lobby, input: surface, topic: bldg/qf/g-lobby/surface-temp, value: 22,
      start: "10:00", end: "11:00" }
  - { kind: broker_outage, start: "12:00", end: "12:05" }
)";
  const auto r = load_scenario_text(text, "inline.yaml", k_data, demo_config(), "config/demo.yaml");
  ASSERT_TRUE(r.ok()) << (r.errors.empty() ? "" : r.errors.front().to_string());
  const auto& inc = r.day->incidents;
  ASSERT_EQ(inc.size(), 6u);
  EXPECT_DOUBLE_EQ(inc[0].value, 19.0);  // the slab loop's design supply (a slab zone: 19 °C)
  EXPECT_DOUBLE_EQ(inc[1].value, 14.5);
  EXPECT_DOUBLE_EQ(inc[2].value, 0.3);  // an open window's default outdoor air, m³/s
  EXPECT_EQ(inc[3].description, "sensor_drift of supply_temp in ceiling-south (-0.5 K/h)");
  EXPECT_EQ(inc[4].topic, "bldg/qf/g-lobby/surface-temp");
  EXPECT_EQ(inc[4].description, "sensor_stuck of surface in g-lobby (at 22 °C)");
  EXPECT_EQ(inc[5].description, "broker_outage");
  EXPECT_TRUE(r.day->broker_down(12 * 3600.0 + 60));
}

TEST(SimScenarioFile, SensorIncidentNeedsAnInputTheTargetHas) {
  const std::string text = R"(
building: demo-zones.building.yaml
weather: { outdoor_c: 28, dew_point_c: 20 }
incidents:
  - { kind: sensor_silent, zone: g-lobby, input: flow, start: "10:00", end: "11:00" }
  - { kind: sensor_silent, zone: g-lobby, input: humidity, topic: bldg/qf/g-lobby/temp, start: "10:00", end: "11:00" }
  - { kind: sensor_silent, zone: g-lobby, loop: slab-lobby, input: flow, start: "10:00", end: "11:00" }
)";
  const auto r = load_scenario_text(text, "inline.yaml", k_data, demo_config(), "config/demo.yaml");
  EXPECT_EQ(located(r, "inline.yaml"),
            (std::vector<std::string>{
                "5:50: 'input' must be air_temp, humidity or surface, got 'flow'",
                "6:67: incident 2 (sensor_silent): 'bldg/qf/g-lobby/temp' is not a humidity topic of g-lobby (it has "
                "bldg/qf/g-lobby/rh)",
                "7:43: incident 3 (sensor_silent): give 'zone' or 'loop', not both"}));
}

TEST(SimScenarioFile, TheExampleOfTheDocsReadsAgainstTheClinicConfig) {
  std::ifstream in(testing::source_path("config/clinic.yaml"));
  std::ostringstream text;
  text << in.rdbuf();
  const auto cfg = load_config_text(text.str(), "config/clinic.yaml");
  ASSERT_TRUE(cfg.ok());
  const auto r = load_scenario_file(k_data + "good/clinic-coil-trip.yaml", *cfg.config, "config/clinic.yaml");
  ASSERT_TRUE(r.ok()) << (r.errors.empty() ? "" : r.errors.front().to_string());
  EXPECT_EQ(r.house->zones.size(), 6u);
  EXPECT_DOUBLE_EQ(r.house->zones[1].moisture_g_h.at(12.5 * 3600.0), 1200.0);  // gf-cafe, cooking
  EXPECT_DOUBLE_EQ(r.house->zones[1].moisture_g_h.at(14 * 3600.0), 0.0);
  EXPECT_DOUBLE_EQ(r.house->zones[1].design_people, 25.0);
  EXPECT_DOUBLE_EQ(r.house->zones[1].occupancy.at(14 * 3600.0), 0.2);
  EXPECT_EQ(r.house->zones[2].surface, surface_kind::wall_panel);
  EXPECT_DOUBLE_EQ(*r.house->dehumidifiers[0].capacity_kg_h, 30.0);
  EXPECT_EQ(r.day->incidents.size(), 3u);
}

TEST(SimScenarioFile, TimesOfDay) {
  struct row {
    const char* text;
    double seconds;  // < 0: rejected
  };
  for (const row& r : {row{"06:00", 21600}, row{"6:30", 23400}, row{"00:00", 0}, row{"24:00", 86400},
                       row{"23:59", 86340}, row{"24:01", -1}, row{"12:60", -1}, row{"1200", -1}, row{"12:5", -1},
                       row{"-1:00", -1}, row{"12:00:00", -1}, row{"", -1}, row{"ab:cd", -1}}) {
    const auto t = parse_clock_text(r.text);
    if (r.seconds < 0) {
      EXPECT_FALSE(t.has_value()) << r.text;
    } else {
      ASSERT_TRUE(t.has_value()) << r.text;
      EXPECT_DOUBLE_EQ(*t, r.seconds) << r.text;
    }
  }
}

}  // namespace
}  // namespace dewmargin::sim
