#include "dewmargin/margin_trend.h"

#include <algorithm>
#include <cstdint>

namespace dewmargin {
namespace {
// Too little data: fewer points than this, or spanning less than a fifth of the window.
constexpr std::size_t k_min_points = 4;
constexpr double k_min_span_fraction = 0.2;
// Slower falls than this (K/s, about 0.006 K/min) count as "not falling".
constexpr double k_min_fall_k_per_s = 1e-4;
// Point times are offsets from a base; past this offset (about 12 days) the base moves up.
constexpr std::int64_t k_rebase_after_ms = std::int64_t{1} << 30;
}  // namespace

void margin_trend::rebase(std::int64_t t_ms) {
  // Points older than the window are never read again: the ones that would not fit the
  // new base are let go (they are the oldest, at the tail of the ring).
  const auto window_ms = static_cast<std::int64_t>(window_s_ * 1000.0);
  const std::int64_t new_base_ms = t_ms - std::min<std::int64_t>(window_ms, k_rebase_after_ms / 2);
  std::size_t kept = 0;
  for (; kept < count_; ++kept) {
    const point& p = ring_[(head_ + k_capacity - 1 - kept) % k_capacity];
    if (t_ms_of(p) < new_base_ms) break;
  }
  for (std::size_t i = 0; i < kept; ++i) {
    point& p = ring_[(head_ + k_capacity - 1 - i) % k_capacity];
    p.dt_ms = static_cast<std::int32_t>(t_ms_of(p) - new_base_ms);
  }
  count_ = kept;
  base_ms_ = new_base_ms;
}

void margin_trend::add(timestamp t, double margin_k) {
  memo_.valid = false;
  const std::int64_t t_ms = to_unix_ms(t);
  if (count_ == 0) base_ms_ = t_ms;
  if (t_ms < base_ms_) return;  // older than anything kept: out of order
  if (t_ms - base_ms_ >= k_rebase_after_ms) rebase(t_ms);
  const auto spacing_ms = std::max<std::int64_t>(1, static_cast<std::int64_t>(spacing_s_ * 1000.0));
  const point now{static_cast<std::int32_t>(t_ms - base_ms_), static_cast<float>(margin_k)};
  if (count_ > 0) {
    point& last = ring_[(head_ + k_capacity - 1) % k_capacity];
    const std::int64_t last_ms = t_ms_of(last);
    if (t_ms < last_ms) return;  // out of order: ignore
    // One point per spacing bucket, the latest reading of the bucket.
    if (t_ms / spacing_ms == last_ms / spacing_ms) {
      last = now;
      return;
    }
  }
  ring_[head_] = now;
  head_ = (head_ + 1) % k_capacity;
  if (count_ < k_capacity) ++count_;
}

std::optional<double> margin_trend::minutes_to_condensation(timestamp now) const {
  const std::int64_t now_ms = to_unix_ms(now);
  if (memo_.valid && memo_.now_ms == now_ms) {
    return memo_.has_minutes ? std::optional<double>(memo_.minutes) : std::nullopt;
  }
  const std::optional<double> minutes = fit_minutes(now_ms);
  memo_ = {true, minutes.has_value(), now_ms, minutes.value_or(0.0)};
  return minutes;
}

std::optional<double> margin_trend::fit_minutes(std::int64_t now_ms) const {
  if (count_ == 0) return std::nullopt;
  const auto window_ms = static_cast<std::int64_t>(window_s_ * 1000.0);
  const point& newest = ring_[(head_ + k_capacity - 1) % k_capacity];
  if (newest.margin_k <= 0.0F) return 0.0;

  // Least squares over the points inside the window, times relative to `now` in seconds.
  double n = 0, sum_t = 0, sum_m = 0, sum_tt = 0, sum_tm = 0;
  std::int64_t oldest_ms = now_ms;
  for (std::size_t i = 0; i < count_; ++i) {
    const point& p = ring_[(head_ + k_capacity - 1 - i) % k_capacity];
    const std::int64_t p_ms = t_ms_of(p);
    if (now_ms - p_ms > window_ms) break;
    const double t = static_cast<double>(p_ms - now_ms) / 1000.0;
    const double m = p.margin_k;
    n += 1;
    sum_t += t;
    sum_m += m;
    sum_tt += t * t;
    sum_tm += t * m;
    oldest_ms = p_ms;
  }
  if (n < static_cast<double>(k_min_points)) return std::nullopt;
  if (static_cast<double>(t_ms_of(newest) - oldest_ms) < k_min_span_fraction * window_s_ * 1000.0) return std::nullopt;
  const double denom = n * sum_tt - sum_t * sum_t;
  if (denom <= 0.0) return std::nullopt;
  const double slope_k_per_s = (n * sum_tm - sum_t * sum_m) / denom;
  if (slope_k_per_s > -k_min_fall_k_per_s) return std::nullopt;
  // Extrapolate from the fitted value at `now` rather than the last noisy reading.
  const double fitted_now = (sum_m - slope_k_per_s * sum_t) / n;
  if (fitted_now <= 0.0) return 0.0;
  return fitted_now / -slope_k_per_s / 60.0;
}

}  // namespace dewmargin
