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

valve_rules rules() { return valve_rules{k_reopen_after_s, 5.0, 1.0, 1.0}; }

// A zone whose dew point (10 °C) is well below its loop's supply (16 °C): the permissive holds.
valve_conditions zone_in(band b, bool window_open = false) {
  valve_conditions c{b, true, window_open};
  c.dew_point_c = 10.0;
  c.supply_c = 16.0;
  return c;
}

zone_valve open_valve() {
  zone_valve v(rules());
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

    zone_valve from_start(rules());
    const auto first = from_start.update(c.conditions, k_t0);
    ASSERT_TRUE(first.has_value()) << c.name << " as the first command";
    EXPECT_EQ(first->from, valve_position::unset) << c.name;
    EXPECT_EQ(first->to, valve_position::closed) << c.name;
  }
}

TEST(ZoneValve, DoesNotCloseOnUnknownWhileWaitingForFirstReadings) {
  const valve_conditions waiting{band::unknown, false, false};
  zone_valve fresh(rules());
  EXPECT_FALSE(fresh.update(waiting, k_t0).has_value());
  EXPECT_EQ(fresh.position(), valve_position::unset);
  EXPECT_TRUE(fresh.counts_as_open()) << "an uncommanded valve is left as the plant has it";

  zone_valve open = open_valve();
  EXPECT_FALSE(open.update(waiting, at_s(1)).has_value());
  EXPECT_EQ(open.position(), valve_position::open);
}

