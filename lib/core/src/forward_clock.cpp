#include "dewmargin/forward_clock.h"

#include <algorithm>

namespace dewmargin {

timestamp forward_clock::now(timestamp wall, std::chrono::steady_clock::time_point steady) {
  using std::chrono::milliseconds;
  using std::chrono::nanoseconds;
  const auto wall_ns = std::chrono::time_point_cast<nanoseconds>(wall);
  if (!last_) {
    last_ = wall_ns;
    last_steady_ = steady;
    ahead_ = milliseconds(0);
    return wall;
  }
  auto run = std::chrono::duration_cast<nanoseconds>(
      std::max(steady - last_steady_, std::chrono::steady_clock::duration::zero()));
  last_steady_ = steady;
  // Ahead of the system clock: run a little slower, so that the two meet again.
  if (*last_ > wall_ns) run = run * 9 / 10;
  last_ = std::max(wall_ns, *last_ + run);
  const timestamp t = std::chrono::time_point_cast<milliseconds>(*last_);
  ahead_ = t > wall ? std::chrono::duration_cast<milliseconds>(t - wall) : milliseconds(0);
  return t;
}

}  // namespace dewmargin
