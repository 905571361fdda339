#include <gtest/gtest.h>

#include <optional>
#include <string>
#include <vector>

#include "dewmargin/supply_reset.h"

namespace dewmargin {
namespace {

// Defaults of design.md: min 15 °C, max 20 °C, reset margin 2 K, fall 0.2 K/min.
const setpoint_config k_cfg{};
const timestamp k_t0 = from_unix_ms(1'784'030'400'000);  // 2026-07-14T12:00:00Z
constexpr double k_tol = 1e-9;

timestamp at_ms(std::int64_t ms) { return k_t0 + std::chrono::milliseconds(ms); }
timestamp at_s(std::int64_t s) { return at_ms(s * 1000); }

reset_demand dew_point(double dp_c, const std::string& zone = "level2-east") {
  reset_demand d;
  d.max_dew_point_c = dp_c;
  d.governing_zone = zone;
  return d;
}
reset_demand unknown_dew_point(const std::string& zone) {
  reset_demand d;
  d.dew_point_unknown = true;
  d.governing_zone = zone;
  return d;
}
reset_demand no_counted_zone() {
  reset_demand d;
  d.no_counted_zone = true;
  return d;
}

TEST(SetpointLimitNames, AreTheWordsOfTheLoopState) {
  EXPECT_STREQ(setpoint_limit_name(setpoint_limit::none), "none");
  EXPECT_STREQ(setpoint_limit_name(setpoint_limit::min), "min");
  EXPECT_STREQ(setpoint_limit_name(setpoint_limit::max), "max");
  EXPECT_STREQ(setpoint_limit_name(setpoint_limit::rate), "rate");
}

struct target_case {
  double dew_point_c;
  double target_c;
  setpoint_limit limited;
  std::string reason;
};

TEST(ResetTarget, IsTheClampedDewPointPlusResetMargin) {
  const std::vector<target_case> cases = {
      {14.0, 16.0, setpoint_limit::none, "level2-east dew point 14.00 °C + 2.00 K"},
      {13.0, 15.0, setpoint_limit::none, "level2-east dew point 13.00 °C + 2.00 K"},  // exactly min_c
      {18.0, 20.0, setpoint_limit::none, "level2-east dew point 18.00 °C + 2.00 K"},  // exactly max_c
      {12.0, 15.0, setpoint_limit::min, "level2-east dew point 12.00 °C + 2.00 K, held at min"},
      {18.5, 20.0, setpoint_limit::max, "level2-east dew point 18.50 °C + 2.00 K, held at max"},
      {-5.0, 15.0, setpoint_limit::min, "level2-east dew point -5.00 °C + 2.00 K, held at min"},
  };
  for (const auto& c : cases) {
    const reset_target t = compute_reset_target(dew_point(c.dew_point_c), k_cfg);
    EXPECT_NEAR(t.target_c, c.target_c, k_tol) << c.dew_point_c;
    EXPECT_EQ(t.limited, c.limited) << c.dew_point_c;
    EXPECT_EQ(t.reason, c.reason);
  }
}

TEST(ResetTarget, FailsSafeAtMaxWhenADewPointIsUnknown) {
  reset_demand d = unknown_dew_point("level3-west");
  d.max_dew_point_c = 12.0;  // a known lower zone does not matter
  const reset_target t = compute_reset_target(d, k_cfg);
  EXPECT_EQ(t.target_c, k_cfg.max_c);
  EXPECT_EQ(t.limited, setpoint_limit::max);
  EXPECT_EQ(t.reason, "dew point of level3-west unknown: fail safe at max");
}

TEST(ResetTarget, GoesToMinWhenNoZoneCounts) {
  const reset_target t = compute_reset_target(no_counted_zone(), k_cfg);
  EXPECT_EQ(t.target_c, k_cfg.min_c);
  EXPECT_EQ(t.limited, setpoint_limit::min);
  EXPECT_EQ(t.reason, "no zone open on this loop");
}

TEST(SupplyReset, StartsWithTheInitialSetpointLimitedAtMax) {
  const supply_reset r(k_cfg, k_cfg.max_c);
  EXPECT_EQ(r.setpoint_c(), 20.0);
  EXPECT_EQ(r.limited(), setpoint_limit::max);
  EXPECT_EQ(r.reason(), "starting: no readings yet");
}

TEST(SupplyReset, RisesAtOnce) {
  supply_reset r(k_cfg, 16.0);
  EXPECT_TRUE(r.update(dew_point(14.0), k_t0));
  EXPECT_TRUE(r.update(dew_point(17.5), at_ms(1)));
  EXPECT_NEAR(r.setpoint_c(), 19.5, k_tol);
  EXPECT_EQ(r.limited(), setpoint_limit::none);
  EXPECT_EQ(r.reason(), "level2-east dew point 17.50 °C + 2.00 K");
}

TEST(SupplyReset, FallsNoFasterThanFallKPerMin) {
  supply_reset r(k_cfg, 18.0);
  r.update(dew_point(14.0), k_t0);  // target 16 °C; no time has passed yet
  EXPECT_EQ(r.setpoint_c(), 18.0);
  EXPECT_EQ(r.limited(), setpoint_limit::rate);

  EXPECT_TRUE(r.update(dew_point(14.0), at_s(30)));
  EXPECT_NEAR(r.setpoint_c(), 17.9, k_tol) << "30 s at 0.2 K/min is 0.1 K";
  EXPECT_EQ(r.limited(), setpoint_limit::rate);
  EXPECT_EQ(r.reason(), "falling at 0.20 K/min towards 16.00 °C: level2-east dew point 14.00 °C + 2.00 K");

  EXPECT_TRUE(r.update(dew_point(14.0), at_s(90)));
  EXPECT_NEAR(r.setpoint_c(), 17.7, k_tol) << "another minute, another 0.2 K";
}

TEST(SupplyReset, StopsAtTheTargetWithNoLimit) {
  supply_reset r(k_cfg, 16.5);
  r.update(dew_point(14.0), k_t0);
  EXPECT_TRUE(r.update(dew_point(14.0), at_s(150)));  // 0.5 K exactly at 0.2 K/min
  EXPECT_NEAR(r.setpoint_c(), 16.0, k_tol);
  EXPECT_EQ(r.limited(), setpoint_limit::none);
  EXPECT_EQ(r.reason(), "level2-east dew point 14.00 °C + 2.00 K");

  EXPECT_FALSE(r.update(dew_point(14.0), at_s(600))) << "no overshoot below the target";
  EXPECT_NEAR(r.setpoint_c(), 16.0, k_tol);
}

TEST(SupplyReset, ARiseInterruptsAFall) {
  supply_reset r(k_cfg, 19.0);
  r.update(dew_point(13.0), k_t0);
  r.update(dew_point(13.0), at_s(60));
  ASSERT_NEAR(r.setpoint_c(), 18.8, k_tol);
  EXPECT_TRUE(r.update(dew_point(17.0), at_s(61)));
  EXPECT_NEAR(r.setpoint_c(), 19.0, k_tol);
  EXPECT_EQ(r.limited(), setpoint_limit::none);
}

TEST(SupplyReset, IsPinnedAtMaxAndMin) {
  supply_reset high(k_cfg, 16.0);
  EXPECT_TRUE(high.update(dew_point(19.0), k_t0));
  EXPECT_EQ(high.setpoint_c(), 20.0);
  EXPECT_EQ(high.limited(), setpoint_limit::max);
  EXPECT_EQ(high.reason(), "level2-east dew point 19.00 °C + 2.00 K, held at max");

  supply_reset low(k_cfg, 15.1);
  low.update(dew_point(10.0), k_t0);
  EXPECT_TRUE(low.update(dew_point(10.0), at_s(60)));
  EXPECT_EQ(low.setpoint_c(), 15.0);
  EXPECT_EQ(low.limited(), setpoint_limit::min);
  EXPECT_EQ(low.reason(), "level2-east dew point 10.00 °C + 2.00 K, held at min");
  EXPECT_FALSE(low.update(dew_point(10.0), at_s(120))) << "nothing changes while pinned";
}

TEST(SupplyReset, GoesToMaxAtOnceWhenADewPointIsUnknown) {
  supply_reset r(k_cfg, 16.0);
  r.update(dew_point(14.0), k_t0);
  EXPECT_TRUE(r.update(unknown_dew_point("level3-west"), at_ms(1)));
  EXPECT_EQ(r.setpoint_c(), 20.0);
  EXPECT_EQ(r.limited(), setpoint_limit::max);
  EXPECT_EQ(r.reason(), "dew point of level3-west unknown: fail safe at max");
}

TEST(SupplyReset, FallsTowardsMinWhenNoZoneCounts) {
  supply_reset r(k_cfg, 15.5);
  r.update(no_counted_zone(), k_t0);
  EXPECT_EQ(r.limited(), setpoint_limit::rate);
  r.update(no_counted_zone(), at_s(150));
  EXPECT_EQ(r.setpoint_c(), 15.0);
  EXPECT_EQ(r.limited(), setpoint_limit::min);
  EXPECT_EQ(r.reason(), "no zone open on this loop");
}

TEST(SupplyReset, RaiseForRaisesOnlyAboveTheSetpoint) {
  supply_reset r(k_cfg, 17.0);
  EXPECT_FALSE(r.raise_for(14.0, "level1", k_t0)) << "below";
  EXPECT_FALSE(r.raise_for(15.0, "level1", k_t0)) << "equal";
  EXPECT_EQ(r.setpoint_c(), 17.0);
  EXPECT_EQ(r.reason(), "starting: no readings yet") << "unchanged when not raised";

  EXPECT_TRUE(r.raise_for(15.5, "level1", at_s(1)));
  EXPECT_NEAR(r.setpoint_c(), 17.5, k_tol);
  EXPECT_EQ(r.limited(), setpoint_limit::none);
  EXPECT_EQ(r.reason(), "level1 dew point 15.50 °C + 2.00 K");

  EXPECT_TRUE(r.raise_for(19.0, "level2", at_s(2)));
  EXPECT_EQ(r.setpoint_c(), 20.0);
  EXPECT_EQ(r.limited(), setpoint_limit::max);
  EXPECT_EQ(r.reason(), "level2 dew point 19.00 °C + 2.00 K, held at max");
}

TEST(SupplyReset, FallAfterARaiseCountsFromTheRaise) {
  supply_reset r(k_cfg, 16.0);
  r.update(dew_point(14.0), k_t0);
  ASSERT_TRUE(r.raise_for(16.0, "level1", at_s(600)));  // 18 °C
  r.update(dew_point(14.0), at_s(630));
  EXPECT_NEAR(r.setpoint_c(), 17.9, k_tol) << "30 s since the raise, not 630 s since the last update";
}

TEST(SupplyReset, RaiseToMaxGoesToMaxOnce) {
  supply_reset r(k_cfg, 16.0);
  r.update(dew_point(14.0), k_t0);
  EXPECT_TRUE(r.raise_to_max("level3-west", at_s(1)));
  EXPECT_EQ(r.setpoint_c(), 20.0);
  EXPECT_EQ(r.limited(), setpoint_limit::max);
  EXPECT_EQ(r.reason(), "dew point of level3-west unknown: fail safe at max");
  EXPECT_FALSE(r.raise_to_max("level3-west", at_s(2))) << "already there";
}

TEST(SupplyReset, RaiseToMaxFromTheInitialMaxSetpointChangesNothing) {
  supply_reset r(k_cfg, k_cfg.max_c);
  EXPECT_FALSE(r.raise_to_max("level3-west", k_t0));
  EXPECT_EQ(r.setpoint_c(), 20.0);
}

TEST(SupplyReset, UpdateReportsOnlyRealChanges) {
  supply_reset r(k_cfg, 16.0);
  EXPECT_TRUE(r.update(dew_point(14.0), k_t0)) << "limit max → none";
  EXPECT_FALSE(r.update(dew_point(14.0), at_s(10)));
  EXPECT_FALSE(r.update(dew_point(14.0, "other-zone"), at_s(20))) << "same value and limit";
}

}  // namespace
}  // namespace dewmargin
