// Pacing with back-pressure (tools/simulator/model/pace.h): the schedule moves back instead of
// sprinting after a wait, and the report says how much the play was slowed and why.
#include <gtest/gtest.h>

#include "model/pace.h"

namespace dewmargin::sim {
namespace {

TEST(SimPace, StepsAreDueAtTheAskedSpeed) {
  pacer p(480.0, 21600.0);
  EXPECT_DOUBLE_EQ(p.due_wall_s(21600.0), 0.0);
  EXPECT_DOUBLE_EQ(p.due_wall_s(21600.0 + 480.0), 1.0);
  p.arrived(21600.0 + 480.0, 1.05);  // a little late: within the tolerance, no change
  EXPECT_DOUBLE_EQ(p.due_wall_s(21600.0 + 960.0), 2.0);
}

TEST(SimPace, LatenessMovesTheScheduleBackInsteadOfSprinting) {
  pacer p(480.0, 0.0);
  p.waited_for_broker(2.0);
  p.arrived(480.0, 3.0);  // due at 1 s, arrived at 3 s: 2 s behind
  EXPECT_DOUBLE_EQ(p.due_wall_s(480.0), 3.0);
  EXPECT_DOUBLE_EQ(p.due_wall_s(960.0), 4.0);  // the pace from here on, not a catch-up
  p.waited_for_service(0.5);
  p.arrived(960.0, 4.5);
  p.service_lag(45.0);
  p.service_lag(12.0);
  const pace_report r = p.report(960.0, 4.6);
  EXPECT_DOUBLE_EQ(r.asked_speed, 480.0);
  EXPECT_NEAR(r.achieved_speed, 960.0 / 4.6, 1e-9);
  EXPECT_DOUBLE_EQ(r.slowed_s, 2.5);
  EXPECT_DOUBLE_EQ(r.broker_wait_s, 2.0);
  EXPECT_EQ(r.broker_stalls, 1);
  EXPECT_DOUBLE_EQ(r.service_wait_s, 0.5);
  EXPECT_EQ(r.service_stalls, 1);
  EXPECT_DOUBLE_EQ(r.worst_service_lag_s, 45.0);
}

TEST(SimPace, AsFastAsPossibleHasNoSchedule) {
  pacer p(0.0, 0.0);
  EXPECT_DOUBLE_EQ(p.due_wall_s(5000.0), 0.0);
  p.arrived(5000.0, 10.0);
  const pace_report r = p.report(5000.0, 10.0);
  EXPECT_DOUBLE_EQ(r.slowed_s, 0.0);
  EXPECT_DOUBLE_EQ(r.achieved_speed, 500.0);
}

}  // namespace
}  // namespace dewmargin::sim
