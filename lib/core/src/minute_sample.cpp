#include "dewmargin/minute_sample.h"

namespace dewmargin {

std::optional<zone_sample> minute_sampler::add(timestamp now, const zone_margin& m, band current,
                                               const std::string& zone) {
  std::optional<zone_sample> finished;
  const std::int64_t minute = to_unix_ms(now) / 60000;
  if (minute_ != minute) {
    if (minute_ >= 0) finished = sample(m, zone);
    *this = minute_sampler{};
    minute_ = minute;
  }
  if (m.margin_k && (!min_margin_k_ || *m.margin_k < *min_margin_k_)) min_margin_k_ = m.margin_k;
  if (m.dew_point_c && (!max_dew_point_c_ || *m.dew_point_c > *max_dew_point_c_)) max_dew_point_c_ = m.dew_point_c;
  if (band_severity(current) > band_severity(worst_)) worst_ = current;
  return finished;
}

std::optional<zone_sample> minute_sampler::close(const zone_margin& m, const std::string& zone) {
  if (minute_ < 0) return std::nullopt;
  zone_sample s = sample(m, zone);
  *this = minute_sampler{};
  return s;
}

zone_sample minute_sampler::sample(const zone_margin& m, const std::string& zone) const {
  zone_sample s;
  s.minute_start = from_unix_ms(minute_ * 60000);
  s.zone = zone;
  s.min_margin_k = min_margin_k_;
  s.max_dew_point_c = max_dew_point_c_;
  s.worst_band = band_name(worst_);
  s.air_temp_c = m.air_temp_c;
  s.rh_pct = m.rh_pct;
  s.surface_min_c = m.surface_min_c;
  s.supply_c = m.supply_c;
  return s;
}

}  // namespace dewmargin
