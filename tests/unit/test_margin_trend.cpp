#include <gtest/gtest.h>

#include <cmath>
#include <optional>
#include <vector>

#include "dewmargin/margin_trend.h"

namespace dewmargin {
namespace {

constexpr double k_window_s = 600.0;                     // the default trend_window_s
const timestamp k_t0 = from_unix_ms(1'784'030'400'000);  // 2026-07-14T12:00:00Z

timestamp at_ms(std::int64_t ms) { return k_t0 + std::chrono::milliseconds(ms); }
timestamp at_s(double s) { return at_ms(std::llround(s * 1000.0)); }

// Feeds a margin that changes linearly at `rate_k_per_min` (negative: falling) and reaches
// `end_margin_k` at `end_s`, one reading every `every_s` from `start_s` to `end_s`.
void feed_line(margin_trend& trend, double start_s, double end_s, double every_s, double end_margin_k,
               double rate_k_per_min) {
  const auto n = static_cast<long>(std::llround((end_s - start_s) / every_s));
  for (long i = 0; i <= n; ++i) {
    const double t_s = start_s + static_cast<double>(i) * every_s;
    trend.add(at_s(t_s), end_margin_k + rate_k_per_min * (t_s - end_s) / 60.0);
  }
}

struct fall_case {
  double margin_now_k;
  double fall_k_per_min;
  double expected_min;
};

TEST(MarginTrend, ExtrapolatesASteadyFallToZero) {
  // Minutes to zero of a straight line: margin / rate (3 K at 0.1 K/min is 30 min).
  const std::vector<fall_case> cases = {
      {3.0, 0.1, 30.0},
      {1.0, 0.5, 2.0},
      {6.0, 0.2, 30.0},
      {0.5, 0.01, 50.0},
  };
  for (const auto& c : cases) {
    margin_trend trend(k_window_s);
    feed_line(trend, 0.0, 600.0, 5.0, c.margin_now_k, -c.fall_k_per_min);
    const auto minutes = trend.minutes_to_condensation(at_s(600));
    ASSERT_TRUE(minutes.has_value()) << c.margin_now_k << " K at " << c.fall_k_per_min << " K/min";
    EXPECT_NEAR(*minutes, c.expected_min, 0.01) << c.margin_now_k << " K at " << c.fall_k_per_min << " K/min";
  }
}

TEST(MarginTrend, ExtrapolatesToNowWhenTheLastReadingIsOlder) {
  margin_trend trend(k_window_s);
  feed_line(trend, 0.0, 540.0, 5.0, 3.0, -0.1);
  // One minute after the last reading the line is at 2.9 K: 29 min left.
  const auto minutes = trend.minutes_to_condensation(at_s(600));
  ASSERT_TRUE(minutes.has_value());
  EXPECT_NEAR(*minutes, 29.0, 0.01);
}

TEST(MarginTrend, IsEmptyWhenTheMarginIsRisingOrFlat) {
  // A fall slower than about 0.006 K/min counts as flat (it would be days away).
  for (double rate_k_per_min : {0.1, 0.0, -0.003}) {
    margin_trend trend(k_window_s);
    feed_line(trend, 0.0, 600.0, 5.0, 3.0, rate_k_per_min);
    EXPECT_FALSE(trend.minutes_to_condensation(at_s(600)).has_value()) << rate_k_per_min << " K/min";
  }
}

TEST(MarginTrend, IsEmptyWithoutReadings) {
  const margin_trend trend(k_window_s);
  EXPECT_FALSE(trend.minutes_to_condensation(k_t0).has_value());
}

TEST(MarginTrend, NeedsAtLeastFourPoints) {
  margin_trend three(k_window_s);
  feed_line(three, 0.0, 300.0, 150.0, 3.0, -0.1);  // 3 points over 300 s
  EXPECT_FALSE(three.minutes_to_condensation(at_s(300)).has_value());

  margin_trend four(k_window_s);
  feed_line(four, 0.0, 300.0, 100.0, 3.0, -0.1);  // 4 points over 300 s
  const auto minutes = four.minutes_to_condensation(at_s(300));
  ASSERT_TRUE(minutes.has_value());
  EXPECT_NEAR(*minutes, 30.0, 0.01);
}

TEST(MarginTrend, NeedsAFifthOfTheWindowOfSpan) {
  margin_trend short_span(k_window_s);
  feed_line(short_span, 0.0, 110.0, 10.0, 3.0, -0.1);  // 12 points over 110 s < 120 s
  EXPECT_FALSE(short_span.minutes_to_condensation(at_s(110)).has_value());

  margin_trend enough(k_window_s);
  feed_line(enough, 0.0, 120.0, 10.0, 3.0, -0.1);  // exactly a fifth of 600 s
  EXPECT_TRUE(enough.minutes_to_condensation(at_s(120)).has_value());
}

TEST(MarginTrend, IsZeroWhenTheMarginIsAtOrBelowZero) {
  for (double margin_k : {0.0, -0.4}) {
    margin_trend single(k_window_s);
    single.add(k_t0, margin_k);
    ASSERT_TRUE(single.minutes_to_condensation(k_t0).has_value()) << margin_k;
    EXPECT_EQ(*single.minutes_to_condensation(k_t0), 0.0) << margin_k;

    margin_trend rising(k_window_s);
    feed_line(rising, 0.0, 600.0, 5.0, margin_k, 0.1);
    EXPECT_EQ(rising.minutes_to_condensation(at_s(600)), std::optional<double>(0.0)) << margin_k;
  }
}

TEST(MarginTrend, ThinsManyReadingsPerSecondOverAnHour) {
  // Ten readings a second for an hour: 50 minutes of rise, then 10 minutes of a steady
  // fall to 3 K at 0.1 K/min. Only the window counts, and the ring stays its fixed size.
  margin_trend trend(k_window_s);
  feed_line(trend, 0.0, 3000.0, 0.1, 5.0, 0.05);
  feed_line(trend, 3000.1, 3600.0, 0.1, 3.0, -0.1);
  const auto minutes = trend.minutes_to_condensation(at_s(3600));
  ASSERT_TRUE(minutes.has_value());
  EXPECT_NEAR(*minutes, 30.0, 0.05);
  static_assert(sizeof(margin_trend) < 2 * margin_trend::k_capacity * 16 + 64, "fixed-size storage");
}

TEST(MarginTrend, IgnoresAReadingOlderThanTheLastOne) {
  margin_trend trend(k_window_s);
  feed_line(trend, 0.0, 605.0, 5.0, 3.0, -0.1);  // the last point, 605 s, is in the bucket 600–610 s
  const auto before = trend.minutes_to_condensation(at_s(605));
  ASSERT_TRUE(before.has_value());
  trend.add(at_s(300), 50.0);   // far in the past of the ring
  trend.add(at_s(602), -10.0);  // inside the last point's thinning bucket, but earlier
  const auto after = trend.minutes_to_condensation(at_s(605));
  ASSERT_TRUE(after.has_value());
  EXPECT_DOUBLE_EQ(*after, *before);
}

TEST(MarginTrend, ClearForgetsEverything) {
  margin_trend trend(k_window_s);
  feed_line(trend, 0.0, 600.0, 5.0, 3.0, -0.1);
  trend.clear();
  EXPECT_FALSE(trend.minutes_to_condensation(at_s(600)).has_value());
}

// Point times are kept as offsets from a base that moves up every few days: a service that
// runs for weeks sees the same trend on day 40 as on day 1 (3 K at 0.1 K/min: 30 min).
TEST(MarginTrend, KeepsWorkingAcrossWeeksOfUptime) {
  margin_trend trend(k_window_s);
  const double day_s = 86400.0;
  for (int day = 0; day <= 40; ++day) {
    const double end_s = day * day_s + 3600.0;
    feed_line(trend, end_s - k_window_s, end_s, 10.0, 3.0, -0.1);
    const auto minutes = trend.minutes_to_condensation(at_s(end_s));
    ASSERT_TRUE(minutes.has_value()) << "day " << day;
    EXPECT_NEAR(*minutes, 30.0, 0.01) << "day " << day;
    feed_line(trend, end_s + 60.0, end_s + 60.0 + k_window_s, 10.0, 5.0, 0.0);  // then flat
    EXPECT_FALSE(trend.minutes_to_condensation(at_s(end_s + 60.0 + k_window_s)).has_value()) << "day " << day;
  }
}

}  // namespace
}  // namespace dewmargin
