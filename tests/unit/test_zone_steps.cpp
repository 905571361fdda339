// The band-and-alarm step and the valve step that follow a zone's margin.
#include <gtest/gtest.h>

#include "dewmargin/zone_steps.h"

namespace dewmargin {
namespace {

timestamp at_s(double s) { return from_unix_ms(1'800'000'000'000 + static_cast<std::int64_t>(s * 1000.0)); }

zone_margin margin_of(double k) {
  zone_margin m;
  m.margin_k = k;
  return m;
}
zone_margin waiting() {
  zone_margin m;
  m.unknown_reason = "waiting for the first readings";
  return m;
}
zone_margin faulty() {
  zone_margin m;
  m.unknown_is_fault = true;
  return m;
}

TEST(ZoneSteps, WaitingHoldsARestoredAlarmWithoutAnEvent) {
  zone_condition c{band_thresholds{}};
  c.alarm.restore({true, true, std::nullopt}, band::condensing);
  c.alarm_condition = true;
  const band_step s = step_band_and_alarm(c, waiting(), false, at_s(0));
  EXPECT_EQ(s.after, band::unknown);
  EXPECT_FALSE(s.event_due);
  EXPECT_TRUE(c.alarm.status().active);
  EXPECT_TRUE(c.alarm.status().acknowledged);
}

TEST(ZoneSteps, AFaultAfterTheWaitReArmsTheHeldAlarmWithAnEvent) {
  zone_condition c{band_thresholds{}};
  c.alarm.restore({true, true, std::nullopt}, band::condensing);
  c.alarm_condition = true;
  const band_step s = step_band_and_alarm(c, faulty(), false, at_s(0));
  EXPECT_EQ(s.before, band::unknown);
  EXPECT_EQ(s.after, band::unknown);
  EXPECT_TRUE(s.event_due) << "the alarm state changed though the band did not";
  EXPECT_FALSE(c.alarm.status().acknowledged);
}

TEST(ZoneSteps, SameBandAsTheRestoredAlarmKeepsTheAcknowledgement) {
  zone_condition c{band_thresholds{}};
  c.alarm.restore({true, true, std::nullopt}, band::condensing);
  c.alarm_condition = true;
  const band_step s = step_band_and_alarm(c, margin_of(-0.5), false, at_s(0));
  EXPECT_EQ(s.after, band::condensing);
  EXPECT_TRUE(s.event_due);
  EXPECT_TRUE(c.alarm.status().acknowledged);
}

TEST(ZoneSteps, TheSwitchMakesAWaitingZoneCondensing) {
  zone_condition c{band_thresholds{}};
  const band_step s = step_band_and_alarm(c, waiting(), true, at_s(0));
  EXPECT_EQ(s.after, band::condensing);
  EXPECT_TRUE(c.alarm.status().active);
}

// Dew point 10 °C, supply 16 °C, a steady margin of 4 K: nothing but the band acts.
valve_outlook dry_air() {
  valve_outlook o;
  o.margin_k = 4.0;
  o.dew_point_c = 10.0;
  o.supply_c = 16.0;
  return o;
}

TEST(ZoneSteps, ValveStepNamesTheWindowOnlyWhenThereIsOne) {
  for (const auto& [window, reason] : std::vector<std::pair<std::optional<bool>, std::string>>{
           {false, "zone safe, window closed for 10 s"}, {std::nullopt, "zone safe for 10 s"}}) {
    zone_valve v(valve_rules{10, 5, 1, 1});
    v.restore(valve_position::closed);
    EXPECT_FALSE(step_valve(v, band::safe, false, window, dry_air(), at_s(0)));
    const auto d = step_valve(v, band::safe, false, window, dry_air(), at_s(10));
    ASSERT_TRUE(d);
    EXPECT_EQ(d->reason, reason);
  }
  zone_valve v(valve_rules{10, 5, 1, 1});
  const auto closed = step_valve(v, band::safe, false, true, dry_air(), at_s(0));
  ASSERT_TRUE(closed);
  EXPECT_EQ(closed->reason, "window open");
}

// Issue 10, rule 4: a zone's unit in fault suppresses its tight/alarm annunciation by design
// (ANSI/ISA-18.2); condensing still annunciates.
TEST(ZoneSteps, SuppressionKeepsAlarmBandFromTheAlarmButNotCondensing) {
  band_thresholds t;
  t.confirm_s = 0;
  zone_condition c{t};
  zone_margin m;
  m.margin_k = 0.5;
  m.dew_point_c = 17.0;
  const band_step alarm = step_band_and_alarm(c, m, false, at_s(0), true);
  EXPECT_EQ(alarm.after, band::alarm);
  EXPECT_TRUE(alarm.suppressed);
  EXPECT_FALSE(c.alarm.status().active) << "nothing to acknowledge";
  EXPECT_FALSE(c.alarm_condition);

  m.margin_k = -0.2;
  const band_step wet = step_band_and_alarm(c, m, false, at_s(1), true);
  EXPECT_EQ(wet.after, band::condensing);
  EXPECT_FALSE(wet.suppressed);
  EXPECT_TRUE(c.alarm.status().active);

  zone_condition later{t};
  m.margin_k = 0.5;
  step_band_and_alarm(later, m, false, at_s(0), true);
  const band_step after = step_band_and_alarm(later, m, false, at_s(1), false);
  EXPECT_FALSE(after.suppressed);
  EXPECT_TRUE(later.alarm.status().active) << "annunciated once the unit's fault clears";
}

TEST(ZoneValve, CarryOverKeepsPositionAndTheRunningReopenTimer) {
  valve_conditions safe{band::safe, false, false, true};
  safe.dew_point_c = 10.0;
  safe.supply_c = 16.0;
  zone_valve old(valve_rules{600, 5, 1, 1});
  old.restore(valve_position::closed);
  EXPECT_FALSE(old.update(safe, at_s(0)));         // fine since 0 s
  zone_valve reloaded(valve_rules{300, 5, 1, 1});  // the new config's delay
  reloaded.carry_over(old);
  EXPECT_EQ(reloaded.position(), valve_position::closed);
  EXPECT_FALSE(reloaded.update(safe, at_s(299)));
  const auto d = reloaded.update(safe, at_s(300));
  ASSERT_TRUE(d);
  EXPECT_EQ(d->to, valve_position::open);
}

}  // namespace
}  // namespace dewmargin
