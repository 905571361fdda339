// Floods, chattering and downsampling in isolation (definitions: EEMUA 191 and ANSI/ISA-18.2 as
// named in alarm_figures.h).
#include <gtest/gtest.h>

#include "dewmargin/report/alarm_figures.h"
#include "dewmargin/report/series.h"

namespace dewmargin::report {
namespace {

const timestamp k_t0 = from_unix_ms(1'784'016'000'000);  // 2026-07-14T08:00:00Z

TEST(AlarmFigures, FloodStartsAboveTenAndEndsBelowFive) {
  struct flood_case {
    std::vector<int> counts;
    int periods;
    int floods;
  };
  const flood_case cases[] = {
      {{10, 10, 10}, 0, 0},      // exactly 10 is not a flood
      {{11, 5, 5, 4, 0}, 3, 1},  // 5 keeps it going, 4 ends it
      {{11, 4, 11, 0}, 2, 2},    // two floods
      {{0, 12, 12, 12}, 3, 1},   // still in flood at the end
  };
  for (const auto& c : cases) {
    int floods = 0;
    EXPECT_EQ(flood_periods(c.counts, &floods), c.periods) << ::testing::PrintToString(c.counts);
    EXPECT_EQ(floods, c.floods) << ::testing::PrintToString(c.counts);
  }
}

TEST(AlarmFigures, ChatteringIsThreeWithinOneMinute) {
  const auto at = [](std::vector<int> seconds) {
    std::vector<timestamp> t;
    for (int s : seconds) t.push_back(k_t0 + std::chrono::seconds{s});
    return t;
  };
  EXPECT_EQ(chattering_episodes(at({0, 30, 60})), 1);  // 60 s apart at most: one minute
  EXPECT_EQ(chattering_episodes(at({0, 30, 61})), 0);
  EXPECT_EQ(chattering_episodes(at({0, 10, 20, 30, 40})), 1);  // one burst, counted once
  EXPECT_EQ(chattering_episodes(at({0, 10, 20, 100, 110, 120})), 2);
  EXPECT_EQ(chattering_episodes(at({0, 10})), 0);
}

TEST(AlarmFigures, StaleAlarmsAreActiveOverADay) {
  zone_review z;
  z.zone = "z";
  z.alarm_active_s = {3600.0, 24 * 3600.0, 24 * 3600.0 + 1};
  const auto f = compute_alarm_figures({z}, k_t0, k_t0 + std::chrono::hours{48});
  EXPECT_EQ(f.stale_alarms, 1);
  EXPECT_EQ(f.periods_10min, 288);
}

TEST(Series, RoundBucketsAndTheMinimumSurvives) {
  const auto layout = layout_for(k_t0, k_t0 + std::chrono::hours{24 * 30}, 480);
  EXPECT_EQ(layout.bucket, std::chrono::minutes{120}) << "30 days in at most 480 points";
  EXPECT_EQ(layout.count, 360u);
  zone_series s("z", layout);
  for (int m = 0; m < 30 * 1440; ++m) {
    zone_sample sample;
    sample.zone = "z";
    sample.minute_start = k_t0 + std::chrono::minutes{m};
    sample.min_margin_k = m == 12345 ? -2.5 : 3.0;
    sample.worst_band = m == 12345 ? "condensing" : "safe";
    s.add(period_of(sample));
  }
  s.finish();
  const auto& dip = s.buckets()[12345 / 120];
  EXPECT_DOUBLE_EQ(*dip.min_margin_k, -2.5);
  EXPECT_EQ(dip.band_minutes[3], 1);
  EXPECT_DOUBLE_EQ(*s.total().min_margin_k, -2.5);
  EXPECT_EQ(s.total().sample_minutes, 30 * 1440);
}

}  // namespace
}  // namespace dewmargin::report
