#pragma once
// Alarm-system performance in the terms of ANSI/ISA-18.2 and EEMUA 191, from the alarms raised
// in the period. Targets, as published for one operator (EEMUA 191; ISA-18.2 uses the same
// figures): about 150 alarms a day ("very likely to be acceptable"), about 1 per 10 minutes on
// average; a flood starts with more than 10 alarms in 10 minutes and ends when a 10-minute period
// has fewer than 5; less than 1 % of 10-minute periods in flood; chattering: 3 or more alarms of
// one source within one minute; stale: active for more than 24 hours.
#include <string>
#include <vector>

#include "dewmargin/report/zone_review.h"

namespace dewmargin::report {

inline constexpr double k_target_alarms_per_day = 150.0;
inline constexpr double k_target_alarms_per_10min = 1.0;
inline constexpr int k_flood_start_alarms = 10;  // more than this in 10 minutes starts a flood
inline constexpr int k_flood_end_alarms = 5;     // fewer than this in 10 minutes ends it
inline constexpr double k_target_flood_pct = 1.0;
inline constexpr int k_chatter_alarms = 3;  // this many within k_chatter_window_s
inline constexpr double k_chatter_window_s = 60.0;
inline constexpr double k_stale_alarm_s = 24.0 * 3600.0;

struct source_share {
  std::string source;
  int alarms = 0;
  double share_pct = 0.0;
};

struct alarm_figures {
  int alarms = 0;
  double period_days = 0.0;
  double per_day_avg = 0.0;
  int per_day_peak = 0;
  timestamp peak_day;
  int periods_10min = 0;
  double per_10min_avg = 0.0;
  int per_10min_peak = 0;
  timestamp peak_10min;
  int flood_periods = 0;
  double flood_pct = 0.0;
  int floods = 0;  // separate floods
  int chattering_sources = 0;
  int chattering_episodes = 0;
  int stale_alarms = 0;
  std::vector<source_share> top_sources;  // at most ten, most alarms first
  int shelved = 0;
  int suppressed = 0;
};

[[nodiscard]] alarm_figures compute_alarm_figures(const std::vector<zone_review>& zones, timestamp since,
                                                  timestamp until);

// Chattering episodes in one source's sorted raise times: each a run of k_chatter_alarms or more
// within k_chatter_window_s; the next episode starts after the window of the previous one.
[[nodiscard]] int chattering_episodes(const std::vector<timestamp>& sorted_raises);

// 10-minute periods in flood, given the count of alarms in each consecutive period.
[[nodiscard]] int flood_periods(const std::vector<int>& alarms_per_10min, int* floods = nullptr);

}  // namespace dewmargin::report
