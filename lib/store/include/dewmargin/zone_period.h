#pragma once
// One zone over one period: a stored per-minute sample, an hour rolled up from such samples, or
// a report's chart bucket merged from either. Merging keeps exactly what a review needs from
// the minutes: the lowest margin and its minute, the highest dew point, the coldest surface, the
// minutes in each band (by the worst band of each minute) and the mould figures (minutes with
// surface RH at or above 80 % and the runs of them, which chain across periods). Means are
// weighted by the minutes that had a value.
#include <array>
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>

#include "dewmargin/band.h"
#include "dewmargin/engine_output.h"
#include "dewmargin/timestamp.h"

namespace dewmargin {

inline constexpr int k_band_count = 5;  // safe, tight, alarm, condensing, unknown (band's order)
// Surface RH at or above which a minute counts for mould growth (EN ISO 13788, as summarised in
// BS 5250 Annex D: surface RH should not stay at or above 80 % for several days).
inline constexpr double k_mould_surface_rh_pct = 80.0;

// A mean over the minutes that had a value.
struct minute_mean {
  double mean = 0.0;
  std::int32_t minutes = 0;
  [[nodiscard]] std::optional<double> value() const { return minutes > 0 ? std::optional<double>(mean) : std::nullopt; }
  void add(const minute_mean& other);
};

struct zone_period {
  std::string zone;
  timestamp start;
  std::int32_t length_min = 0;      // 1 for a sample, 60 for an hour; a bucket spans its parts
  std::int32_t sample_minutes = 0;  // minutes with a stored sample
  std::optional<double> min_margin_k;
  timestamp min_margin_at;  // start of the minute of the lowest margin (when min_margin_k is set)
  std::optional<double> max_margin_k;
  minute_mean mean_margin_k;
  std::optional<double> max_dew_point_c;
  minute_mean mean_dew_point_c;
  std::optional<double> min_surface_c;  // the coldest surface
  minute_mean mean_surface_c;
  minute_mean mean_air_temp_c;
  minute_mean mean_rh_pct;
  minute_mean mean_supply_c;
  std::optional<double> max_surface_rh_pct;
  minute_mean mean_surface_rh_pct;
  std::array<std::int32_t, k_band_count> band_minutes{};  // by the worst band of each minute
  std::int32_t mould_minutes = 0;                         // minutes with surface RH >= 80 %
  std::int32_t mould_head_min = 0;                        // of those, the run that starts at the period's start
  std::int32_t mould_tail_min = 0;                        // ... and the run that ends at its end
  std::int32_t mould_longest_min = 0;                     // the longest run inside the period

  [[nodiscard]] timestamp end() const { return start + std::chrono::minutes{length_min}; }
};

// "safe" ... "unknown" → band; nullopt for any other text.
[[nodiscard]] std::optional<band> band_from_name(std::string_view name);

// A stored per-minute sample as a one-minute period. A sample without a surface RH (written
// before the engine filled it) gets one computed from its air temperature, RH and coldest
// surface (psychro::surface_rh_pct); without a surface temperature it has none.
[[nodiscard]] zone_period period_of(const zone_sample& sample);
// The same into `out`, reusing its zone string's buffer (readers of millions of rows).
void assign_period_of(const zone_sample& sample, zone_period& out);

// An empty period of `length_min` minutes (sample_minutes 0): the start of a roll-up or bucket.
[[nodiscard]] zone_period empty_period(std::string zone, timestamp start, std::int32_t length_min);

// Adds `later` (the same zone, starting at or after `into`'s start) to `into`. `into` grows to
// cover `later`; a mould run chains only when `later` starts where `into` ends and both runs
// touch that boundary. Overlapping periods (a late sample for an hour already rolled up) are
// summed, but their runs are not chained.
void merge_period(zone_period& into, const zone_period& later);

}  // namespace dewmargin
