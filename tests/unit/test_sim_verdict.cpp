// The verdict per zone (tools/simulator/model/verdict.h): wet time, lowest margin, warning time,
// and the --compare judgement.
#include <gtest/gtest.h>

#include "model/verdict.h"
#include "test_sim_helpers.h"

namespace dewmargin::sim {
namespace {

std::unique_ptr<simulation> make(bool with_service) {
  const auto loaded = testing::load_demo();
  const auto demo = testing::demo_scenario("short");
  simulation_options o;
  o.with_service = with_service;
  auto created = simulation::create(*loaded.config, demo.house, demo.day, o);
  EXPECT_TRUE(created.ok());
  return std::move(created.value());
}

std::string alarm_event(const char* zone, const char* ts, bool active) {
  return std::string(R"({"ts":")") + ts + R"(","zone":")" + zone + R"(","kind":"band","from":"safe","to":")" +
         (active ? "alarm" : "safe") + R"(","alarm":{"active":)" + (active ? "true" : "false") +
         R"(,"acknowledged":false}})";
}

TEST(SimVerdict, WarningIsFromTheLastAlarmBeforeTheFirstWetMoment) {
  auto sim = make(true);
  std::vector<outbound> out;
  sim->begin(out);
  // The service raises alarms for l2-south-meeting at 06:40, clears, raises again at 07:05;
  // l1-north-open only after the baseline building gets wet there (07:25).
  sim->on_message("dewmargin/events", alarm_event("l2-south-meeting", "2026-07-14T06:40:00Z", true));
  sim->on_message("dewmargin/events", alarm_event("l2-south-meeting", "2026-07-14T06:50:00Z", false));
  sim->on_message("dewmargin/events", alarm_event("l2-south-meeting", "2026-07-14T07:05:00Z", true));
  sim->on_message("dewmargin/events", alarm_event("l1-north-open", "2026-07-14T07:40:00Z", true));
  // Nobody answers the alarms otherwise (no setpoints, no valve commands): the building gets wet.
  while (!sim->done()) sim->advance(out);
  const run_verdict v = verdict_of(*sim);
  ASSERT_TRUE(v.with_service);
  const auto zone = [&](const std::string& id) {
    for (const auto& z : v.zones) {
      if (z.zone == id) return z;
    }
    throw std::runtime_error("no zone " + id);
  };
  const zone_verdict meeting = zone("l2-south-meeting");
  ASSERT_TRUE(meeting.first_wet_s.has_value());
  EXPECT_EQ(meeting.alarms, 2);
  EXPECT_DOUBLE_EQ(*meeting.first_alarm_s, 6 * 3600.0 + 40 * 60);
  ASSERT_TRUE(meeting.warning_min.has_value());
  EXPECT_DOUBLE_EQ(*meeting.warning_min, (*meeting.first_wet_s - (7 * 3600.0 + 5 * 60)) / 60.0);
  const zone_verdict open_plan = zone("l1-north-open");
  ASSERT_TRUE(open_plan.first_wet_s.has_value());
  EXPECT_LT(*open_plan.first_wet_s, 7 * 3600.0 + 40 * 60);
  EXPECT_FALSE(open_plan.warning_min.has_value()) << "the alarm came after the surface got wet";
  const zone_verdict lobby = zone("g-lobby");
  EXPECT_EQ(lobby.alarms, 0);
  EXPECT_FALSE(lobby.warning_min.has_value());

  const std::string table = verdict_table(v);
  EXPECT_NE(table.find("l2-south-meeting"), std::string::npos);
  EXPECT_NE(table.find("06:40"), std::string::npos);
  EXPECT_NE(table.find("none"), std::string::npos);  // l1-north-open: wet with no alarm before
}

TEST(SimVerdict, CompareJudgesTheSupervisedRunAgainstTheBound) {
  run_verdict baseline;
  baseline.wet_zone_min = 445.0;
  run_verdict supervised;
  supervised.with_service = true;
  supervised.wet_zone_min = 2.5;
  EXPECT_TRUE(judge(baseline, supervised, 10.0).pass);
  EXPECT_TRUE(judge(baseline, supervised, 2.5).pass);
  const auto fail = judge(baseline, supervised, 2.0);
  EXPECT_FALSE(fail.pass);
  EXPECT_EQ(fail.line, "verdict: FAIL: 2.5 wet zone-minutes with the service (bound 2.0), 445.0 without");
  EXPECT_EQ(judge(baseline, supervised, 10.0).line,
            "verdict: pass: 2.5 wet zone-minutes with the service (bound 10.0), 445.0 without");
}

TEST(SimVerdict, CompareTableShowsBothRunsPerZone) {
  auto baseline = make(false);
  std::vector<outbound> out;
  baseline->begin(out);
  while (!baseline->done()) baseline->advance(out);
  const run_verdict b = verdict_of(*baseline);
  run_verdict s = b;
  s.with_service = true;
  for (auto& z : s.zones) {
    z.wet_min = 0.0;
    z.first_wet_s.reset();
  }
  s.wet_zone_min = 0.0;
  const std::string table = compare_table(b, s);
  EXPECT_NE(table.find("without the service"), std::string::npos);
  EXPECT_NE(table.find("dry"), std::string::npos);
  EXPECT_NE(table.find("443.9"), std::string::npos) << table;  // the baseline's total
  EXPECT_EQ(std::count(table.begin(), table.end(), '\n'), 3 + 10 + 1 + 1);
}

}  // namespace
}  // namespace dewmargin::sim
