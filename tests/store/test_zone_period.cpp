// Periods: a minute sample, an hour rolled up from minutes, a chart bucket. Merging must keep
// what a review reads from the minutes, whatever the grouping.
#include <gtest/gtest.h>

#include <vector>

#include "dewmargin/psychro.h"
#include "dewmargin/zone_period.h"
#include "store_test_support.h"

namespace dewmargin {
namespace {

using store_test::k_t0_ms;

constexpr std::int64_t k_min_ms = 60'000;

zone_sample minute(int i, double margin_k, double surface_rh_pct, const char* band = "safe") {
  zone_sample s;
  s.minute_start = from_unix_ms(k_t0_ms + i * k_min_ms);
  s.zone = "z1";
  s.min_margin_k = margin_k;
  s.worst_band = band;
  s.surface_rh_pct = surface_rh_pct;
  return s;
}

// The longest run of consecutive minutes >= 80 %, counted directly.
int longest_run(const std::vector<zone_sample>& minutes) {
  int longest = 0;
  int run = 0;
  std::int64_t previous_ms = 0;
  for (const auto& m : minutes) {
    const bool wet = m.surface_rh_pct && *m.surface_rh_pct >= 80.0;
    const bool adjacent = to_unix_ms(m.minute_start) - previous_ms == k_min_ms;
    run = wet ? (adjacent ? run + 1 : 1) : 0;
    longest = std::max(longest, run);
    previous_ms = to_unix_ms(m.minute_start);
  }
  return longest;
}

// Groups minutes into periods of `group_min` (aligned on t0), then merges the groups in order.
zone_period merged_in_groups(const std::vector<zone_sample>& minutes, int group_min) {
  std::vector<zone_period> groups;
  for (const auto& m : minutes) {
    const auto offset = (to_unix_ms(m.minute_start) - k_t0_ms) / k_min_ms;
    const auto group_start = from_unix_ms(k_t0_ms + (offset / group_min) * group_min * k_min_ms);
    if (groups.empty() || groups.back().start != group_start) groups.push_back(empty_period("z1", group_start, 0));
    merge_period(groups.back(), period_of(m));
  }
  // Each group spans its whole length, as a stored hour does.
  for (auto& g : groups) {
    if (g.length_min < group_min) merge_period(g, empty_period("z1", g.start + std::chrono::minutes{group_min}, 0));
  }
  zone_period all = empty_period("z1", from_unix_ms(k_t0_ms), 0);
  for (const auto& g : groups) merge_period(all, g);
  return all;
}

TEST(ZonePeriod, MouldRunsChainAcrossAnyGrouping) {
  // 300 minutes: wet 40..109 (70 min, crossing hour boundaries at 60), a gap at 150 (no sample)
  // inside wet 120..179 (runs of 30 and 29), wet 200..299 (100, ends the series).
  std::vector<zone_sample> minutes;
  for (int i = 0; i < 300; ++i) {
    if (i == 150) continue;
    const bool wet = (i >= 40 && i < 110) || (i >= 120 && i < 180) || i >= 200;
    minutes.push_back(minute(i, 1.0, wet ? 85.0 : 60.0));
  }
  ASSERT_EQ(longest_run(minutes), 100);
  for (int group : {1, 6, 60, 300}) {  // each divides 300: the series ends wet in every grouping
    const zone_period all = merged_in_groups(minutes, group);
    EXPECT_EQ(all.mould_longest_min, 100) << "groups of " << group << " min";
    EXPECT_EQ(all.mould_minutes, 70 + 59 + 100) << "groups of " << group << " min";
    EXPECT_EQ(all.sample_minutes, 299);
    EXPECT_EQ(all.mould_tail_min, 100) << "the series ends wet";
    EXPECT_EQ(all.mould_head_min, 0);
  }
}

TEST(ZonePeriod, KeepsTheLowestMarginAndItsMinuteAndTheBandMinutes) {
  std::vector<zone_sample> minutes;
  for (int i = 0; i < 120; ++i) {
    const double margin = i == 77 ? -0.4 : 3.0 - 0.01 * i;
    minutes.push_back(minute(i, margin, 50.0, i == 77 ? "condensing" : (i >= 100 ? "tight" : "safe")));
  }
  const zone_period all = merged_in_groups(minutes, 60);
  ASSERT_TRUE(all.min_margin_k);
  EXPECT_DOUBLE_EQ(*all.min_margin_k, -0.4);
  EXPECT_EQ(to_unix_ms(all.min_margin_at), k_t0_ms + 77 * k_min_ms);
  EXPECT_DOUBLE_EQ(*all.max_margin_k, 3.0);
  EXPECT_EQ(all.band_minutes, (std::array<std::int32_t, k_band_count>{99, 20, 0, 1, 0}));
  EXPECT_EQ(all.length_min, 120);
}

TEST(ZonePeriod, SurfaceRhIsComputedWhenTheSampleHasNone) {
  zone_sample s = minute(0, 2.0, 0.0);
  s.surface_rh_pct.reset();
  s.air_temp_c = 26.0;
  s.rh_pct = 60.0;
  s.surface_min_c = 19.0;
  const zone_period p = period_of(s);
  ASSERT_TRUE(p.max_surface_rh_pct);
  EXPECT_DOUBLE_EQ(*p.max_surface_rh_pct, psychro::surface_rh_pct(26.0, 60.0, 19.0).value());
  s.surface_min_c.reset();
  EXPECT_FALSE(period_of(s).max_surface_rh_pct) << "no surface temperature: no surface RH (supply is not a surface)";
  s.worst_band = "garbled";
  EXPECT_EQ(period_of(s).band_minutes[static_cast<std::size_t>(band_severity(band::unknown))], 1)
      << "an unreadable band counts as unknown, never as safe";
}

}  // namespace
}  // namespace dewmargin
