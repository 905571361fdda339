#pragma once
// Rule: tick every second of event time up to t; a jump of more than an hour ticks once.
//
// The engine's once-a-second tick(now) follows the time of the readings wherever time is
// not the wall clock: the service in event-time mode, `dewmargin replay`, the test
// fixtures and the simulator. They all drive it through this one class, so that a recorded
// stream gives the same events everywhere. Ticks fall on whole seconds after `start`
// (start + 1 s, start + 2 s, ...). A gap of more than k_max_tick_catch_up (a sensor feed
// that stopped overnight, a recording with holes) is not replayed second by second: it
// gives one tick at the new time, and the seconds go on from there.
#include <chrono>
#include <functional>

#include "dewmargin/timestamp.h"

namespace dewmargin {

inline constexpr std::chrono::seconds k_tick_interval{1};
inline constexpr std::chrono::hours k_max_tick_catch_up{1};

class tick_driver {
 public:
  explicit tick_driver(timestamp start) : next_tick_(start + k_tick_interval) {}

  // Calls tick(at) once for every tick due up to and including t; returns how many. A `t`
  // before the next tick (time standing still or going back) ticks nothing.
  int advance_to(timestamp t, const std::function<void(timestamp)>& tick);

  [[nodiscard]] timestamp next_tick() const { return next_tick_; }

 private:
  timestamp next_tick_;
};

}  // namespace dewmargin
