#include "dewmargin/tick_driver.h"

namespace dewmargin {

int tick_driver::advance_to(timestamp t, const std::function<void(timestamp)>& tick) {
  if (t - next_tick_ > k_max_tick_catch_up) next_tick_ = t;
  int ticks = 0;
  while (next_tick_ <= t) {
    tick(next_tick_);
    ++ticks;
    next_tick_ += k_tick_interval;
  }
  return ticks;
}

}  // namespace dewmargin
