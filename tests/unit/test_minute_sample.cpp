#include <gtest/gtest.h>

#include "dewmargin/minute_sample.h"

namespace dewmargin {
namespace {

constexpr std::int64_t k_minute_ms = 1'800'000'000'000 - 1'800'000'000'000 % 60000;
timestamp at_s(double s) { return from_unix_ms(k_minute_ms + static_cast<std::int64_t>(s * 1000.0)); }

zone_margin margin(std::optional<double> k, std::optional<double> dew_point_c, double air_c = 24) {
  zone_margin m;
  m.margin_k = k;
  m.dew_point_c = dew_point_c;
  m.air_temp_c = air_c;
  return m;
}

TEST(MinuteSampler, SummarisesAMinuteWhenTheNextOneBegins) {
  minute_sampler s;
  EXPECT_FALSE(s.add(at_s(0), margin(3.0, 12.0), band::safe, "z1"));
  EXPECT_FALSE(s.add(at_s(20), margin(1.5, 13.5), band::tight, "z1"));
  EXPECT_FALSE(s.add(at_s(59.9), margin(std::nullopt, std::nullopt), band::unknown, "z1"));
  const auto done = s.add(at_s(60), margin(2.5, 12.5, 25), band::safe, "z1");
  ASSERT_TRUE(done);
  EXPECT_EQ(done->minute_start, at_s(0));
  EXPECT_EQ(done->zone, "z1");
  EXPECT_EQ(done->min_margin_k, 1.5);
  EXPECT_EQ(done->max_dew_point_c, 13.5);
  EXPECT_EQ(done->worst_band, "unknown");
  EXPECT_EQ(done->air_temp_c, 25.0) << "the values as the minute is closed";
}

TEST(MinuteSampler, CloseGivesThePartialMinuteOnceThenNothing) {
  minute_sampler s;
  EXPECT_FALSE(s.close(margin(1.0, 1.0), "z1"));
  (void)s.add(at_s(5), margin(2.0, 11.0), band::safe, "z1");
  const auto partial = s.close(margin(2.0, 11.0), "z1");
  ASSERT_TRUE(partial);
  EXPECT_EQ(partial->min_margin_k, 2.0);
  EXPECT_FALSE(s.close(margin(2.0, 11.0), "z1"));
}

TEST(MinuteSampler, ACopyGoesOnWithTheSameMinute) {
  minute_sampler s;
  (void)s.add(at_s(1), margin(0.5, 15.0), band::alarm, "z1");
  minute_sampler copy = s;  // a reload carries the sampler over
  (void)copy.add(at_s(30), margin(2.0, 11.0), band::safe, "z1");
  const auto done = copy.add(at_s(61), margin(2.0, 11.0), band::safe, "z1");
  ASSERT_TRUE(done);
  EXPECT_EQ(done->min_margin_k, 0.5);
  EXPECT_EQ(done->worst_band, "alarm");
}

}  // namespace
}  // namespace dewmargin
