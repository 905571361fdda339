#pragma once
// The service's wall time, which never goes backwards. Rule: time = the system clock, except
// that after the system clock steps back (NTP correcting a fast clock, a manual `date`, a
// restored VM snapshot) the service's time keeps running from the monotonic clock, at 90 % of
// its rate, until the system clock has caught up. A step forward is taken at once.
//
// Why: the core rejects a reading older than its input's last one, and its timers (staleness,
// confirmation, reopen delays) run on this time. Were it to follow a backward step, every
// reading would be refused as out of order and every timer would stand still for as long as the
// step: supervision frozen while the states still showed the old bands.
#include <chrono>
#include <optional>

#include "dewmargin/timestamp.h"

namespace dewmargin {

class forward_clock {
 public:
  // `wall`: the system clock now; `steady`: a monotonic clock now (any epoch).
  timestamp now(timestamp wall, std::chrono::steady_clock::time_point steady);

  // How far the service's time last ran ahead of the system clock (0 when in step).
  [[nodiscard]] std::chrono::milliseconds ahead() const { return ahead_; }

 private:
  // Nanoseconds, so that many calls a millisecond apart still add up.
  std::optional<std::chrono::time_point<std::chrono::system_clock, std::chrono::nanoseconds>> last_;
  std::chrono::steady_clock::time_point last_steady_{};
  std::chrono::milliseconds ahead_{0};
};

}  // namespace dewmargin
