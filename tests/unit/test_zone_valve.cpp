#include <gtest/gtest.h>

#include <optional>
#include <string>
#include <vector>

#include "dewmargin/zone_valve.h"

namespace dewmargin {
namespace {

constexpr double k_reopen_after_s = 600.0;
const timestamp k_t0 = from_unix_ms(1'784'030'400'000);  // 2026-07-14T12:00:00Z

timestamp at_ms(std::int64_t ms) { return k_t0 + std::chrono::milliseconds(ms); }
timestamp at_s(std::int64_t s) { return at_ms(s * 1000); }

valve_conditions zone_in(band b, bool window_open = false) { return valve_conditions{b, true, window_open}; }

zone_valve open_valve() {
  zone_valve v(k_reopen_after_s);
  const auto d = v.update(zone_in(band::safe), k_t0);
  EXPECT_TRUE(d && d->to == valve_position::open);
  return v;
}

// A valve closed at k_t0 because the zone was condensing.
zone_valve closed_valve() {
  zone_valve v = open_valve();
  const auto d = v.update(zone_in(band::condensing), k_t0);
  EXPECT_TRUE(d && d->to == valve_position::closed);
  return v;
}

TEST(ValvePositionNames, AreTheConfiguredWordsOrEmpty) {
  EXPECT_STREQ(valve_position_name(valve_position::open), "open");
  EXPECT_STREQ(valve_position_name(valve_position::closed), "closed");
  EXPECT_STREQ(valve_position_name(valve_position::unset), "");
}

struct close_case {
  const char* name;
  valve_conditions conditions;
  std::string reason;
};

TEST(ZoneValve, ClosesOnCondensingWindowOpenAndUnknownAsFault) {
  const std::vector<close_case> cases = {
      {"condensing", {band::condensing, true, false}, "zone condensing"},
      {"condensing while waiting", {band::condensing, false, false}, "zone condensing"},
      {"condensing, window open", {band::condensing, true, true}, "zone condensing"},
      {"safe, window open", {band::safe, true, true}, "window open"},
      {"tight, window open", {band::tight, true, true}, "window open"},
      {"unknown as a fault", {band::unknown, true, false}, "zone inputs unknown"},
  };
  for (const auto& c : cases) {
    zone_valve from_open = open_valve();
    const auto d = from_open.update(c.conditions, at_s(1));
    ASSERT_TRUE(d.has_value()) << c.name;
    EXPECT_EQ(d->from, valve_position::open) << c.name;
    EXPECT_EQ(d->to, valve_position::closed) << c.name;
    EXPECT_EQ(d->reason, c.reason) << c.name;
    EXPECT_EQ(from_open.position(), valve_position::closed) << c.name;
    EXPECT_FALSE(from_open.counts_as_open()) << c.name;
    EXPECT_FALSE(from_open.update(c.conditions, at_s(2)).has_value()) << c.name << ": closes once";

    zone_valve from_start(k_reopen_after_s);
    const auto first = from_start.update(c.conditions, k_t0);
    ASSERT_TRUE(first.has_value()) << c.name << " as the first command";
    EXPECT_EQ(first->from, valve_position::unset) << c.name;
    EXPECT_EQ(first->to, valve_position::closed) << c.name;
  }
}

TEST(ZoneValve, DoesNotCloseOnUnknownWhileWaitingForFirstReadings) {
  const valve_conditions waiting{band::unknown, false, false};
  zone_valve fresh(k_reopen_after_s);
  EXPECT_FALSE(fresh.update(waiting, k_t0).has_value());
  EXPECT_EQ(fresh.position(), valve_position::unset);
  EXPECT_TRUE(fresh.counts_as_open()) << "an uncommanded valve is left as the plant has it";

  zone_valve open = open_valve();
  EXPECT_FALSE(open.update(waiting, at_s(1)).has_value());
  EXPECT_EQ(open.position(), valve_position::open);
}

TEST(ZoneValve, FirstCommandOpensAZoneThatIsKnownAndFine) {
  for (band b : {band::safe, band::tight}) {
    zone_valve v(k_reopen_after_s);
    const auto d = v.update(zone_in(b), k_t0);
    ASSERT_TRUE(d.has_value()) << band_name(b);
    EXPECT_EQ(d->from, valve_position::unset);
    EXPECT_EQ(d->to, valve_position::open);
    EXPECT_EQ(d->reason, "zone readings known, no reason to close");
    EXPECT_EQ(v.position(), valve_position::open);
    EXPECT_FALSE(v.update(zone_in(b), at_s(1)).has_value()) << "opens once";
  }
}

TEST(ZoneValve, FirstCommandOpensAZoneInAlarm) {
  // design.md closes a valve only while condensing, window open or unknown: alarm is a
  // reason to warn, not to shut the zone off.
  zone_valve v(k_reopen_after_s);
  const auto d = v.update(zone_in(band::alarm), k_t0);
  ASSERT_TRUE(d.has_value());
  EXPECT_EQ(d->to, valve_position::open);
}

TEST(ZoneValve, ReopensOnlyAfterReopenAfterSOfSafeOrTight) {
  for (band fine : {band::safe, band::tight}) {
    zone_valve v = closed_valve();
    EXPECT_FALSE(v.update(zone_in(fine), at_s(5)).has_value()) << "fine since 5 s";
    EXPECT_FALSE(v.update(zone_in(fine), at_s(300)).has_value());
    EXPECT_FALSE(v.update(zone_in(fine), at_ms(605'000 - 1)).has_value()) << "1 ms before reopen_after_s";
    const auto d = v.update(zone_in(fine), at_s(605));
    ASSERT_TRUE(d.has_value()) << band_name(fine) << " exactly at reopen_after_s";
    EXPECT_EQ(d->from, valve_position::closed);
    EXPECT_EQ(d->to, valve_position::open);
    EXPECT_EQ(d->reason, std::string("zone ") + band_name(fine) + ", window closed for 600 s");
    EXPECT_TRUE(v.counts_as_open());
  }
}

TEST(ZoneValve, ReopenReasonMentionsTheWindowOnlyWhenThereIsOne) {
  zone_valve v = closed_valve();
  valve_conditions c = zone_in(band::safe);
  c.has_window = false;
  EXPECT_FALSE(v.update(c, at_s(5)).has_value());
  const auto d = v.update(c, at_s(605));
  ASSERT_TRUE(d.has_value());
  EXPECT_EQ(d->reason, "zone safe for 600 s");
}

TEST(ZoneValve, CountsSafeAndTightTogetherForTheReopenTimer) {
  zone_valve v = closed_valve();
  v.update(zone_in(band::tight), at_s(5));
  v.update(zone_in(band::safe), at_s(300));
  v.update(zone_in(band::tight), at_s(500));
  EXPECT_TRUE(v.update(zone_in(band::tight), at_s(605)).has_value());
}

struct interruption_case {
  const char* name;
  valve_conditions interruption;
};

TEST(ZoneValve, RestartsTheReopenTimerWhenTheZoneWorsensOrTheWindowOpens) {
  const std::vector<interruption_case> cases = {
      {"alarm", {band::alarm, true, false}},
      {"window open", {band::safe, true, true}},
      {"condensing", {band::condensing, true, false}},
      {"unknown as a fault", {band::unknown, true, false}},
      {"unknown while waiting", {band::unknown, false, false}},
  };
  for (const auto& c : cases) {
    zone_valve v = closed_valve();
    v.update(zone_in(band::safe), at_s(5));
    EXPECT_FALSE(v.update(c.interruption, at_s(400)).has_value()) << c.name << ": already closed";
    EXPECT_FALSE(v.update(zone_in(band::safe), at_s(410)).has_value()) << c.name;
    EXPECT_FALSE(v.update(zone_in(band::safe), at_s(605)).has_value()) << c.name << ": counts from 410 s, not 5 s";
    EXPECT_FALSE(v.update(zone_in(band::safe), at_ms(1'010'000 - 1)).has_value()) << c.name;
    EXPECT_TRUE(v.update(zone_in(band::safe), at_s(1010)).has_value()) << c.name;
  }
}

TEST(ZoneValve, AlarmBandNeitherClosesNorReopens) {
  zone_valve open = open_valve();
  EXPECT_FALSE(open.update(zone_in(band::alarm), at_s(1)).has_value());
  EXPECT_EQ(open.position(), valve_position::open);

  zone_valve closed = closed_valve();
  for (std::int64_t s : {1, 600, 1200, 3600}) {
    EXPECT_FALSE(closed.update(zone_in(band::alarm), at_s(s)).has_value()) << s << " s in alarm";
  }
  EXPECT_EQ(closed.position(), valve_position::closed);
}

TEST(ZoneValve, RestoredPositionIsKept) {
  zone_valve v(k_reopen_after_s);
  v.restore(valve_position::closed);
  EXPECT_FALSE(v.update(zone_in(band::safe), k_t0).has_value()) << "a restored closed valve waits to reopen";
  EXPECT_TRUE(v.update(zone_in(band::safe), at_s(600)).has_value());
}

}  // namespace
}  // namespace dewmargin
