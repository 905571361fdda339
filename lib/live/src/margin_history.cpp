#include "dewmargin/margin_history.h"

#include <algorithm>

namespace dewmargin::live {

margin_history::margin_history(std::chrono::seconds window, std::chrono::seconds bucket, std::size_t max_series)
    : window_(window), bucket_(bucket.count() > 0 ? bucket : std::chrono::seconds(1)), max_series_(max_series) {}

bool margin_history::add(const std::string& key, timestamp ts, std::optional<double> margin_k) {
  auto it = series_.find(key);
  if (it == series_.end()) {
    if (series_.size() >= max_series_) return false;
    it = series_.emplace(key, std::deque<stored>{}).first;
  }
  auto& points = it->second;
  const std::int64_t bucket_ms = std::chrono::duration_cast<std::chrono::milliseconds>(bucket_).count();
  const std::int64_t ms = to_unix_ms(ts);
  // Floor division, so times before 1970 (tests) fall in the right bucket too.
  const std::int64_t start = (ms >= 0 ? ms / bucket_ms : (ms - bucket_ms + 1) / bucket_ms) * bucket_ms;
  const stored p{start, static_cast<float>(margin_k.value_or(0.0)), margin_k.has_value()};
  if (!points.empty() && points.back().bucket_start_ms == start) {
    stored& last = points.back();
    if (p.known && (!last.known || p.margin_k < last.margin_k)) last = p;
  } else if (!points.empty() && points.back().bucket_start_ms > start) {
    // An older state (a clock that went back, a restored state): restart the series.
    points.clear();
    points.push_back(p);
  } else {
    points.push_back(p);
  }
  const std::int64_t window_ms = std::chrono::duration_cast<std::chrono::milliseconds>(window_).count();
  while (!points.empty() && points.front().bucket_start_ms < start - window_ms) points.pop_front();
  return true;
}

std::vector<margin_point> margin_history::series(const std::string& key) const {
  std::vector<margin_point> out;
  const auto it = series_.find(key);
  if (it == series_.end()) return out;
  out.reserve(it->second.size());
  for (const auto& p : it->second) {
    out.push_back({from_unix_ms(p.bucket_start_ms),
                   p.known ? std::optional<double>(static_cast<double>(p.margin_k)) : std::nullopt});
  }
  return out;
}

std::vector<std::string> margin_history::keys() const {
  std::vector<std::string> out;
  out.reserve(series_.size());
  for (const auto& [k, v] : series_) out.push_back(k);
  return out;
}

}  // namespace dewmargin::live
