// The simulator's ground truth (tools/simulator/model/ground_truth.h).
#include <gtest/gtest.h>

#include "model/ground_truth.h"

namespace dewmargin::sim {
namespace {

zone_state state(double surface_c, double dew_point_c) {
  zone_state z;
  z.surface_c = surface_c;
  z.dew_point_c = dew_point_c;
  return z;
}

TEST(SimGroundTruth, CountsOnlyTimeBelowTheDewPointAndCreditsTheZonesIncident) {
  const building b = quayside_four();
  scenario s = short_day();
  s.incidents = {{incident_kind::door_propped, "g-lobby", 0.0, 100.0, 0.0, "door"},
                 {incident_kind::doas_coil_trip, "", 50.0, 100.0, 0.0, "trip"}};
  ground_truth t(b);
  std::vector<zone_state> zones(b.zones.size(), state(18.0, 14.0));
  zones[0] = state(17.0, 17.5);  // g-lobby wet
  zones[1] = state(16.0, 16.0);  // g-meeting exactly at the dew point: not wet
  t.record(30.0, 30.0, zones, s);
  zones[2] = state(15.0, 15.2);  // l1-north-open wet during the trip only
  t.record(60.0, 30.0, zones, s);
  t.record(150.0, 60.0, zones, s);  // no incident any more

  EXPECT_DOUBLE_EQ(t.zones()[0].condensing_s, 120.0);
  EXPECT_DOUBLE_EQ(t.zones()[1].condensing_s, 0.0);
  EXPECT_DOUBLE_EQ(t.zones()[2].condensing_s, 90.0);
  EXPECT_DOUBLE_EQ(t.total_condensing_min(), 3.5);
  const auto& by = t.condensing_min_by_incident();
  EXPECT_DOUBLE_EQ(by.at("door_propped"), 1.0);    // g-lobby, 0-60 s
  EXPECT_DOUBLE_EQ(by.at("doas_coil_trip"), 1.0);  // g-lobby and l1-north-open, 30-60 s
  EXPECT_DOUBLE_EQ(by.at("no incident"), 2.0);     // both, 60-120 s
  EXPECT_DOUBLE_EQ(t.zones()[0].min_margin_k, -0.5);
  EXPECT_DOUBLE_EQ(t.zones()[0].min_margin_at_s, 30.0);
  EXPECT_EQ(t.worst_zone_now(), 0u);
  EXPECT_DOUBLE_EQ(t.worst_margin_now_k(), -0.5);
}

}  // namespace
}  // namespace dewmargin::sim