TEST(ZoneValve, FirstCommandOpensAZoneThatIsKnownAndFine) {
  for (band b : {band::safe, band::tight}) {
    zone_valve v(rules());
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
  zone_valve v(rules());
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
  zone_valve v(rules());
  v.restore(valve_position::closed);
  EXPECT_FALSE(v.update(zone_in(band::safe), k_t0).has_value()) << "a restored closed valve waits to reopen";
  EXPECT_TRUE(v.update(zone_in(band::safe), at_s(600)).has_value());
}

// Rule 1, close ahead. The thresholds are the documented defaults (close_ahead_min 5,
// margin_alarm_k 1.0); closing before the surface is wet is ISO 11855-6:2012 Annex A's
// "control the transients" (the numbers are ours: common practice, no source).
struct ahead_case {
  const char* name;
  band zone_band;
  std::optional<double> margin_k;
  std::optional<double> minutes;
  bool reset_at_limit;
  std::string reason;  // empty: the valve stays open
};

TEST(ZoneValve, ClosesAheadOfCondensation) {
  const std::vector<ahead_case> cases = {
      {"falls to zero in 3.2 min", band::alarm, 0.8, 3.2, false, "condensation expected in 3.2 min"},
      {"exactly close_ahead_min", band::tight, 0.9, 5.0, false, "condensation expected in 5.0 min"},
      {"already at zero", band::alarm, 0.5, 0.0, false, "condensation expected in 0.0 min"},
      {"just beyond close_ahead_min", band::alarm, 0.8, 5.1, false, ""},
      {"margin at margin_alarm_k", band::tight, 1.0, 2.0, false, ""},
      {"margin not falling", band::alarm, 0.8, std::nullopt, false, ""},
      {"no margin", band::alarm, std::nullopt, 1.0, false, ""},
      {"alarm with the reset at max_c", band::alarm, 0.8, std::nullopt, true, "supply reset at its limit"},
      {"alarm with room to reset", band::alarm, 0.8, std::nullopt, false, ""},
      {"tight with the reset at max_c", band::tight, 1.5, std::nullopt, true, ""},
      {"trend wins over the limit", band::alarm, 0.8, 2.0, true, "condensation expected in 2.0 min"},
  };
  for (const auto& c : cases) {
    zone_valve v = open_valve();
    valve_conditions vc = zone_in(c.zone_band);
    vc.margin_k = c.margin_k;
    vc.minutes_to_condensation = c.minutes;
    vc.reset_at_limit = c.reset_at_limit;
    const auto d = v.update(vc, at_s(1));
    if (c.reason.empty()) {
      EXPECT_FALSE(d.has_value()) << c.name;
      EXPECT_EQ(v.position(), valve_position::open) << c.name;
      continue;
    }
    ASSERT_TRUE(d.has_value()) << c.name;
    EXPECT_EQ(d->to, valve_position::closed) << c.name;
    EXPECT_EQ(d->reason, c.reason) << c.name;
  }
}

TEST(ZoneValve, ClosedAheadReopensByTheExistingRule) {
  zone_valve v = open_valve();
  valve_conditions falling = zone_in(band::tight);
  falling.margin_k = 0.9;
  falling.minutes_to_condensation = 3.0;
  ASSERT_TRUE(v.update(falling, at_s(0)).has_value());
  EXPECT_FALSE(v.update(falling, at_s(100)).has_value()) << "still expected: stays closed, timer not running";
  valve_conditions recovering = zone_in(band::tight);
  recovering.margin_k = 1.5;
  EXPECT_FALSE(v.update(recovering, at_s(200)).has_value());
  EXPECT_FALSE(v.update(recovering, at_ms(800'000 - 1)).has_value()) << "reopen_after_s from 200 s";
  const auto d = v.update(recovering, at_s(800));
  ASSERT_TRUE(d.has_value());
  EXPECT_EQ(d->reason, "zone tight, window closed for 600 s");
}

// Rule 2, the start-up permissive: dew point at least open_margin_k below the supply.
struct permissive_case {
  const char* name;
  std::optional<double> dew_point_c;
  std::optional<double> supply_c;
  bool supply_awaiting;
  std::optional<valve_position> first;  // the first command, or none
  std::string hold;
};

TEST(ZoneValve, FirstCommandFollowsTheStartUpPermissive) {
  const std::vector<permissive_case> cases = {
      {"dry air", 10.0, 16.0, false, valve_position::open, ""},
      {"exactly open_margin_k below", 15.0, 16.0, false, valve_position::open, ""},
      {"less than open_margin_k below", 15.1, 16.0, false, valve_position::closed,
       "dew point 15.1 °C above supply 16.0 °C - 1.0 K"},
      {"dew point above the supply", 17.0, 16.0, false, valve_position::closed,
       "dew point 17.0 °C above supply 16.0 °C - 1.0 K"},
      {"supply stale or missing", 10.0, std::nullopt, false, valve_position::closed, "supply temperature unknown"},
      {"supply not yet reported", 10.0, std::nullopt, true, std::nullopt, ""},
  };
  for (const auto& c : cases) {
    zone_valve v(rules());
    valve_conditions vc = zone_in(band::safe);
    vc.dew_point_c = c.dew_point_c;
    vc.supply_c = c.supply_c;
    vc.supply_awaiting = c.supply_awaiting;
    const auto d = v.update(vc, k_t0);
    EXPECT_EQ(v.hold_reason(), c.hold) << c.name;
    EXPECT_EQ(v.held(), !c.hold.empty()) << c.name;
    if (!c.first) {
      EXPECT_FALSE(d.has_value()) << c.name;
      continue;
    }
    ASSERT_TRUE(d.has_value()) << c.name;
    EXPECT_EQ(d->to, *c.first) << c.name;
    if (!c.hold.empty()) {
      EXPECT_EQ(d->reason, "start-up permissive: " + c.hold) << c.name;
    }
  }
}

TEST(ZoneValve, AHeldValveOpensAsSoonAsThePermissiveIsMet) {
  zone_valve v(rules());
  valve_conditions humid = zone_in(band::safe);
  humid.dew_point_c = 16.5;
  ASSERT_TRUE(v.update(humid, k_t0).has_value());
  EXPECT_FALSE(v.update(humid, at_s(30)).has_value()) << "held, no second command";
  EXPECT_FALSE(v.counts_as_open());
  EXPECT_TRUE(v.held());
  const auto d = v.update(zone_in(band::safe), at_s(31));
  ASSERT_TRUE(d.has_value()) << "never carried water: no reopen delay";
  EXPECT_EQ(d->from, valve_position::closed);
  EXPECT_EQ(d->to, valve_position::open);
  EXPECT_EQ(d->reason, "start-up permissive met");
  EXPECT_FALSE(v.held());
}

TEST(ZoneValve, AValveClosedForAReasonNeedsTheDelayAndThePermissive) {
  zone_valve v = closed_valve();
  valve_conditions humid = zone_in(band::safe);
  humid.supply_c = 10.5;  // the reset lowered the water meanwhile
  EXPECT_FALSE(v.update(humid, at_s(5)).has_value());
  EXPECT_FALSE(v.update(humid, at_s(700)).has_value()) << "delay over, permissive not met";
  EXPECT_EQ(v.hold_reason(), "dew point 10.0 °C above supply 10.5 °C - 1.0 K");
  const auto d = v.update(zone_in(band::safe), at_s(701));
  ASSERT_TRUE(d.has_value());
  EXPECT_EQ(d->reason, "zone safe, window closed for 600 s");
  EXPECT_FALSE(v.held());
}

TEST(ZoneValve, OpenMarginIsConfigurable) {
  zone_valve v(valve_rules{k_reopen_after_s, 5.0, 3.0, 1.0});
  valve_conditions c = zone_in(band::safe);
  c.dew_point_c = 13.5;  // 2.5 K below 16 °C: enough for 1 K, not for 3 K
  const auto d = v.update(c, k_t0);
  ASSERT_TRUE(d.has_value());
  EXPECT_EQ(d->to, valve_position::closed);
  EXPECT_EQ(v.hold_reason(), "dew point 13.5 °C above supply 16.0 °C - 3.0 K");
}

TEST(ZoneValve, AnOpenValveIsNeverHeld) {
  zone_valve v = open_valve();
  valve_conditions humid = zone_in(band::safe);
  humid.dew_point_c = 15.8;
  EXPECT_FALSE(v.update(humid, at_s(1)).has_value()) << "the permissive is for opening only";
  EXPECT_FALSE(v.held());
}

}  // namespace
}  // namespace dewmargin
