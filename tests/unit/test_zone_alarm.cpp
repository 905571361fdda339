#include <gtest/gtest.h>

#include <string>
#include <vector>

#include "dewmargin/zone_alarm.h"

namespace dewmargin {
namespace {

const timestamp k_t0 = from_unix_ms(1'784'030'400'000);  // 2026-07-14T12:00:00Z

// The four ISA-18.2 states as (active, acknowledged).
struct isa_state {
  bool active;
  bool acknowledged;
};
constexpr isa_state k_normal{false, true};
constexpr isa_state k_unacknowledged{true, false};
constexpr isa_state k_acknowledged{true, true};
constexpr isa_state k_latched{false, false};  // returned to normal, not yet acknowledged

void expect_state(const zone_alarm& a, isa_state s, const std::string& where) {
  EXPECT_EQ(a.status().active, s.active) << where;
  EXPECT_EQ(a.status().acknowledged, s.acknowledged) << where;
}

TEST(ZoneAlarm, StartsNormal) {
  const zone_alarm a;
  expect_state(a, k_normal, "fresh");
  EXPECT_FALSE(a.status().shelved_until.has_value());
}

TEST(ZoneAlarm, GoesUnacknowledgedAcknowledgedNormal) {
  zone_alarm a;
  a.on_band(band::alarm, true);
  expect_state(a, k_unacknowledged, "alarm raised");
  EXPECT_EQ(a.acknowledge(), "");
  expect_state(a, k_acknowledged, "acknowledged");
  a.on_band(band::safe, true);
  expect_state(a, k_normal, "cleared after acknowledgement");
}

TEST(ZoneAlarm, LatchesWhenItClearsUnacknowledgedUntilAcknowledged) {
  zone_alarm a;
  a.on_band(band::condensing, true);
  a.on_band(band::tight, true);
  expect_state(a, k_latched, "cleared while unacknowledged");
  a.on_band(band::safe, true);
  expect_state(a, k_latched, "still latched");
  EXPECT_EQ(a.acknowledge(), "");
  expect_state(a, k_normal, "latched alarm acknowledged");
}

TEST(ZoneAlarm, ALatchedAlarmThatReturnsIsUnacknowledgedAgain) {
  zone_alarm a;
  a.on_band(band::alarm, true);
  a.on_band(band::safe, true);
  a.on_band(band::alarm, true);
  expect_state(a, k_unacknowledged, "returned before acknowledgement");
}

TEST(ZoneAlarm, SafeAndTightAreNoAlarmCondition) {
  for (band b : {band::safe, band::tight}) {
    zone_alarm a;
    a.on_band(b, true);
    expect_state(a, k_normal, band_name(b));
  }
}

struct rearm_case {
  const char* name;
  band first;
  band second;
  isa_state expected;
};

TEST(ZoneAlarm, ReArmsAnAcknowledgedAlarmOnAWorseBandOnly) {
  const std::vector<rearm_case> cases = {
      {"alarm to condensing", band::alarm, band::condensing, k_unacknowledged},
      {"alarm to unknown", band::alarm, band::unknown, k_unacknowledged},
      {"condensing to unknown", band::condensing, band::unknown, k_unacknowledged},
      {"condensing to alarm", band::condensing, band::alarm, k_acknowledged},
      {"unknown to condensing", band::unknown, band::condensing, k_acknowledged},
      {"unknown to alarm", band::unknown, band::alarm, k_acknowledged},
      {"alarm to alarm", band::alarm, band::alarm, k_acknowledged},
  };
  for (const auto& c : cases) {
    zone_alarm a;
    a.on_band(c.first, true);
    ASSERT_EQ(a.acknowledge(), "") << c.name;
    a.on_band(c.second, true);
    expect_state(a, c.expected, c.name);
  }
}

TEST(ZoneAlarm, ReArmsAfterComingBackDownAndWorseningAgain) {
  // The band that raised the alarm follows the zone: condensing → alarm → condensing
  // enters a worse band again.
  zone_alarm a;
  a.on_band(band::condensing, true);
  ASSERT_EQ(a.acknowledge(), "");
  a.on_band(band::alarm, true);
  expect_state(a, k_acknowledged, "improved to alarm");
  a.on_band(band::condensing, true);
  expect_state(a, k_unacknowledged, "condensing again");
}

TEST(ZoneAlarm, CountsUnknownOnlyWhenAsked) {
  zone_alarm waiting;
  waiting.on_band(band::unknown, false);
  expect_state(waiting, k_normal, "waiting for first readings");

  zone_alarm fault;
  fault.on_band(band::unknown, true);
  expect_state(fault, k_unacknowledged, "unknown as a fault");
}

TEST(ZoneAlarm, RejectsAnAcknowledgementWithNothingToAcknowledge) {
  zone_alarm a;
  EXPECT_EQ(a.acknowledge(), "nothing to acknowledge") << "normal";
  a.on_band(band::alarm, true);
  ASSERT_EQ(a.acknowledge(), "");
  EXPECT_EQ(a.acknowledge(), "nothing to acknowledge") << "already acknowledged";
  expect_state(a, k_acknowledged, "a rejected acknowledgement changes nothing");
}

struct shelve_case {
  int minutes;
  std::string reason;  // empty: accepted
};

TEST(ZoneAlarm, ShelvesForOneTo1440Minutes) {
  const std::vector<shelve_case> cases = {
      {-5, "minutes must be 1 to 1440"},   {0, "minutes must be 1 to 1440"}, {1, ""}, {1440, ""},
      {1441, "minutes must be 1 to 1440"},
  };
  for (const auto& c : cases) {
    zone_alarm a;
    EXPECT_EQ(a.shelve(c.minutes, k_t0), c.reason) << c.minutes << " min";
    if (c.reason.empty()) {
      ASSERT_TRUE(a.status().shelved_until.has_value()) << c.minutes << " min";
      EXPECT_EQ(*a.status().shelved_until, k_t0 + std::chrono::minutes(c.minutes));
    } else {
      EXPECT_FALSE(a.status().shelved_until.has_value()) << "a rejected shelve changes nothing, " << c.minutes;
    }
  }
}

TEST(ZoneAlarm, ShelvingEndsExactlyAtItsUntilTime) {
  zone_alarm a;
  ASSERT_EQ(a.shelve(1, k_t0), "");
  const timestamp until = k_t0 + std::chrono::minutes(1);
  const timestamp before = until - std::chrono::milliseconds(1);
  EXPECT_TRUE(a.shelved(before));
  EXPECT_FALSE(a.expire_shelving(before));
  EXPECT_TRUE(a.status().shelved_until.has_value());
  EXPECT_FALSE(a.shelved(until));
  EXPECT_TRUE(a.expire_shelving(until));
  EXPECT_FALSE(a.status().shelved_until.has_value());
  EXPECT_FALSE(a.expire_shelving(until + std::chrono::seconds(1))) << "expires once";
}

TEST(ZoneAlarm, KeepsTrackingWhileShelved) {
  zone_alarm a;
  ASSERT_EQ(a.shelve(30, k_t0), "");
  a.on_band(band::condensing, true);
  expect_state(a, k_unacknowledged, "shelving hides, it does not stop tracking");
  EXPECT_TRUE(a.shelved(k_t0 + std::chrono::minutes(1)));
}

TEST(ZoneAlarm, ReshelvingReplacesTheUntilTime) {
  zone_alarm a;
  ASSERT_EQ(a.shelve(60, k_t0), "");
  ASSERT_EQ(a.shelve(5, k_t0 + std::chrono::minutes(1)), "");
  EXPECT_EQ(*a.status().shelved_until, k_t0 + std::chrono::minutes(6));
}

TEST(ZoneAlarm, RejectsUnshelveWhenNotShelved) {
  zone_alarm a;
  EXPECT_EQ(a.unshelve(), "zone is not shelved");
  ASSERT_EQ(a.shelve(10, k_t0), "");
  EXPECT_EQ(a.unshelve(), "");
  EXPECT_FALSE(a.status().shelved_until.has_value());
  EXPECT_EQ(a.unshelve(), "zone is not shelved") << "already unshelved";
}

TEST(ZoneAlarm, RestoresStatusAndTheBandThatRaisedIt) {
  zone_alarm a;
  a.restore(alarm_status{true, true, k_t0 + std::chrono::minutes(5)}, band::alarm);
  expect_state(a, k_acknowledged, "restored");
  a.on_band(band::alarm, true);
  expect_state(a, k_acknowledged, "same band after restart does not re-arm");
  a.on_band(band::condensing, true);
  expect_state(a, k_unacknowledged, "worse band after restart re-arms");
}

}  // namespace
}  // namespace dewmargin
