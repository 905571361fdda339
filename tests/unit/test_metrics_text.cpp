// The Prometheus text of the live state (lib/http/metrics_text.h), checked against the
// format's rules (tests/live/exposition_format_check.h) and for its values.
#include <gtest/gtest.h>

#include "../live/exposition_format_check.h"
#include "dewmargin/live_snapshot.h"
#include "dewmargin/metrics_text.h"

namespace dewmargin {
namespace {

live_snapshot::copy sample_copy() {
  live_snapshot s("dm", "harbour \"lane\" \\ west", "0.1.0");
  s.on_published("dm/zone/room-a/state",
                 R"({"site":"x","zone":"room-a","ts":"2026-07-14T13:04:10Z","band":"condensing","dew_point_c":17.21,)"
                 R"("surface_min_c":17.1,"supply_c":16.2,"margin_k":-0.11,"valve":"closed","surface_rh_pct":99.3,)"
                 R"("alarm":{"active":true,"acknowledged":false,"shelved_until":null},"minutes_to_condensation":0.5})");
  s.on_published(
      "dm/zone/room-b/state",
      R"({"site":"x","zone":"room-b","ts":"2026-07-14T13:04:10Z","band":"safe","dew_point_c":null,)"
      R"("surface_min_c":null,"supply_c":16.2,"margin_k":null,"valve":null,)"
      R"("alarm":{"active":false,"acknowledged":true,"shelved_until":null},"minutes_to_condensation":null})");
  s.on_published("dm/loop/loop-1/state",
                 R"({"site":"x","loop":"loop-1","ts":"2026-07-14T13:04:10Z","setpoint_c":19.21,"supply_c":16.2,)"
                 R"("return_c":18.9,"flow_l_s":1.2,"reason":"r","limited":"none","cooling_kw":13.54})");
  // A dehumidifier's state as the engine formats it (docs/interface.md, "Topics it publishes").
  s.on_published("dm/dehumidifier/doas-1/state",
                 R"({"site":"x","dehumidifier":"doas-1","ts":"2026-07-14T13:04:10Z","request_c":9.4,)"
                 R"("supply_dew_point_c":13.2,"fault":true,"reason":"fault switch active",)"
                 R"("alarm":{"active":true,"acknowledged":false,"shelved_until":null}})");
  s.on_published("dm/events", R"({"kind":"band"})");  // not a state: not kept
  s.on_published("plant/l1/sp", "17.5");              // not under the prefix
  service_counters c;
  c.messages_received = 1234;
  c.bad_inputs = 5;
  c.commands_rejected = 2;
  c.broker_reconnects = 1;
  c.store_write_errors = 0;
  c.inbound_drops = 6;
  c.outbox_drops = 3;
  c.store_commits = 4;
  c.store_commit_us_total = 2500;
  c.broker_connected = true;
  s.set_counters(c);
  return s.take(false);
}

TEST(MetricsText, FollowsTheExpositionFormatRules) {
  const std::string text = format_metrics(sample_copy());
  const auto parsed = test_support::check_exposition(text);
  for (const auto& p : parsed.problems) ADD_FAILURE() << p;
  EXPECT_EQ(parsed.types.at("dewmargin_zone_margin_kelvin"), "gauge");
  EXPECT_EQ(parsed.types.at("dewmargin_messages_received_total"), "counter");
  EXPECT_EQ(parsed.types.at("dewmargin_store_commit_seconds"), "summary");
  EXPECT_EQ(parsed.types.at("dewmargin_inbound_dropped_total"), "counter");
  EXPECT_EQ(parsed.types.at("dewmargin_outbox_dropped_total"), "counter");
}

TEST(MetricsText, CarriesTheStateValuesAndEscapesLabels) {
  const auto m = test_support::check_exposition(format_metrics(sample_copy()));
  const std::string site = R"(site="harbour \"lane\" \\ west")";
  const std::string a = "{" + site + ",zone=\"room-a\"}";
  EXPECT_EQ(m.value("dewmargin_zone_margin_kelvin" + a), -0.11);
  EXPECT_EQ(m.value("dewmargin_zone_dew_point_celsius" + a), 17.21);
  EXPECT_EQ(m.value("dewmargin_zone_surface_min_celsius" + a), 17.1);
  EXPECT_EQ(m.value("dewmargin_zone_surface_relative_humidity_percent" + a), 99.3);
  const std::string unit = "{" + site + ",dehumidifier=\"doas-1\"}";
  EXPECT_EQ(m.value("dewmargin_dehumidifier_dew_point_request_celsius" + unit), 9.4);
  EXPECT_EQ(m.value("dewmargin_dehumidifier_supply_dew_point_celsius" + unit), 13.2);
  EXPECT_EQ(m.value("dewmargin_dehumidifier_fault" + unit), 1.0);
  EXPECT_EQ(m.value("dewmargin_dehumidifier_alarm_unacknowledged" + unit), 1.0);
  EXPECT_EQ(m.value("dewmargin_zone_time_to_condensation_seconds" + a), 30.0);
  EXPECT_EQ(m.value("dewmargin_zone_band{" + site + ",zone=\"room-a\",band=\"condensing\"}"), 1.0);
  EXPECT_EQ(m.value("dewmargin_zone_band{" + site + ",zone=\"room-a\",band=\"safe\"}"), 0.0);
  EXPECT_EQ(m.value("dewmargin_zone_alarm_active" + a), 1.0);
  EXPECT_EQ(m.value("dewmargin_zone_alarm_unacknowledged" + a), 1.0);
  EXPECT_EQ(m.value("dewmargin_zone_state_timestamp_seconds" + a), 1784034250.0);
  // Unknown values have no sample at all.
  const std::string b = "{" + site + ",zone=\"room-b\"}";
  EXPECT_FALSE(m.value("dewmargin_zone_margin_kelvin" + b));
  EXPECT_FALSE(m.value("dewmargin_zone_time_to_condensation_seconds" + b));
  EXPECT_EQ(m.value("dewmargin_zone_band{" + site + ",zone=\"room-b\",band=\"safe\"}"), 1.0);
  const std::string l = "{" + site + ",loop=\"loop-1\"}";
  EXPECT_EQ(m.value("dewmargin_loop_setpoint_celsius" + l), 19.21);
  EXPECT_EQ(m.value("dewmargin_loop_supply_celsius" + l), 16.2);
  EXPECT_EQ(m.value("dewmargin_loop_cooling_kilowatts" + l), 13.54);
  EXPECT_EQ(m.value("dewmargin_messages_received_total"), 1234.0);
  EXPECT_EQ(m.value("dewmargin_bad_inputs_total"), 5.0);
  EXPECT_EQ(m.value("dewmargin_commands_rejected_total"), 2.0);
  EXPECT_EQ(m.value("dewmargin_broker_reconnects_total"), 1.0);
  EXPECT_EQ(m.value("dewmargin_store_write_errors_total"), 0.0);
  EXPECT_EQ(m.value("dewmargin_inbound_dropped_total"), 6.0);
  EXPECT_EQ(m.value("dewmargin_outbox_dropped_total"), 3.0);
  EXPECT_EQ(m.value("dewmargin_store_commit_seconds_sum"), 0.0025);
  EXPECT_EQ(m.value("dewmargin_store_commit_seconds_count"), 4.0);
  EXPECT_EQ(m.value("dewmargin_broker_connected"), 1.0);
}

TEST(MetricsText, TheCheckerCatchesBrokenRules) {
  // The checker itself must find what it claims to check.
  const struct {
    const char* text;
    const char* problem;
  } cases[] = {
      {"# TYPE a_total counter\na_total 1", "the last line does not end in \\n"},
      {"# TYPE a counter\na 1\n", "line 1: counter a does not end in _total"},
      {"a 1\n", "line 1: sample of a before (or without) its TYPE"},
      {"# TYPE a gauge\na{x=\"1\"} 1\n# TYPE b gauge\nb 1\na{x=\"2\"} 2\n",
       "line 5: family a is split into several groups"},
      {"# TYPE a gauge\na{x=\"1\"} 1\na{x=\"1\"} 2\n", "line 3: series twice: a{x=\"1\"}"},
      {"# TYPE a gauge\na{x=\"\\q\"} 1\n", "line 2: bad escape in a label value"},
      {"# TYPE a gauge\n# TYPE a gauge\na 1\n", "line 2: second TYPE for a"},
      {"# TYPE a gauge\na{__x=\"1\"} 1\n", "line 2: bad label name '__x'"},
      {"# TYPE a gauge\na one\n", "line 2: bad value 'one'"},
  };
  for (const auto& c : cases) {
    const auto r = test_support::check_exposition(c.text);
    ASSERT_FALSE(r.problems.empty()) << c.text;
    EXPECT_EQ(r.problems.front(), c.problem) << c.text;
  }
}

TEST(LiveSnapshot, KeepsLatestStatesAndEachZonesMarginHistory) {
  live_snapshot s("dm");
  for (int minute = 0; minute < 5; ++minute) {
    s.on_published("dm/zone/z/state", R"({"zone":"z","band":"safe","ts":"2026-07-14T13:0)" + std::to_string(minute) +
                                          R"(:00Z","margin_k":)" + std::to_string(3 - minute * 0.5) + "}");
  }
  s.on_published("dm/loop/l/state", R"({"loop":"l"})");
  const auto copy = s.take(true);
  EXPECT_EQ(copy.states.size(), 2u);
  ASSERT_EQ(copy.margins.at("z").size(), 5u);
  EXPECT_DOUBLE_EQ(*copy.margins.at("z").back().margin_k, 1.0);
  EXPECT_TRUE(s.take(false).margins.empty());
  s.on_published("dm/loop/l/state", "");  // a cleared retained state
  EXPECT_EQ(s.take(false).states.size(), 1u);
}

}  // namespace
}  // namespace dewmargin
