#include <gtest/gtest.h>

#include <vector>

#include "dewmargin/tick_driver.h"

namespace dewmargin {
namespace {

constexpr std::int64_t k_t0_ms = 1'800'000'000'000;
timestamp at_s(double s) { return from_unix_ms(k_t0_ms + static_cast<std::int64_t>(s * 1000.0)); }

std::vector<double> ticks_until(tick_driver& d, timestamp t) {
  std::vector<double> seen;
  d.advance_to(t, [&](timestamp at) { seen.push_back(seconds_between(at_s(0), at)); });
  return seen;
}

TEST(TickDriver, TicksEveryWholeSecondAfterStartUpToAndIncludingT) {
  tick_driver d(at_s(0));
  EXPECT_TRUE(ticks_until(d, at_s(0.999)).empty());
  EXPECT_EQ(ticks_until(d, at_s(1)), (std::vector<double>{1}));
  EXPECT_EQ(ticks_until(d, at_s(4.5)), (std::vector<double>{2, 3, 4}));
  EXPECT_EQ(ticks_until(d, at_s(4.9)), (std::vector<double>{}));
  EXPECT_EQ(d.next_tick(), at_s(5));
}

TEST(TickDriver, TimeStandingStillOrGoingBackTicksNothing) {
  tick_driver d(at_s(0));
  EXPECT_EQ(ticks_until(d, at_s(3)).size(), 3u);
  EXPECT_TRUE(ticks_until(d, at_s(3)).empty());
  EXPECT_TRUE(ticks_until(d, at_s(-100)).empty());
  EXPECT_EQ(d.next_tick(), at_s(4));
}

TEST(TickDriver, AGapOfAnHourIsStillTickedSecondBySecond) {
  tick_driver d(at_s(0));
  // Next tick at 1 s; t at 3601 s is exactly one hour later: caught up tick by tick.
  EXPECT_EQ(d.advance_to(at_s(3601), [](timestamp) {}), 3601);
}

TEST(TickDriver, AJumpOfMoreThanAnHourTicksOnceAtTheNewTime) {
  tick_driver d(at_s(0));
  EXPECT_EQ(ticks_until(d, at_s(3601.001)), (std::vector<double>{3601.001}));
  // The seconds go on from the new time.
  EXPECT_EQ(ticks_until(d, at_s(3603.5)), (std::vector<double>{3602.001, 3603.001}));
  // A second jump, days later.
  EXPECT_EQ(ticks_until(d, at_s(3 * 86400.0)), (std::vector<double>{3 * 86400.0}));
}

TEST(TickDriver, FarFutureTimeIsBoundedToOneTick) {
  // A reading stamped decades ahead must not start billions of ticks.
  tick_driver d(at_s(0));
  EXPECT_EQ(d.advance_to(from_unix_ms(k_t0_ms + 40LL * 365 * 86400 * 1000), [](timestamp) {}), 1);
}

}  // namespace
}  // namespace dewmargin
