#include <gtest/gtest.h>

#include <nlohmann/json.hpp>
#include <optional>
#include <set>
#include <string>
#include <vector>

#include "dewmargin/message_json.h"

namespace dewmargin {
namespace {

const timestamp k_ts = from_unix_ms(1'784'034'000'000);  // 2026-07-14T13:00:00Z

std::set<std::string> keys_of(const nlohmann::json& j) {
  std::set<std::string> keys;
  for (const auto& item : j.items()) keys.insert(item.key());
  return keys;
}

zone_state_view full_zone() {
  zone_state_view v;
  v.site = "example-site";
  v.zone = "level2-east";
  v.ts = k_ts;
  v.band = "tight";
  v.dew_point_c = 14.456;
  v.air_temp_c = 24.0;
  v.rh_pct = 55.004;
  v.surface_min_c = 16.1;
  v.supply_c = 15.999;
  v.margin_k = 1.644;
  v.margin_source = "surface";
  v.valve = "open";
  v.alarm = alarm_status{true, false, k_ts + std::chrono::minutes(30)};
  v.minutes_to_condensation = 41.2345;
  return v;
}

zone_state_view empty_zone() {
  zone_state_view v;
  v.site = "example-site";
  v.zone = "level2-east";
  v.ts = k_ts;
  v.band = "unknown";
  v.margin_source = nullptr;
  v.valve = nullptr;
  return v;
}

loop_state_view full_loop() {
  loop_state_view v;
  v.site = "example-site";
  v.loop = "loop-a";
  v.ts = k_ts;
  v.setpoint_c = 16.456;
  v.supply_c = 16.2;
  v.return_c = 19.004;
  v.flow_l_s = 0.8;
  v.reason = "level2-east dew point 14.46 °C + 2.00 K";
  v.limited = "none";
  v.cooling_kw = 9.6789;
  return v;
}

TEST(ZoneStateJson, HasExactlyTheKeysOfTheDesign) {
  // design.md, plus minutes_to_condensation, valve_hold (issue 10, rule 2), suppressed_by (rule 4)
  // and surface_rh_pct (the mould criterion, for the live views).
  const std::set<std::string> expected = {"site",
                                          "zone",
                                          "ts",
                                          "band",
                                          "dew_point_c",
                                          "air_temp_c",
                                          "rh_pct",
                                          "surface_min_c",
                                          "supply_c",
                                          "margin_k",
                                          "margin_source",
                                          "valve",
                                          "alarm",
                                          "minutes_to_condensation",
                                          "valve_hold",
                                          "suppressed_by",
                                          "surface_rh_pct"};
  const auto j = nlohmann::json::parse(format_zone_state(full_zone()));
  EXPECT_EQ(keys_of(j), expected);
  EXPECT_EQ(keys_of(j["alarm"]), (std::set<std::string>{"active", "acknowledged", "shelved_until"}));
  EXPECT_EQ(keys_of(nlohmann::json::parse(format_zone_state(empty_zone()))), expected) << "also when unknown";
}

TEST(ZoneStateJson, CarriesTheValuesRoundedToHundredths) {
  const auto j = nlohmann::json::parse(format_zone_state(full_zone()));
  EXPECT_EQ(j["site"], "example-site");
  EXPECT_EQ(j["zone"], "level2-east");
  EXPECT_EQ(j["ts"], "2026-07-14T13:00:00Z");
  EXPECT_EQ(j["band"], "tight");
  EXPECT_EQ(j["dew_point_c"], 14.46);
  EXPECT_EQ(j["air_temp_c"], 24.0);
  EXPECT_EQ(j["rh_pct"], 55.0);
  EXPECT_EQ(j["surface_min_c"], 16.1);
  EXPECT_EQ(j["supply_c"], 16.0);
  EXPECT_EQ(j["margin_k"], 1.64);
  EXPECT_EQ(j["margin_source"], "surface");
  EXPECT_EQ(j["valve"], "open");
  EXPECT_EQ(j["alarm"]["active"], true);
  EXPECT_EQ(j["alarm"]["acknowledged"], false);
  EXPECT_EQ(j["alarm"]["shelved_until"], "2026-07-14T13:30:00Z");
  EXPECT_EQ(j["minutes_to_condensation"], 41.23);
}

TEST(ZoneStateJson, WritesUnknownValuesAsNull) {
  const auto j = nlohmann::json::parse(format_zone_state(empty_zone()));
  for (const char* key : {"dew_point_c", "air_temp_c", "rh_pct", "surface_min_c", "supply_c", "margin_k",
                          "margin_source", "valve", "minutes_to_condensation"}) {
    EXPECT_TRUE(j[key].is_null()) << key;
  }
  EXPECT_TRUE(j["alarm"]["shelved_until"].is_null());
  EXPECT_EQ(j["alarm"]["active"], false);
  EXPECT_EQ(j["alarm"]["acknowledged"], true);
}

TEST(ZoneStateJson, PrintsRoundedNumbersWithoutBinaryNoise) {
  const std::string text = format_zone_state(full_zone());
  EXPECT_NE(text.find("\"dew_point_c\":14.46,"), std::string::npos) << text;
  EXPECT_NE(text.find("\"margin_k\":1.64,"), std::string::npos) << text;
}

struct rounding_case {
  double value;
  double expected;
  const char* text;  // as it appears in the JSON
};

TEST(ZoneStateJson, RoundsToHundredths) {
  const std::vector<rounding_case> cases = {
      {14.456, 14.46, "14.46"}, {14.454, 14.45, "14.45"}, {-1.236, -1.24, "-1.24"},
      {-0.004, 0.0, "0.0"},     {0.1 + 0.2, 0.3, "0.3"},  {21.0, 21.0, "21.0"},
  };
  for (const auto& c : cases) {
    zone_state_view v = full_zone();
    v.margin_k = c.value;
    const std::string text = format_zone_state(v);
    const auto j = nlohmann::json::parse(text);
    EXPECT_EQ(j["margin_k"].get<double>(), c.expected) << c.value;
    EXPECT_NE(text.find(std::string("\"margin_k\":") + c.text + ","), std::string::npos) << c.value << ": " << text;
  }
}

TEST(ZoneStateJson, WritesMillisecondsOnlyWhenThereAreAny) {
  zone_state_view v = empty_zone();
  v.ts = k_ts + std::chrono::milliseconds(250);
  EXPECT_EQ(nlohmann::json::parse(format_zone_state(v))["ts"], "2026-07-14T13:00:00.250Z");
}

TEST(LoopStateJson, HasExactlyTheKeysOfTheDesign) {
  // design.md, plus return_c and flow_l_s.
  const std::set<std::string> expected = {"site",   "loop",    "ts",         "setpoint_c", "supply_c",
                                          "reason", "limited", "cooling_kw", "return_c",   "flow_l_s"};
  EXPECT_EQ(keys_of(nlohmann::json::parse(format_loop_state(full_loop()))), expected);
}

TEST(LoopStateJson, CarriesTheValuesRoundedToHundredths) {
  const auto j = nlohmann::json::parse(format_loop_state(full_loop()));
  EXPECT_EQ(j["site"], "example-site");
  EXPECT_EQ(j["loop"], "loop-a");
  EXPECT_EQ(j["ts"], "2026-07-14T13:00:00Z");
  EXPECT_EQ(j["setpoint_c"], 16.46);
  EXPECT_EQ(j["supply_c"], 16.2);
  EXPECT_EQ(j["return_c"], 19.0);
  EXPECT_EQ(j["flow_l_s"], 0.8);
  EXPECT_EQ(j["reason"], "level2-east dew point 14.46 °C + 2.00 K");
  EXPECT_EQ(j["limited"], "none");
  EXPECT_EQ(j["cooling_kw"], 9.68);
}

TEST(LoopStateJson, WritesUnknownValuesAsNull) {
  loop_state_view v = full_loop();
  v.supply_c.reset();
  v.return_c.reset();
  v.flow_l_s.reset();
  v.cooling_kw.reset();
  const auto j = nlohmann::json::parse(format_loop_state(v));
  for (const char* key : {"supply_c", "return_c", "flow_l_s", "cooling_kw"}) EXPECT_TRUE(j[key].is_null()) << key;
  EXPECT_EQ(j["setpoint_c"], 16.46) << "the setpoint is always known";
}

TEST(EventJson, StartsWithTheCommonFieldsAndAddsExtras) {
  event_json e("example-site", k_ts, subject_type::zone, "level2-east", "band");
  e.text("from", "safe").text("to", "tight").number("margin_k", 1.456).number("dew_point_c", std::nullopt);
  e.text_or_null("reason", "").integer("count", 3).null("by").alarm(alarm_status{});
  const std::string text = e.dump();
  EXPECT_EQ(text.rfind(R"({"ts":"2026-07-14T13:00:00Z","site":"example-site","zone":"level2-east","kind":"band",)", 0),
            0u)
      << text;
  const auto j = nlohmann::json::parse(text);
  EXPECT_EQ(j["from"], "safe");
  EXPECT_EQ(j["to"], "tight");
  EXPECT_EQ(j["margin_k"], 1.46);
  EXPECT_TRUE(j["dew_point_c"].is_null());
  EXPECT_TRUE(j["reason"].is_null());
  EXPECT_EQ(j["count"], 3);
  EXPECT_TRUE(j["by"].is_null());
  EXPECT_EQ(keys_of(j["alarm"]), (std::set<std::string>{"active", "acknowledged", "shelved_until"}));
}

TEST(EventJson, HasFromAndToEvenWhenNotSet) {
  const auto j = nlohmann::json::parse(event_json("s", k_ts, subject_type::loop, "loop-a", "setpoint").dump());
  EXPECT_EQ(keys_of(j), (std::set<std::string>{"ts", "site", "loop", "kind", "from", "to"}));
  EXPECT_TRUE(j["from"].is_null());
  EXPECT_TRUE(j["to"].is_null());
}

TEST(EventJson, NamesNoSubjectForSiteEvents) {
  const auto j = nlohmann::json::parse(event_json("s", k_ts, subject_type::site, "", "service").dump());
  EXPECT_EQ(keys_of(j), (std::set<std::string>{"ts", "site", "kind", "from", "to"}));
}

// Outside text (a topic, a payload excerpt, a config value) may hold any bytes: building
// and writing the document must not throw, and what goes out is valid UTF-8.
TEST(EventJson, WritesInvalidUtf8AsReplacementCharacters) {
  event_json e("site-\xFF", k_ts, subject_type::zone, "z\xC3", "input");
  e.text("topic", "b/\x80/temp").text("reason", "payload '\xE2\x82' is not a number").text_or_null("by", "\xC0");
  std::string text;
  ASSERT_NO_THROW(text = e.dump());
  const auto j = nlohmann::json::parse(text);
  EXPECT_EQ(j["site"], "site-\xEF\xBF\xBD");
  EXPECT_EQ(j["zone"], "z\xEF\xBF\xBD");
  EXPECT_EQ(j["topic"], "b/\xEF\xBF\xBD/temp");
  EXPECT_EQ(j["reason"], "payload '\xEF\xBF\xBD' is not a number");
  EXPECT_EQ(j["by"], "\xEF\xBF\xBD");
}

TEST(ZoneStateJson, WritesInvalidUtf8InNamesAsReplacementCharacters) {
  zone_state_view z = full_zone();
  z.site = "\x80";
  z.zone = "a\xF0\x9F";
  std::string zone_text;
  ASSERT_NO_THROW(zone_text = format_zone_state(z));
  EXPECT_EQ(nlohmann::json::parse(zone_text)["zone"], "a\xEF\xBF\xBD");
  loop_state_view l = full_loop();
  l.loop = "\xFE";
  l.reason = "r\xC2";
  std::string loop_text;
  ASSERT_NO_THROW(loop_text = format_loop_state(l));
  EXPECT_EQ(nlohmann::json::parse(loop_text)["reason"], "r\xEF\xBF\xBD");
}

struct bare_case {
  double value;
  const char* text;
};

TEST(BareNumber, HasTwoDecimalsAndNoExponent) {
  const std::vector<bare_case> cases = {
      {17.9, "17.90"}, {20.0, "20.00"},     {15.456, "15.46"}, {15.454, "15.45"},   {-0.001, "0.00"},
      {-2.5, "-2.50"}, {1234.5, "1234.50"}, {1e-9, "0.00"},    {0.1 + 0.2, "0.30"},
  };
  for (const auto& c : cases) EXPECT_EQ(format_bare_number(c.value), c.text) << c.value;
}

}  // namespace
}  // namespace dewmargin
