#include "dewmargin/report/series.h"

#include <algorithm>

namespace dewmargin::report {

std::size_t series_layout::index_of(timestamp t) const {
  if (t <= origin || count == 0) return 0;
  return std::min(count - 1, static_cast<std::size_t>((t - origin) / bucket));
}

series_layout layout_for(timestamp since, timestamp until, std::size_t max_buckets) {
  static constexpr int k_round_minutes[] = {1, 2, 5, 10, 15, 30, 60, 120, 180, 360, 720, 1440, 2880, 10080};
  series_layout l;
  l.since = since;
  l.until = std::max(until, since + std::chrono::minutes{1});
  const auto span_min = std::chrono::duration_cast<std::chrono::minutes>(l.until - l.since).count();
  max_buckets = std::max<std::size_t>(1, max_buckets);
  l.bucket = std::chrono::minutes{k_round_minutes[std::size(k_round_minutes) - 1]};
  for (const int m : k_round_minutes) {
    if (static_cast<std::size_t>((span_min + m - 1) / m) <= max_buckets) {
      l.bucket = std::chrono::minutes{m};
      break;
    }
  }
  l.origin = l.since;
  if (l.whole_hours()) {
    constexpr std::int64_t k_hour_ms = 3'600'000;
    const std::int64_t since_ms = to_unix_ms(l.since);
    l.origin = from_unix_ms(since_ms - (((since_ms % k_hour_ms) + k_hour_ms) % k_hour_ms));
  }
  const auto grid_min = std::chrono::duration_cast<std::chrono::minutes>(l.until - l.origin).count();
  l.count = static_cast<std::size_t>((grid_min + l.bucket.count() - 1) / l.bucket.count());
  return l;
}

zone_series::zone_series(std::string zone, const series_layout& layout) : layout_(layout) {
  buckets_.reserve(layout.count);
  for (std::size_t i = 0; i < layout.count; ++i) buckets_.push_back(empty_period(zone, layout.start_of(i), 0));
  total_ = empty_period(std::move(zone), layout.since, 0);
}

void zone_series::add(const zone_period& p) {
  zone_period& b = buckets_[layout_.index_of(p.start)];
  if (b.sample_minutes == 0 && b.length_min == 0) b.start = p.start;
  merge_period(b, p);
}

void zone_series::absorb(const zone_series& later) {
  for (std::size_t i = 0; i < buckets_.size() && i < later.buckets_.size(); ++i) {
    const zone_period& l = later.buckets_[i];
    if (l.sample_minutes == 0) continue;
    zone_period& b = buckets_[i];
    if (b.sample_minutes == 0 && b.length_min == 0) b.start = l.start;
    merge_period(b, l);
  }
}

void zone_series::finish() {
  for (const zone_period& b : buckets_) {
    if (b.sample_minutes > 0) merge_period(total_, b);
  }
}

}  // namespace dewmargin::report
