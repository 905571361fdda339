// Margin sparkline series (lib/live/margin_history.h).
#include <gtest/gtest.h>

#include "dewmargin/margin_history.h"

namespace dewmargin::live {
namespace {

timestamp at_s(std::int64_t s) { return from_unix_ms(s * 1000); }

TEST(MarginHistory, KeepsTheLowestMarginOfEachBucket) {
  margin_history h(std::chrono::hours(1), std::chrono::seconds(30));
  h.add("z", at_s(0), 3.0);
  h.add("z", at_s(10), 1.5);  // a short dip stays visible
  h.add("z", at_s(20), 2.8);
  h.add("z", at_s(30), 2.0);
  const auto s = h.series("z");
  ASSERT_EQ(s.size(), 2u);
  EXPECT_DOUBLE_EQ(*s[0].margin_k, 1.5);
  EXPECT_DOUBLE_EQ(*s[1].margin_k, 2.0);
  EXPECT_EQ(s[1].ts, at_s(30));
}

TEST(MarginHistory, DropsPointsOlderThanTheWindowAndStaysBounded) {
  margin_history h(std::chrono::hours(1), std::chrono::seconds(30));
  for (std::int64_t t = 0; t <= 3 * 3600; t += 5) h.add("z", at_s(t), static_cast<double>(t % 7));
  const auto s = h.series("z");
  EXPECT_EQ(s.size(), 121u);  // one hour of 30 s buckets, both ends
  EXPECT_EQ(s.front().ts, at_s(2 * 3600));
  EXPECT_EQ(s.back().ts, at_s(3 * 3600));
}

TEST(MarginHistory, UnknownMarginIsAGapUnlessTheBucketHasAValue) {
  margin_history h;
  h.add("z", at_s(0), std::nullopt);
  h.add("z", at_s(40), std::nullopt);
  h.add("z", at_s(45), 2.0);
  const auto s = h.series("z");
  ASSERT_EQ(s.size(), 2u);
  EXPECT_FALSE(s[0].margin_k);
  EXPECT_DOUBLE_EQ(*s[1].margin_k, 2.0);
}

TEST(MarginHistory, AClockThatGoesBackStartsTheSeriesAgain) {
  margin_history h;
  h.add("z", at_s(3600), 2.0);
  h.add("z", at_s(60), 1.0);
  const auto s = h.series("z");
  ASSERT_EQ(s.size(), 1u);
  EXPECT_EQ(s[0].ts, at_s(60));
}

TEST(MarginHistory, RefusesNewSeriesBeyondItsLimit) {
  margin_history h(std::chrono::hours(1), std::chrono::seconds(30), 2);
  EXPECT_TRUE(h.add("a", at_s(0), 1.0));
  EXPECT_TRUE(h.add("b", at_s(0), 1.0));
  EXPECT_FALSE(h.add("c", at_s(0), 1.0));
  EXPECT_TRUE(h.add("a", at_s(30), 1.0));
  EXPECT_EQ(h.keys(), (std::vector<std::string>{"a", "b"}));
}

}  // namespace
}  // namespace dewmargin::live
