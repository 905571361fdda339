#pragma once
// Time to condensation: the least-squares slope of a zone's margin over a window,
// extrapolated to zero. Samples are thinned to one per window/60 so that memory and
// work stay bounded however often a sensor reports.
#include <array>
#include <cstddef>
#include <cstdint>
#include <optional>

#include "dewmargin/timestamp.h"

namespace dewmargin {

class margin_trend {
 public:
  static constexpr std::size_t k_capacity = 64;

  explicit margin_trend(double window_s) : window_s_(window_s), spacing_s_(window_s / 60.0) {}

  void add(timestamp t, double margin_k);
  void clear() {
    count_ = 0;
    memo_.valid = false;
  }

  // Minutes until the margin reaches zero at the current rate of fall; 0 when it is
  // already at or below zero; empty when it is not falling or data span too little.
  [[nodiscard]] std::optional<double> minutes_to_condensation(timestamp now) const;

 private:
  // 8 bytes a point, not 16: one ring per zone was half of a zone's state. The time is kept
  // in ms after base_ms_ (moved forward every few days), the margin as a float (7 digits of
  // a margin of tens of kelvin: far below any sensor's resolution).
  struct point {
    std::int32_t dt_ms;
    float margin_k;
  };
  [[nodiscard]] std::int64_t t_ms_of(const point& p) const { return base_ms_ + p.dt_ms; }
  void rebase(std::int64_t t_ms);
  [[nodiscard]] std::optional<double> fit_minutes(std::int64_t now_ms) const;

  double window_s_;
  double spacing_s_;
  std::int64_t base_ms_ = 0;
  std::array<point, k_capacity> ring_{};
  // The last answer of minutes_to_condensation and its time: a zone's evaluation asks twice
  // (its valve, its state) for the same instant. add() and clear() forget it.
  // Plain fields, not an optional of an optional: the query is on the tick's hot path.
  struct memo {
    bool valid = false;
    bool has_minutes = false;
    std::int64_t now_ms = 0;
    double minutes = 0.0;
  };
  mutable memo memo_;
  std::size_t head_ = 0;  // index of the next write
  std::size_t count_ = 0;
};

}  // namespace dewmargin
