// The service's wall time never goes backwards (forward_clock.h states the rule).
#include <gtest/gtest.h>

#include "dewmargin/forward_clock.h"

namespace dewmargin {
namespace {

using std::chrono::milliseconds;
using std::chrono::seconds;

constexpr std::int64_t k_t0_ms = 1'800'000'000'000;
timestamp wall_at(std::int64_t ms) { return from_unix_ms(k_t0_ms + ms); }
std::chrono::steady_clock::time_point steady_at(std::int64_t ms) {
  return std::chrono::steady_clock::time_point(milliseconds(5'000'000 + ms));
}

TEST(ForwardClock, FollowsTheSystemClockWhileItRunsForward) {
  forward_clock c;
  EXPECT_EQ(c.now(wall_at(0), steady_at(0)), wall_at(0));
  EXPECT_EQ(c.now(wall_at(1000), steady_at(1000)), wall_at(1000));
  // A step forward (NTP after boot) is taken at once.
  EXPECT_EQ(c.now(wall_at(3'600'000), steady_at(2000)), wall_at(3'600'000));
  EXPECT_EQ(c.ahead(), milliseconds(0));
}

TEST(ForwardClock, AStepBackKeepsTimeRunningAndConvergesAtNinetyPercent) {
  forward_clock c;
  (void)c.now(wall_at(3'600'000), steady_at(0));
  // The system clock steps back by an hour; 10 s pass on the monotonic clock.
  const timestamp t = c.now(wall_at(10'000), steady_at(10'000));
  EXPECT_EQ(t, wall_at(3'600'000 + 9'000)) << "never backwards, and still running";
  EXPECT_EQ(c.ahead(), milliseconds(3'599'000));
  // Many calls a fraction of a millisecond apart still add up (no frozen time).
  forward_clock d;
  (void)d.now(wall_at(3'600'000), steady_at(0));
  auto steady = steady_at(0);
  timestamp last = wall_at(0);
  for (int i = 0; i < 10'000; ++i) {
    steady += std::chrono::microseconds(100);
    last = d.now(wall_at(0), steady);
  }
  EXPECT_EQ(last, wall_at(3'600'000 + 900));  // 1 s of steady time at 90 %
  // The system clock catches up: in step again.
  EXPECT_EQ(c.now(wall_at(3'700'000), steady_at(20'000)), wall_at(3'700'000));
  EXPECT_EQ(c.ahead(), milliseconds(0));
}

TEST(ForwardClock, AMonotonicClockThatDoesNotMoveAddsNothing) {
  forward_clock c;
  (void)c.now(wall_at(5000), steady_at(100));
  EXPECT_EQ(c.now(wall_at(0), steady_at(100)), wall_at(5000));
  EXPECT_EQ(c.now(wall_at(0), steady_at(50)), wall_at(5000)) << "a steady clock never runs back, but if it did";
}

}  // namespace
}  // namespace dewmargin
