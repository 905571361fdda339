#pragma once
// Decides when a retained state is republished: at once on a significant change
// (band, alarm, valve, setpoint), otherwise at most once per min_interval_s and only
// when a value moved by 0.05 or more (or appeared/disappeared) — never once per reading.
#include <array>
#include <cmath>
#include <cstddef>
#include <optional>

#include "dewmargin/timestamp.h"

namespace dewmargin {

template <std::size_t N>
class change_gate {
 public:
  static constexpr double k_min_move = 0.05;
  using values = std::array<std::optional<double>, N>;

  // True when the state should go out now. Call commit() after publishing.
  [[nodiscard]] bool should_publish(bool significant, const values& v, timestamp now, double min_interval_s) const {
    if (!last_ts_ || significant) return true;
    if (seconds_between(*last_ts_, now) < min_interval_s) return false;
    return moved(v);
  }
  // True when a value appeared or disappeared since the last publication (null to a number
  // or back): that is news at once, not after min_interval_s.
  [[nodiscard]] bool presence_changed(const values& v) const {
    if (!last_ts_) return true;
    for (std::size_t i = 0; i < N; ++i) {
      if (v[i].has_value() != last_[i].has_value()) return true;
    }
    return false;
  }
  void commit(const values& v, timestamp now) {
    last_ = v;
    last_ts_ = now;
  }

 private:
  [[nodiscard]] bool moved(const values& v) const {
    for (std::size_t i = 0; i < N; ++i) {
      if (v[i].has_value() != last_[i].has_value()) return true;
      if (v[i] && std::fabs(*v[i] - *last_[i]) >= k_min_move - 1e-9) return true;
    }
    return false;
  }

  values last_{};
  std::optional<timestamp> last_ts_;
};

}  // namespace dewmargin
