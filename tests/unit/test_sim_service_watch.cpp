// The simulator's view of the service and its simulated operator (model/service_watch.h).
#include <gtest/gtest.h>

#include <nlohmann/json.hpp>

#include "model/service_watch.h"
#include "test_sim_helpers.h"

namespace dewmargin::sim {
namespace {

std::string zone_state(const char* zone, const char* band, double margin_k, bool active, bool acknowledged) {
  nlohmann::json j{{"zone", zone},
                   {"band", band},
                   {"margin_k", margin_k},
                   {"alarm", {{"active", active}, {"acknowledged", acknowledged}}}};
  return j.dump();
}

service_watch make_watch(double ack_after_s) {
  const auto loaded = testing::load_demo();
  EXPECT_TRUE(loaded.ok());
  return service_watch(*loaded.config, ack_after_s, "sim-operator", parse_iso8601("2026-07-14").value());
}

TEST(SimServiceWatch, AcknowledgesEachNewAlarmAfterTheDelayOnce) {
  service_watch w = make_watch(300.0);
  std::vector<outbound> out;
  ASSERT_TRUE(
      w.on_message("dewmargin/zone/g-lobby/state", zone_state("g-lobby", "condensing", -0.2, true, false), 100.0));
  EXPECT_EQ(w.tally().alarms_raised, 1);
  w.operator_actions(399.0, out);
  EXPECT_TRUE(out.empty());
  w.operator_actions(400.0, out);
  ASSERT_EQ(out.size(), 1u);
  EXPECT_EQ(out[0].topic, "dewmargin/cmd/ack");
  EXPECT_EQ(out[0].qos, 1);
  const auto cmd = nlohmann::json::parse(out[0].payload);
  EXPECT_EQ(cmd.at("zone"), "g-lobby");
  EXPECT_EQ(cmd.at("by"), "sim-operator");
  w.operator_actions(500.0, out);
  EXPECT_EQ(out.size(), 1u) << "sent once while the service has not confirmed";

  // The service confirms; the same alarm state again raises nothing new.
  w.on_message("dewmargin/events",
               R"({"zone":"g-lobby","kind":"ack","from":"unacknowledged","to":"acknowledged",)"
               R"("alarm":{"active":true,"acknowledged":true}})",
               510.0);
  w.on_message("dewmargin/zone/g-lobby/state", zone_state("g-lobby", "condensing", -0.1, true, true), 511.0);
  EXPECT_EQ(w.tally().acknowledged, 1);
  EXPECT_EQ(w.tally().alarms_raised, 1);
  w.operator_actions(2000.0, out);
  EXPECT_EQ(out.size(), 1u);

  // Re-armed (unacknowledged again while active): acknowledged again later; not a new alarm.
  w.on_message("dewmargin/zone/g-lobby/state", zone_state("g-lobby", "unknown", -0.1, true, false), 3000.0);
  EXPECT_EQ(w.tally().alarms_raised, 1);
  w.operator_actions(3300.0, out);
  EXPECT_EQ(out.size(), 2u);
}

TEST(SimServiceWatch, OperatorWhoNeverAcknowledgesSendsNothing) {
  service_watch w = make_watch(0.0);
  std::vector<outbound> out;
  w.on_message("dewmargin/zone/g-lobby/state", zone_state("g-lobby", "alarm", 0.5, true, false), 0.0);
  w.operator_actions(1e6, out);
  EXPECT_TRUE(out.empty());
}

TEST(SimServiceWatch, CountsEventsAndFindsTheWorstZone) {
  service_watch w = make_watch(300.0);
  for (const char* e : {R"({"zone":"g-lobby","kind":"valve","from":"open","to":"closed"})",
                        R"({"zone":"g-lobby","kind":"valve","from":"closed","to":"open"})",
                        R"({"loop":"slab-lobby","kind":"setpoint","from":19.0,"to":19.1})",
                        R"({"zone":"g-lobby","kind":"band","from":"safe","to":"tight",)"
                        R"("alarm":{"active":false,"acknowledged":true}})",
                        R"({"kind":"rejected","reason":"x"})", "not json"}) {
    EXPECT_TRUE(w.on_message("dewmargin/events", e, 10.0));
  }
  const auto& t = w.tally();
  EXPECT_EQ(t.valves_closed, 1);
  EXPECT_EQ(t.valves_opened, 1);
  EXPECT_EQ(t.setpoint_events, 1);
  EXPECT_EQ(t.band_events, 1);
  EXPECT_EQ(t.bands_entered.at("tight"), 1);
  EXPECT_EQ(t.rejected, 1);

  EXPECT_EQ(w.worst_zone(), nullptr);
  EXPECT_EQ(w.unknown_zones(), 9);  // g-lobby is tight now, the others unknown
  w.on_message("dewmargin/zone/g-lobby/state", zone_state("g-lobby", "tight", 1.8, false, true), 11.0);
  w.on_message("dewmargin/zone/l2-south-meeting/state", zone_state("l2-south-meeting", "alarm", 0.7, true, false),
               11.0);
  ASSERT_NE(w.worst_zone(), nullptr);
  EXPECT_EQ(w.worst_zone()->id, "l2-south-meeting");
  EXPECT_FALSE(w.on_message("bldg/qf/g-lobby/rh", "{}", 12.0));
}

TEST(SimServiceWatch, StatusTopicTellsWhetherTheServiceIsOnline) {
  service_watch w = make_watch(300.0);
  EXPECT_FALSE(w.tally().online);
  w.on_message("dewmargin/status", R"({"state":"online","site":"quayside-four"})", 0.0);
  EXPECT_TRUE(w.tally().online);
  w.on_message("dewmargin/status", R"({"state":"offline"})", 1.0);
  EXPECT_FALSE(w.tally().online);
}

TEST(SimServiceWatch, AlarmOnsetsAndTheServiceClockComeFromItsTimestamps) {
  service_watch w = make_watch(300.0);
  EXPECT_FALSE(w.service_time_s().has_value());
  // A loop state: only its clock counts.
  w.on_message("dewmargin/loop/slab-lobby/state", R"({"loop":"slab-lobby","ts":"2026-07-14T06:00:05Z"})",
               6.0 * 3600 + 7);
  ASSERT_TRUE(w.service_time_s().has_value());
  EXPECT_DOUBLE_EQ(*w.service_time_s(), 6.0 * 3600 + 5);
  // An alarm raised at the service's 06:10:00, heard by the simulator a little later.
  w.on_message("dewmargin/events",
               R"({"ts":"2026-07-14T06:10:00Z","zone":"g-lobby","kind":"band","from":"tight","to":"alarm",)"
               R"("alarm":{"active":true,"acknowledged":false}})",
               6.0 * 3600 + 615);
  EXPECT_DOUBLE_EQ(*w.service_time_s(), 6.0 * 3600 + 600);
  // Cleared, raised again at 06:20:00.
  w.on_message("dewmargin/zone/g-lobby/state",
               R"({"ts":"2026-07-14T06:15:00Z","zone":"g-lobby","band":"safe","margin_k":2.5,)"
               R"("alarm":{"active":false,"acknowledged":true}})",
               6.0 * 3600 + 900);
  w.on_message("dewmargin/zone/g-lobby/state",
               R"({"ts":"2026-07-14T06:20:00Z","zone":"g-lobby","band":"condensing","margin_k":-0.1,)"
               R"("alarm":{"active":true,"acknowledged":false}})",
               6.0 * 3600 + 1210);
  const watched_zone& lobby = w.zones()[0];
  ASSERT_EQ(lobby.id, "g-lobby");
  EXPECT_EQ(lobby.alarm_onsets_s, (std::vector<double>{6.0 * 3600 + 600, 6.0 * 3600 + 1200}));
  // A retained state of an earlier run, stamped later than the simulator's clock, is not the service's clock.
  w.on_message("dewmargin/zone/l3-north-open/state",
               R"({"ts":"2026-07-14T19:00:00Z","zone":"l3-north-open","band":"safe","margin_k":3,)"
               R"("alarm":{"active":false,"acknowledged":true}})",
               6.0 * 3600 + 1220);
  EXPECT_DOUBLE_EQ(*w.service_time_s(), 6.0 * 3600 + 1200);
}

}  // namespace
}  // namespace dewmargin::sim
