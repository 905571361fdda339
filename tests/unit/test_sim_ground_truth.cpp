// The simulator's ground truth (tools/simulator/model/ground_truth.h).
#include <gtest/gtest.h>

#include "model/ground_truth.h"
#include "test_sim_helpers.h"

namespace dewmargin::sim {
namespace {

zone_state state(double surface_c, double dew_point_c) {
  zone_state z;
  z.surface_c = surface_c;
  z.dew_point_c = dew_point_c;
  return z;
}

incident make_incident(incident_kind kind, std::string target, double start_s, double end_s) {
  incident i;
  i.kind = kind;
  i.target = std::move(target);
  i.start_s = start_s;
  i.end_s = end_s;
  return i;
}

TEST(SimGroundTruth, CountsOnlyTimeBelowTheDewPointAndCreditsTheZonesIncident) {
  const auto demo = testing::demo_scenario("short");
  const building& b = demo.house;
  scenario s = demo.day;
  s.incidents = {make_incident(incident_kind::door_open, "g-lobby", 0.0, 100.0),
                 make_incident(incident_kind::coil_trip, "doas-roof", 30.0, 100.0),
                 make_incident(incident_kind::supply_high, "ceiling-south", 0.0, 100.0)};
  ground_truth t(b);
  std::vector<zone_state> zones(b.zones.size(), state(18.0, 14.0));
  zones[0] = state(17.0, 17.5);  // g-lobby wet
  zones[1] = state(16.0, 16.0);  // g-meeting exactly at the dew point: not wet
  t.record(30.0, 30.0, zones, s);
  zones[2] = state(15.0, 15.2);  // l1-north-open (ceiling-north) wet during the trip only
  t.record(60.0, 30.0, zones, s);
  t.record(160.0, 60.0, zones, s);  // no incident any more (the step began at 100 s)

  EXPECT_DOUBLE_EQ(t.zones()[0].condensing_s, 120.0);
  EXPECT_DOUBLE_EQ(t.zones()[1].condensing_s, 0.0);
  EXPECT_DOUBLE_EQ(t.zones()[2].condensing_s, 90.0);
  EXPECT_DOUBLE_EQ(t.total_condensing_min(), 3.5);
  const auto& by = t.condensing_min_by_incident();
  // Each step is credited to the incidents active at its start.
  EXPECT_DOUBLE_EQ(by.at("door_open"), 1.0);    // g-lobby, 0-60 s
  EXPECT_DOUBLE_EQ(by.at("coil_trip"), 1.0);    // g-lobby and l1-north-open, 30-60 s
  EXPECT_DOUBLE_EQ(by.at("no incident"), 2.0);  // both, 100-160 s
  EXPECT_EQ(by.count("supply_high"), 0u);       // neither zone is on ceiling-south
  EXPECT_DOUBLE_EQ(t.zones()[0].min_margin_k, -0.5);
  EXPECT_DOUBLE_EQ(t.zones()[0].min_margin_at_s, 30.0);
  EXPECT_EQ(t.zones()[0].first_wet_s, 30.0);
  EXPECT_EQ(t.zones()[2].first_wet_s, 60.0);
  EXPECT_FALSE(t.zones()[1].first_wet_s.has_value());
  EXPECT_EQ(t.worst_zone_now(), 0u);
  EXPECT_DOUBLE_EQ(t.worst_margin_now_k(), -0.5);
}

TEST(SimGroundTruth, IncidentsConcernTheirZoneLoopOrDehumidifier) {
  zone_physics z;
  z.id = "room";
  z.loop = "loop-a";
  z.dehumidifier = "ahu-1";
  struct row {
    incident_kind kind;
    const char* target;
    bool concerned;
  };
  for (const row& r :
       {row{incident_kind::crowd, "room", true}, row{incident_kind::crowd, "other", false},
        row{incident_kind::coil_trip, "ahu-1", true}, row{incident_kind::coil_trip, "ahu-2", false},
        row{incident_kind::supply_high, "loop-a", true}, row{incident_kind::supply_high, "loop-b", false},
        row{incident_kind::sensor_drift, "loop-a", true}, row{incident_kind::sensor_stuck, "room", true},
        row{incident_kind::broker_outage, "", true}}) {
    EXPECT_EQ(concerns(make_incident(r.kind, r.target, 0, 1), z), r.concerned)
        << incident_kind_name(r.kind) << " " << r.target;
  }
  z.dehumidifier.clear();  // outdoor air: no coil to trip
  EXPECT_FALSE(concerns(make_incident(incident_kind::coil_trip, "", 0, 1), z));
}

}  // namespace
}  // namespace dewmargin::sim
