// What drives a loop's setpoint (loop_reset_driver.h). The reset arithmetic itself is
// tested in test_supply_reset.cpp.
#include <gtest/gtest.h>

#include "dewmargin/loop_reset_driver.h"

namespace dewmargin {
namespace {

timestamp at_s(double s) { return from_unix_ms(1'800'000'000'000 + static_cast<std::int64_t>(s * 1000.0)); }

setpoint_config setpoints() {
  setpoint_config c;
  c.min_c = 15.0;
  c.max_c = 20.0;
  c.reset_margin_k = 2.0;
  c.fall_k_per_min = 0.2;
  return c;
}

const std::string k_a = "a", k_b = "b", k_c = "c";

TEST(LoopResetDriver, HighestDewPointOfTheCountedZonesGoverns) {
  const reset_demand d = loop_demand({{&k_a, true, 14.0}, {&k_b, false, 17.0}, {&k_c, true, 15.5}});
  EXPECT_EQ(d.max_dew_point_c, 15.5);
  EXPECT_EQ(d.governing_zone, "c");
  EXPECT_FALSE(d.dew_point_unknown);
  EXPECT_FALSE(d.no_counted_zone);
}

TEST(LoopResetDriver, ACountedZoneWithoutDewPointGovernsAndDrivesToMax) {
  const reset_demand d = loop_demand({{&k_a, true, 14.0}, {&k_b, true, std::nullopt}, {&k_c, true, std::nullopt}});
  EXPECT_TRUE(d.dew_point_unknown);
  EXPECT_EQ(d.governing_zone, "b");
  supply_reset r(setpoints(), 15.0);
  EXPECT_TRUE(drive_on_tick(r, {{&k_a, true, 14.0}, {&k_b, true, std::nullopt}}, at_s(0)));
  EXPECT_EQ(r.setpoint_c(), 20.0);
  EXPECT_EQ(r.reason(), "dew point of b unknown: fail safe at max");
}

TEST(LoopResetDriver, AClosedZoneWithoutDewPointDoesNotCount) {
  const reset_demand d = loop_demand({{&k_a, true, 14.0}, {&k_b, false, std::nullopt}});
  EXPECT_FALSE(d.dew_point_unknown);
  EXPECT_EQ(d.max_dew_point_c, 14.0);
}

TEST(LoopResetDriver, NoCountedZoneDrivesToMin) {
  supply_reset r(setpoints(), 15.0);
  const reset_demand d = loop_demand({{&k_a, false, 14.0}});
  EXPECT_TRUE(d.no_counted_zone);
  (void)drive_on_tick(r, {{&k_a, false, 14.0}}, at_s(0));
  EXPECT_EQ(r.setpoint_c(), 15.0);
  EXPECT_EQ(r.reason(), "no zone open on this loop");
}

TEST(LoopResetDriver, AZoneRaisesAtOnceButNeverLowers) {
  supply_reset r(setpoints(), 16.0);
  EXPECT_TRUE(drive_on_zone(r, {&k_a, true, 15.0}, at_s(0)));  // 15 + 2 = 17
  EXPECT_EQ(r.setpoint_c(), 17.0);
  EXPECT_FALSE(drive_on_zone(r, {&k_a, true, 13.0}, at_s(1)));  // lower: the tick's business
  EXPECT_EQ(r.setpoint_c(), 17.0);
  EXPECT_FALSE(drive_on_zone(r, {&k_b, false, 17.5}, at_s(2))) << "a closed zone does not drive";
  EXPECT_TRUE(drive_on_zone(r, {&k_c, true, std::nullopt}, at_s(3)));
  EXPECT_EQ(r.setpoint_c(), 20.0);
}

TEST(LoopResetDriver, TheTickLowersNoFasterThanTheFallRate) {
  supply_reset r(setpoints(), 20.0);
  (void)drive_on_tick(r, {{&k_a, true, 13.0}}, at_s(0));
  (void)drive_on_tick(r, {{&k_a, true, 13.0}}, at_s(60));
  EXPECT_NEAR(r.setpoint_c(), 19.8, 1e-9);  // 0.2 K in a minute
  EXPECT_EQ(r.limited(), setpoint_limit::rate);
}

}  // namespace
}  // namespace dewmargin
