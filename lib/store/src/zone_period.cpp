#include "dewmargin/zone_period.h"

#include <algorithm>

#include "dewmargin/psychro.h"

namespace dewmargin {
namespace {

void keep_min(std::optional<double>& into, const std::optional<double>& v) {
  if (v && (!into || *v < *into)) into = v;
}
void keep_max(std::optional<double>& into, const std::optional<double>& v) {
  if (v && (!into || *v > *into)) into = v;
}
minute_mean one_minute(const std::optional<double>& v) { return v ? minute_mean{*v, 1} : minute_mean{}; }

}  // namespace

void minute_mean::add(const minute_mean& other) {
  if (other.minutes <= 0) return;
  const std::int32_t total = minutes + other.minutes;
  mean = (mean * minutes + other.mean * other.minutes) / total;
  minutes = total;
}

std::optional<band> band_from_name(std::string_view name) {
  for (const band b : {band::safe, band::tight, band::alarm, band::condensing, band::unknown}) {
    if (name == band_name(b)) return b;
  }
  return std::nullopt;
}

zone_period empty_period(std::string zone, timestamp start, std::int32_t length_min) {
  zone_period p;
  p.zone = std::move(zone);
  p.start = start;
  p.length_min = length_min;
  return p;
}

zone_period period_of(const zone_sample& s) {
  zone_period p;
  assign_period_of(s, p);
  return p;
}

void assign_period_of(const zone_sample& s, zone_period& p) {
  std::string zone = std::move(p.zone);
  zone.assign(s.zone);
  p = zone_period{};
  p.zone = std::move(zone);
  p.start = s.minute_start;
  p.length_min = 1;
  p.sample_minutes = 1;
  p.min_margin_k = s.min_margin_k;
  p.min_margin_at = s.minute_start;
  p.max_margin_k = s.min_margin_k;
  p.mean_margin_k = one_minute(s.min_margin_k);
  p.max_dew_point_c = s.max_dew_point_c;
  p.mean_dew_point_c = one_minute(s.max_dew_point_c);
  p.min_surface_c = s.surface_min_c;
  p.mean_surface_c = one_minute(s.surface_min_c);
  p.mean_air_temp_c = one_minute(s.air_temp_c);
  p.mean_rh_pct = one_minute(s.rh_pct);
  p.mean_supply_c = one_minute(s.supply_c);
  std::optional<double> surface_rh = s.surface_rh_pct;
  if (!surface_rh && s.air_temp_c && s.rh_pct && s.surface_min_c) {
    const auto computed = psychro::surface_rh_pct(*s.air_temp_c, *s.rh_pct, *s.surface_min_c);
    if (computed) surface_rh = computed.value();
  }
  p.max_surface_rh_pct = surface_rh;
  p.mean_surface_rh_pct = one_minute(surface_rh);
  // A minute of an unreadable band counts as unknown (the worst), never as safe.
  const band b = band_from_name(s.worst_band).value_or(band::unknown);
  p.band_minutes[static_cast<std::size_t>(band_severity(b))] = 1;
  const std::int32_t mould = surface_rh && *surface_rh >= k_mould_surface_rh_pct ? 1 : 0;
  p.mould_minutes = p.mould_head_min = p.mould_tail_min = p.mould_longest_min = mould;
}

void merge_period(zone_period& into, const zone_period& later) {
  const auto gap_min = std::chrono::duration_cast<std::chrono::minutes>(later.start - into.end()).count();
  const bool contiguous = gap_min == 0;
  const bool inside = later.end() <= into.end();  // a late sample for an hour already rolled up
  const std::int32_t old_tail = into.mould_tail_min;
  const std::int32_t head = contiguous && into.mould_head_min == into.length_min
                                ? into.length_min + later.mould_head_min
                                : into.mould_head_min;
  const std::int32_t tail = contiguous && later.mould_tail_min == later.length_min
                                ? later.length_min + into.mould_tail_min
                                : later.mould_tail_min;
  into.mould_longest_min = std::max(
      {into.mould_longest_min, later.mould_longest_min, contiguous ? into.mould_tail_min + later.mould_head_min : 0});
  into.mould_head_min = head;
  into.mould_tail_min = tail;
  into.mould_minutes += later.mould_minutes;

  if (later.min_margin_k && (!into.min_margin_k || *later.min_margin_k < *into.min_margin_k)) {
    into.min_margin_k = later.min_margin_k;
    into.min_margin_at = later.min_margin_at;
  }
  keep_max(into.max_margin_k, later.max_margin_k);
  into.mean_margin_k.add(later.mean_margin_k);
  keep_max(into.max_dew_point_c, later.max_dew_point_c);
  into.mean_dew_point_c.add(later.mean_dew_point_c);
  keep_min(into.min_surface_c, later.min_surface_c);
  into.mean_surface_c.add(later.mean_surface_c);
  into.mean_air_temp_c.add(later.mean_air_temp_c);
  into.mean_rh_pct.add(later.mean_rh_pct);
  into.mean_supply_c.add(later.mean_supply_c);
  keep_max(into.max_surface_rh_pct, later.max_surface_rh_pct);
  into.mean_surface_rh_pct.add(later.mean_surface_rh_pct);
  for (std::size_t b = 0; b < into.band_minutes.size(); ++b) into.band_minutes[b] += later.band_minutes[b];
  into.sample_minutes += later.sample_minutes;
  const timestamp end = std::max(into.end(), later.end());
  into.length_min =
      static_cast<std::int32_t>(std::chrono::duration_cast<std::chrono::minutes>(end - into.start).count());
  if (inside && !contiguous) into.mould_tail_min = old_tail;
}

}  // namespace dewmargin
