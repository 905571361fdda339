#include <gtest/gtest.h>

#include <cmath>
#include <optional>
#include <string>
#include <vector>

#include "dewmargin/band.h"

namespace dewmargin {
namespace {

// Defaults of design.md: warn 2.0 K, alarm 1.0 K, hysteresis 0.3 K, confirm 30 s.
const band_thresholds k_thresholds{};
const timestamp k_t0 = from_unix_ms(1'784'030'400'000);  // 2026-07-14T12:00:00Z

timestamp at_ms(std::int64_t ms) { return k_t0 + std::chrono::milliseconds(ms); }
timestamp at_s(double s) { return at_ms(std::llround(s * 1000.0)); }
double just_below(double v) { return std::nextafter(v, -1e9); }

band_inputs margin(double margin_k) { return band_inputs{margin_k, false}; }
band_inputs missing() { return band_inputs{std::nullopt, false}; }

// A tracker that has been in the band of `start_margin_k` since k_t0 (from unknown a
// margin's band is taken at once, so one update puts it there).
band_tracker tracker_in(double start_margin_k) {
  band_tracker t(k_thresholds);
  t.update(margin(start_margin_k), k_t0);
  return t;
}

TEST(BandNames, AreTheWordsOfTheDesign) {
  EXPECT_STREQ(band_name(band::safe), "safe");
  EXPECT_STREQ(band_name(band::tight), "tight");
  EXPECT_STREQ(band_name(band::alarm), "alarm");
  EXPECT_STREQ(band_name(band::condensing), "condensing");
  EXPECT_STREQ(band_name(band::unknown), "unknown");
}

TEST(BandSeverity, OrdersBandsWorstLast) {
  EXPECT_LT(band_severity(band::safe), band_severity(band::tight));
  EXPECT_LT(band_severity(band::tight), band_severity(band::alarm));
  EXPECT_LT(band_severity(band::alarm), band_severity(band::condensing));
  EXPECT_LT(band_severity(band::condensing), band_severity(band::unknown));
}

struct classify_case {
  const char* name;
  double margin_k;
  band expected;
};

TEST(ClassifyMargin, PutsEachThresholdInTheBetterBand) {
  // "margin below this: tight/alarm", "condensing: margin <= 0" (design.md).
  const std::vector<classify_case> cases = {
      {"well above warn", 5.0, band::safe},
      {"exactly warn", 2.0, band::safe},
      {"just below warn", just_below(2.0), band::tight},
      {"exactly alarm", 1.0, band::tight},
      {"just below alarm", just_below(1.0), band::alarm},
      {"smallest positive", 1e-9, band::alarm},
      {"exactly zero", 0.0, band::condensing},
      {"negative", -0.5, band::condensing},
  };
  for (const auto& c : cases) {
    EXPECT_EQ(classify_margin(c.margin_k, k_thresholds), c.expected) << c.name;
  }
}

TEST(BandTracker, StartsUnknown) {
  const band_tracker t(k_thresholds);
  EXPECT_EQ(t.current(), band::unknown);
}

TEST(BandTracker, IsUnknownWhenTheMarginIsMissing) {
  for (double start_margin_k : {5.0, 1.5, 0.5, -1.0}) {
    band_tracker t = tracker_in(start_margin_k);
    EXPECT_EQ(t.update(missing(), at_s(1)), band::unknown) << "from margin " << start_margin_k;
    EXPECT_EQ(t.current(), band::unknown);
  }
}

TEST(BandTracker, GoesFromUnknownStraightToTheMarginsBand) {
  // Nothing is known to be better than: no confirmation, no hysteresis.
  const std::vector<classify_case> cases = {
      {"safe", 5.0, band::safe},
      {"tight", 1.5, band::tight},
      {"alarm", 0.5, band::alarm},
      {"condensing", -0.1, band::condensing},
  };
  for (const auto& c : cases) {
    band_tracker fresh(k_thresholds);
    EXPECT_EQ(fresh.update(margin(c.margin_k), k_t0), c.expected) << "first reading, " << c.name;

    band_tracker faulted = tracker_in(5.0);
    faulted.update(missing(), at_s(10));
    EXPECT_EQ(faulted.update(margin(c.margin_k), at_s(11)), c.expected) << "after a fault, " << c.name;
  }
}

TEST(BandTracker, RaisesCondensingAtOnce) {
  for (double start_margin_k : {5.0, 1.5, 0.5}) {
    band_tracker t = tracker_in(start_margin_k);
    EXPECT_EQ(t.update(margin(0.0), at_ms(1)), band::condensing) << "from margin " << start_margin_k;
  }
}

struct confirm_case {
  const char* name;
  double start_margin_k;
  double dip_margin_k;
  band before;
  band after;
};

TEST(BandTracker, RaisesTightAndAlarmOnlyAfterConfirmS) {
  const std::vector<confirm_case> cases = {
      {"safe to tight", 5.0, 1.5, band::safe, band::tight},
      {"safe to alarm", 5.0, 0.5, band::safe, band::alarm},
      {"tight to alarm", 1.5, 0.5, band::tight, band::alarm},
  };
  for (const auto& c : cases) {
    band_tracker t = tracker_in(c.start_margin_k);
    EXPECT_EQ(t.update(margin(c.dip_margin_k), at_s(10)), c.before) << c.name << ", at the dip";
    EXPECT_EQ(t.update(margin(c.dip_margin_k), at_s(25)), c.before) << c.name << ", half way";
    EXPECT_EQ(t.update(margin(c.dip_margin_k), at_ms(40'000 - 1)), c.before) << c.name << ", 1 ms before confirm_s";
    EXPECT_EQ(t.update(margin(c.dip_margin_k), at_s(40)), c.after) << c.name << ", exactly at confirm_s";
  }
}

TEST(BandTracker, RestartsTheConfirmTimerWhenTheConditionClears) {
  band_tracker t = tracker_in(5.0);
  EXPECT_EQ(t.update(margin(1.5), at_s(10)), band::safe);
  EXPECT_EQ(t.update(margin(2.0), at_s(30)), band::safe);  // back at warn: the condition cleared
  EXPECT_EQ(t.update(margin(1.5), at_s(35)), band::safe);  // timer starts again here
  EXPECT_EQ(t.update(margin(1.5), at_s(40)), band::safe) << "30 s after the first dip does not count";
  EXPECT_EQ(t.update(margin(1.5), at_ms(65'000 - 1)), band::safe);
  EXPECT_EQ(t.update(margin(1.5), at_s(65)), band::tight);
}

TEST(BandTracker, RestartsTheConfirmTimerAfterAMissingMargin) {
  band_tracker t = tracker_in(1.5);
  t.update(margin(0.5), at_s(10));                          // alarm timer starts
  EXPECT_EQ(t.update(missing(), at_s(20)), band::unknown);  // timers reset
  EXPECT_EQ(t.update(margin(1.5), at_s(21)), band::tight);  // straight to the margin's band
  EXPECT_EQ(t.update(margin(0.5), at_s(22)), band::tight);  // alarm timer starts again
  EXPECT_EQ(t.update(margin(0.5), at_s(41)), band::tight) << "not confirmed from the dip before the fault";
  EXPECT_EQ(t.update(margin(0.5), at_s(52)), band::alarm);
}

TEST(BandTracker, ConfirmsTightFromTheFirstDipEvenThroughAnAlarmLevelDip) {
  // The warn timer runs while the margin is below warn, also while it is below alarm;
  // the alarm timer restarts when the margin climbs back above alarm.
  band_tracker t = tracker_in(5.0);
  EXPECT_EQ(t.update(margin(0.5), at_s(10)), band::safe);  // both timers start
  EXPECT_EQ(t.update(margin(1.5), at_s(20)), band::safe);  // alarm timer stops, warn timer runs on
  EXPECT_EQ(t.update(margin(1.5), at_ms(40'000 - 1)), band::safe);
  EXPECT_EQ(t.update(margin(1.5), at_s(40)), band::tight) << "30 s after the first dip, not after 20 s";
  EXPECT_EQ(t.update(margin(0.5), at_s(45)), band::tight);  // alarm timer starts again
  EXPECT_EQ(t.update(margin(0.5), at_ms(75'000 - 1)), band::tight);
  EXPECT_EQ(t.update(margin(0.5), at_s(75)), band::alarm);
}

struct hysteresis_case {
  const char* name;
  double start_margin_k;
  double margin_k;
  band expected;
};

TEST(BandTracker, LeavesAWorseBandOnlyAtThresholdPlusHysteresis) {
  const double h = k_thresholds.hysteresis_k;
  const double alarm_exit = k_thresholds.margin_alarm_k + h;  // 1.3 K
  const double warn_exit = k_thresholds.margin_warn_k + h;    // 2.3 K
  const std::vector<hysteresis_case> cases = {
      {"alarm, exactly alarm_k + h", 0.5, alarm_exit, band::tight},
      {"alarm, just below alarm_k + h", 0.5, just_below(alarm_exit), band::alarm},
      {"alarm, above alarm_k but inside h", 0.5, 1.1, band::alarm},
      {"alarm, exactly warn_k + h", 0.5, warn_exit, band::safe},
      {"tight, exactly warn_k + h", 1.5, warn_exit, band::safe},
      {"tight, just below warn_k + h", 1.5, just_below(warn_exit), band::tight},
      {"tight, above warn_k but inside h", 1.5, 2.1, band::tight},
      {"condensing, exactly h", -0.5, h, band::alarm},
      {"condensing, just below h", -0.5, just_below(h), band::condensing},
      {"condensing, exactly alarm_k + h", -0.5, alarm_exit, band::tight},
      {"condensing, exactly warn_k + h", -0.5, warn_exit, band::safe},
  };
  for (const auto& c : cases) {
    band_tracker t = tracker_in(c.start_margin_k);
    EXPECT_EQ(t.update(margin(c.margin_k), at_s(1)), c.expected) << c.name;
  }
}

TEST(BandTracker, ImprovesAtOnceWithoutConfirmation) {
  // Only the worse direction waits for confirm_s; leaving is gated by hysteresis alone.
  band_tracker t = tracker_in(-0.5);
  EXPECT_EQ(t.update(margin(1.5), at_ms(1)), band::tight);
  EXPECT_EQ(t.update(margin(3.0), at_ms(2)), band::safe);
}

struct switch_case {
  const char* name;
  std::optional<double> margin_k;
};

TEST(BandTracker, CondensationSwitchOverridesAHealthyMarginAndMissingInputs) {
  const std::vector<switch_case> cases = {
      {"healthy margin", 5.0},
      {"tight margin", 1.5},
      {"missing margin", std::nullopt},
  };
  for (const auto& c : cases) {
    band_tracker fresh(k_thresholds);
    EXPECT_EQ(fresh.update(band_inputs{c.margin_k, true}, k_t0), band::condensing) << "fresh, " << c.name;

    band_tracker safe = tracker_in(5.0);
    EXPECT_EQ(safe.update(band_inputs{c.margin_k, true}, at_ms(1)), band::condensing) << "from safe, " << c.name;
  }
}

TEST(BandTracker, LeavesSwitchCondensingByTheMarginOnceTheSwitchIsDry) {
  band_tracker t = tracker_in(5.0);
  EXPECT_EQ(t.update(band_inputs{5.0, true}, at_s(1)), band::condensing);
  EXPECT_EQ(t.update(band_inputs{5.0, true}, at_s(100)), band::condensing) << "held while the switch is wet";
  EXPECT_EQ(t.update(margin(5.0), at_s(101)), band::safe);

  band_tracker no_margin = tracker_in(5.0);
  no_margin.update(band_inputs{std::nullopt, true}, at_s(1));
  EXPECT_EQ(no_margin.update(missing(), at_s(2)), band::unknown);
}

TEST(BandTracker, ForceSetsTheCurrentBand) {
  band_tracker t(k_thresholds);
  t.force(band::alarm);
  EXPECT_EQ(t.current(), band::alarm);
  // A restored alarm is left like any other: only past alarm_k + h.
  EXPECT_EQ(t.update(margin(1.2), k_t0), band::alarm);
  EXPECT_EQ(t.update(margin(1.3), at_s(1)), band::tight);
}

}  // namespace
}  // namespace dewmargin
