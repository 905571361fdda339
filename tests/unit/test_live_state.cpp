// Parsing of the retained state payloads (docs/interface.md, "Topics it publishes").
#include <gtest/gtest.h>

#include "dewmargin/live_state.h"

namespace dewmargin::live {
namespace {

// The zone state example of docs/interface.md.
constexpr const char* k_zone_example =
    R"({"site":"harbour-lane-office","zone":"first-south-meeting","ts":"2026-07-14T13:04:10Z","band":"condensing",)"
    R"("dew_point_c":17.21,"air_temp_c":25.4,"rh_pct":61.0,"surface_min_c":17.1,"supply_c":16.2,"margin_k":-0.11,)"
    R"("margin_source":"surface","valve":"closed",)"
    R"("alarm":{"active":true,"acknowledged":false,"shelved_until":null},"minutes_to_condensation":0.0})";

TEST(LiveState, ReadsTheDocumentedZoneState) {
  auto z = parse_zone_state(k_zone_example);
  ASSERT_TRUE(z) << z.err().message;
  const zone_view& v = z.value();
  EXPECT_EQ(v.zone, "first-south-meeting");
  EXPECT_EQ(v.site, "harbour-lane-office");
  EXPECT_EQ(v.band, "condensing");
  EXPECT_DOUBLE_EQ(*v.margin_k, -0.11);
  EXPECT_DOUBLE_EQ(*v.dew_point_c, 17.21);
  EXPECT_DOUBLE_EQ(*v.surface_min_c, 17.1);
  EXPECT_DOUBLE_EQ(*v.supply_c, 16.2);
  EXPECT_DOUBLE_EQ(*v.minutes_to_condensation, 0.0);
  EXPECT_EQ(v.valve, "closed");
  EXPECT_TRUE(v.valve_hold.empty());
  EXPECT_FALSE(v.surface_rh_pct);
  EXPECT_EQ(format_iso8601_utc(*v.ts), "2026-07-14T13:04:10Z");
  EXPECT_EQ(display_of(v.alarm), alarm_display::active);
}

TEST(LiveState, KeepsFieldsOfLaterVersionsAndIgnoresUnknownOnes) {
  auto z = parse_zone_state(
      R"({"zone":"z","band":"tight","margin_k":1.2,"valve":"closed","valve_hold":"dew point above supply - 1.0 K",)"
      R"("surface_rh_pct":88.5,"alarm":{"active":false,"acknowledged":true,"shelved_until":null,)"
      R"("suppressed_by":"doas-1"},"something_new":{"x":1}})");
  ASSERT_TRUE(z) << z.err().message;
  EXPECT_EQ(z.value().valve_hold, "dew point above supply - 1.0 K");
  EXPECT_DOUBLE_EQ(*z.value().surface_rh_pct, 88.5);
  EXPECT_EQ(display_of(z.value().alarm), alarm_display::suppressed);
}

TEST(LiveState, RejectsPayloadsThatAreNotTheStateNamingTheField) {
  const struct {
    const char* payload;
    const char* error;
  } cases[] = {
      {"not json", "zone state: not JSON"},
      {"[1,2]", "zone state: not a JSON object"},
      {R"({"band":"safe"})", "zone state: 'zone' is not a non-empty string"},
      {R"({"zone":"z"})", "zone state: 'band' is not a non-empty string"},
      {R"({"zone":"z","band":"safe","margin_k":"1.5"})", "zone state: 'margin_k' is not a number or null"},
      {R"({"zone":"z","band":"safe","ts":"yesterday"})", "zone state: 'ts' is not an ISO 8601 time"},
      {R"({"zone":"z","band":"safe","alarm":{"active":1}})", "zone state: 'alarm.active' is not true or false"},
  };
  for (const auto& c : cases) {
    auto z = parse_zone_state(c.payload);
    ASSERT_FALSE(z) << c.payload;
    EXPECT_EQ(z.err().message, c.error) << c.payload;
  }
}

TEST(LiveState, AlarmStatesFollowIsa182) {
  // ISA-18.2 alarm states (normal, unacknowledged, acknowledged, returned unacknowledged,
  // shelved, suppressed by design); names are ours.
  const struct {
    alarm_view alarm;
    alarm_display expected;
  } cases[] = {
      {{false, true, std::nullopt, std::nullopt}, alarm_display::none},
      {{true, false, std::nullopt, std::nullopt}, alarm_display::active},
      {{true, true, std::nullopt, std::nullopt}, alarm_display::acknowledged},
      {{false, false, std::nullopt, std::nullopt}, alarm_display::latched},
      {{true, false, std::string("2026-07-14T14:00:00Z"), std::nullopt}, alarm_display::shelved},
      {{true, false, std::nullopt, std::string("doas-1")}, alarm_display::suppressed},
  };
  for (const auto& c : cases) EXPECT_EQ(display_of(c.alarm), c.expected) << alarm_display_name(c.expected);
}

TEST(LiveState, BandsRankWorstLastAndUnknownNamesRankAsUnknown) {
  EXPECT_LT(band_severity("safe"), band_severity("tight"));
  EXPECT_LT(band_severity("tight"), band_severity("alarm"));
  EXPECT_LT(band_severity("alarm"), band_severity("condensing"));
  EXPECT_LT(band_severity("condensing"), band_severity("unknown"));
  EXPECT_EQ(band_severity("flooded"), band_severity("unknown"));
}

TEST(LiveState, ReadsLoopStatusAndSummarizesEvents) {
  auto l = parse_loop_state(
      R"({"site":"s","loop":"ceiling-south","ts":"2026-07-14T13:04:10Z","setpoint_c":19.21,"supply_c":16.2,)"
      R"("return_c":18.9,"flow_l_s":1.2,"reason":"r","limited":"none","cooling_kw":13.54})");
  ASSERT_TRUE(l) << l.err().message;
  EXPECT_DOUBLE_EQ(*l.value().cooling_kw, 13.54);
  auto s = parse_status(
      R"({"state":"offline","site":"s","version":"0.1.0","ts":"2026-07-14T13:04:10Z","reason":"stopped"})");
  ASSERT_TRUE(s);
  EXPECT_EQ(s.value().state, "offline");

  const struct {
    const char* payload;
    const char* text;
  } events[] = {
      {R"({"ts":"t","site":"s","zone":"room-a","kind":"ack","from":"unacknowledged","to":"acknowledged","by":"JK","note":null})",
       "ack room-a unacknowledged -> acknowledged by JK"},
      {R"({"ts":"t","site":"s","zone":"room-a","kind":"shelve","from":"unshelved","to":"shelved","by":"JK","minutes":30,"until":"2026-07-14T14:00:00Z"})",
       "shelve room-a unshelved -> shelved by JK until 2026-07-14T14:00:00Z"},
      {R"({"ts":"t","site":"s","zone":"room-a","kind":"rejected","from":null,"to":null,"topic":"dm/cmd/ack","reason":"nothing to acknowledge"})",
       "rejected room-a: nothing to acknowledge (dm/cmd/ack)"},
  };
  for (const auto& e : events) {
    auto sum = summarize_event(e.payload);
    ASSERT_TRUE(sum) << e.payload;
    EXPECT_EQ(sum->text, e.text);
  }
  EXPECT_FALSE(summarize_event("17.5"));
}

}  // namespace
}  // namespace dewmargin::live
