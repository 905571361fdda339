#include "dewmargin/report/alarm_figures.h"

#include <algorithm>
#include <chrono>

namespace dewmargin::report {

int chattering_episodes(const std::vector<timestamp>& t) {
  int episodes = 0;
  std::size_t i = 0;
  const auto window = std::chrono::milliseconds{static_cast<std::int64_t>(k_chatter_window_s * 1000)};
  while (i + k_chatter_alarms - 1 < t.size()) {
    if (t[i + k_chatter_alarms - 1] - t[i] <= window) {
      ++episodes;
      const timestamp end = t[i] + window;
      while (i < t.size() && t[i] <= end) ++i;
    } else {
      ++i;
    }
  }
  return episodes;
}

int flood_periods(const std::vector<int>& counts, int* floods) {
  int in_flood_periods = 0;
  int starts = 0;
  bool in_flood = false;
  for (const int n : counts) {
    if (!in_flood && n > k_flood_start_alarms) {
      in_flood = true;
      ++starts;
    } else if (in_flood && n < k_flood_end_alarms) {
      in_flood = false;
    }
    if (in_flood) ++in_flood_periods;
  }
  if (floods != nullptr) *floods = starts;
  return in_flood_periods;
}

alarm_figures compute_alarm_figures(const std::vector<zone_review>& zones, timestamp since, timestamp until) {
  alarm_figures f;
  const auto span = until - since;
  f.period_days = std::chrono::duration<double>(span).count() / 86400.0;
  constexpr auto k_day = std::chrono::hours{24};
  constexpr auto k_10min = std::chrono::minutes{10};
  const auto days =
      static_cast<std::size_t>(std::max<std::int64_t>(1, (span + k_day - std::chrono::milliseconds{1}) / k_day));
  const auto tens =
      static_cast<std::size_t>(std::max<std::int64_t>(1, (span + k_10min - std::chrono::milliseconds{1}) / k_10min));
  std::vector<int> per_day(days, 0);
  std::vector<int> per_10min(tens, 0);
  std::vector<source_share> sources;
  for (const auto& z : zones) {
    f.shelved += z.shelves;
    f.suppressed += z.suppressed;
    for (const double s : z.alarm_active_s) {
      if (s > k_stale_alarm_s) ++f.stale_alarms;
    }
    if (z.raises.empty()) continue;
    f.alarms += static_cast<int>(z.raises.size());
    sources.push_back({z.zone, static_cast<int>(z.raises.size()), 0.0});
    for (const timestamp t : z.raises) {
      const auto offset = t - since;
      per_day[std::min(days - 1, static_cast<std::size_t>(offset / k_day))] += 1;
      per_10min[std::min(tens - 1, static_cast<std::size_t>(offset / k_10min))] += 1;
    }
    const int episodes = chattering_episodes(z.raises);
    f.chattering_episodes += episodes;
    if (episodes > 0) ++f.chattering_sources;
  }
  f.per_day_avg = f.period_days > 0 ? f.alarms / f.period_days : 0.0;
  f.periods_10min = static_cast<int>(tens);
  f.per_10min_avg = static_cast<double>(f.alarms) / static_cast<double>(tens);
  const auto day_peak = std::max_element(per_day.begin(), per_day.end());
  f.per_day_peak = *day_peak;
  f.peak_day = since + k_day * (day_peak - per_day.begin());
  const auto ten_peak = std::max_element(per_10min.begin(), per_10min.end());
  f.per_10min_peak = *ten_peak;
  f.peak_10min = since + k_10min * (ten_peak - per_10min.begin());
  f.flood_periods = flood_periods(per_10min, &f.floods);
  f.flood_pct = 100.0 * f.flood_periods / static_cast<double>(tens);
  std::sort(sources.begin(), sources.end(), [](const source_share& a, const source_share& b) {
    return a.alarms != b.alarms ? a.alarms > b.alarms : a.source < b.source;
  });
  if (sources.size() > 10) sources.resize(10);
  for (auto& s : sources) s.share_pct = f.alarms > 0 ? 100.0 * s.alarms / f.alarms : 0.0;
  f.top_sources = std::move(sources);
  return f;
}

}  // namespace dewmargin::report
