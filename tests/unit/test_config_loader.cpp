#include <gtest/gtest.h>

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <random>
#include <regex>
#include <string>
#include <vector>

#include "dewmargin/config_loader.h"
#include "dewmargin/message_json.h"
#include "dewmargin/safe_text.h"

namespace dewmargin {
namespace {

namespace fs = std::filesystem;

const fs::path k_config_data = fs::path(DEWMARGIN_TEST_DATA_DIR) / "config";

std::vector<std::string> yaml_files_in(const fs::path& dir) {
  std::vector<std::string> names;
  for (const auto& e : fs::directory_iterator(dir)) {
    if (e.path().extension() == ".yaml") names.push_back(e.path().filename().string());
  }
  std::sort(names.begin(), names.end());
  return names;
}

std::string all_errors(const config_load_result& r) {
  std::string s;
  for (const auto& e : r.errors) s += "\n  " + e.to_string();
  return s;
}

std::string name_of_file(const ::testing::TestParamInfo<std::string>& info) {
  std::string n = fs::path(info.param).stem().string();
  std::replace_if(
      n.begin(), n.end(), [](char c) { return !std::isalnum(static_cast<unsigned char>(c)); }, '_');
  return n;
}

// ---- bad fixtures: each file states its errors in leading "# expect: LINE:COL: text" lines

struct expected_error {
  int line;
  int column;
  std::string message_part;
};

std::vector<expected_error> expectations_of(const fs::path& file) {
  std::ifstream in(file);
  std::vector<expected_error> out;
  const std::regex pattern(R"(^# expect: (\d+):(\d+): (.+)$)");
  std::string text;
  while (std::getline(in, text)) {
    std::smatch m;
    if (!std::regex_match(text, m, pattern)) break;
    out.push_back({std::stoi(m[1].str()), std::stoi(m[2].str()), m[3].str()});
  }
  return out;
}

class BadConfigFixture : public ::testing::TestWithParam<std::string> {};

TEST_P(BadConfigFixture, ReportsExactlyTheExpectedLocatedErrors) {
  const fs::path file = k_config_data / "bad" / GetParam();
  const auto expected = expectations_of(file);
  ASSERT_FALSE(expected.empty()) << file << " has no '# expect: LINE:COL: message' first line";

  const auto r = load_config_file(file);
  EXPECT_FALSE(r.ok());
  EXPECT_FALSE(r.config.has_value());
  ASSERT_EQ(r.errors.size(), expected.size()) << "errors reported:" << all_errors(r);
  for (std::size_t i = 0; i < expected.size(); ++i) {
    const auto& got = r.errors[i];
    EXPECT_EQ(got.file, file.string());
    EXPECT_EQ(got.line, expected[i].line) << got.to_string();
    EXPECT_EQ(got.column, expected[i].column) << got.to_string();
    EXPECT_NE(got.message.find(expected[i].message_part), std::string::npos)
        << "expected '" << expected[i].message_part << "' in: " << got.to_string();
  }
}

INSTANTIATE_TEST_SUITE_P(Files, BadConfigFixture, ::testing::ValuesIn(yaml_files_in(k_config_data / "bad")),
                         name_of_file);

TEST(BadConfigFixture, ThreeMistakesAreAllReportedInFileOrder) {
  const auto r = load_config_file(k_config_data / "bad" / "three_mistakes.yaml");
  ASSERT_EQ(r.errors.size(), 3u) << all_errors(r);
  EXPECT_LT(r.errors[0].line, r.errors[1].line);
  EXPECT_LT(r.errors[1].line, r.errors[2].line);
}

// ---- good fixtures

class GoodConfigFixture : public ::testing::TestWithParam<std::string> {};

TEST_P(GoodConfigFixture, LoadsWithoutErrors) {
  const auto r = load_config_file(k_config_data / "good" / GetParam());
  EXPECT_TRUE(r.ok()) << all_errors(r);
  EXPECT_TRUE(r.errors.empty());
}

INSTANTIATE_TEST_SUITE_P(Files, GoodConfigFixture, ::testing::ValuesIn(yaml_files_in(k_config_data / "good")),
                         name_of_file);

site_config load_good(const char* name) {
  auto r = load_config_file(k_config_data / "good" / name);
  if (!r.ok()) ADD_FAILURE() << name << all_errors(r);
  return r.config.value_or(site_config{});
}

TEST(ConfigLoader, MinimalConfigTakesTheDocumentedDefaults) {
  const site_config c = load_good("minimal.yaml");
  EXPECT_EQ(c.site, "test-site");
  EXPECT_EQ(c.broker.uri, "tcp://127.0.0.1:1883");
  EXPECT_EQ(c.broker.client_id, "dewmargin-test");
  EXPECT_EQ(c.broker.keepalive_s, 30.0);
  EXPECT_FALSE(c.broker.tls.has_value());
  EXPECT_EQ(c.storage.path, "/tmp/dewmargin-test.db");
  EXPECT_EQ(c.storage.keep_events_days, 730.0);
  EXPECT_EQ(c.storage.keep_samples_days, 400.0);
  EXPECT_EQ(c.storage.keep_minute_samples_days, 35.0);
  EXPECT_EQ(c.publish.prefix, "dewmargin");
  EXPECT_EQ(c.publish.min_interval_s, 5.0);
  EXPECT_EQ(c.logging.level, "info");
  EXPECT_EQ(c.plausibility.humidity_pct.max, 103.0);

  ASSERT_EQ(c.loops.size(), 1u);
  const loop_config& l = c.loops[0];
  EXPECT_EQ(l.id, "loop-a");
  EXPECT_EQ(l.supply_temp.topic, "plant/loop-a/supply");
  EXPECT_EQ(l.supply_temp.unit, input_unit::celsius);
  EXPECT_FALSE(l.return_temp.has_value());
  EXPECT_FALSE(l.flow.has_value());
  EXPECT_EQ(l.setpoint.topic, "plant/loop-a/supply-sp/set");
  EXPECT_EQ(l.setpoint.min_c, 15.0);
  EXPECT_EQ(l.setpoint.max_c, 20.0);
  EXPECT_EQ(l.setpoint.reset_margin_k, 2.0);
  EXPECT_EQ(l.setpoint.fall_k_per_min, 0.2);
  EXPECT_EQ(l.stale_after_s, 180.0);

  ASSERT_EQ(c.zones.size(), 1u);
  const zone_config& z = c.zones[0];
  EXPECT_EQ(z.id, "room-1");
  EXPECT_EQ(z.loop, "loop-a");
  EXPECT_EQ(z.air_temp.topic, "bldg/room-1/temp");
  EXPECT_EQ(z.air_temp.field, "");
  EXPECT_EQ(z.air_temp.unit, input_unit::celsius);
  EXPECT_FALSE(z.air_temp.stale_after_s.has_value());
  ASSERT_EQ(z.humidity.size(), 1u);
  EXPECT_EQ(z.humidity[0].unit, input_unit::percent);
  EXPECT_TRUE(z.surfaces.empty());
  EXPECT_FALSE(z.valve.has_value());
  EXPECT_FALSE(z.condensation_switch.has_value());
  EXPECT_FALSE(z.window_contact.has_value());
  EXPECT_EQ(z.thresholds.margin_warn_k, 2.0);
  EXPECT_EQ(z.thresholds.margin_alarm_k, 1.0);
  EXPECT_EQ(z.thresholds.hysteresis_k, 0.3);
  EXPECT_EQ(z.thresholds.confirm_s, 30.0);
  EXPECT_EQ(z.thresholds.stale_after_s, 180.0);
  EXPECT_EQ(z.thresholds.trend_window_s, 600.0);
  EXPECT_TRUE(c.dehumidifiers.empty());
}

TEST(ConfigLoader, JsonSensorFeedsSeveralInputsFromOneTopicByField) {
  const site_config c = load_good("json_field_sensor.yaml");
  EXPECT_EQ(c.broker.uri, "ssl://broker.test:8883");
  EXPECT_EQ(c.broker.username, "gateway");
  EXPECT_EQ(c.broker.password_file, "secrets/broker.secret");  // relative, not checked at load
  ASSERT_TRUE(c.broker.tls.has_value());
  EXPECT_EQ(c.broker.tls->ca_file, "tls/ca.pem");
  EXPECT_EQ(c.broker.tls->cert_file, "tls/client.pem");
  EXPECT_EQ(c.broker.tls->key_file, "tls/client.key");
  EXPECT_EQ(c.broker.keepalive_s, 45.0);
  EXPECT_EQ(c.storage.keep_events_days, 365.0);
  EXPECT_EQ(c.publish.prefix, "site/dewmargin");
  EXPECT_EQ(c.publish.min_interval_s, 10.0);
  EXPECT_EQ(c.logging.level, "debug");

  ASSERT_EQ(c.loops.size(), 1u);
  const loop_config& l = c.loops[0];
  EXPECT_EQ(l.supply_temp.topic, "plant/loop-a/status");
  EXPECT_EQ(l.supply_temp.field, "/supply_c");
  ASSERT_TRUE(l.return_temp.has_value());
  EXPECT_EQ(l.return_temp->field, "/return_c");
  ASSERT_TRUE(l.flow.has_value());
  EXPECT_EQ(l.flow->unit, input_unit::cubic_metres_per_hour);
  EXPECT_EQ(l.stale_after_s, 60.0);
  EXPECT_EQ(l.setpoint.reset_margin_k, 1.5);
  EXPECT_EQ(l.setpoint.fall_k_per_min, 0.1);

  ASSERT_EQ(c.zones.size(), 1u);
  const zone_config& z = c.zones[0];
  EXPECT_EQ(z.air_temp.topic, "bldg/room-1/multisensor");
  EXPECT_EQ(z.air_temp.field, "/temperature");
  ASSERT_EQ(z.humidity.size(), 1u);
  EXPECT_EQ(z.humidity[0].topic, "bldg/room-1/multisensor");
  EXPECT_EQ(z.humidity[0].field, "/humidity");
  ASSERT_TRUE(z.humidity[0].stale_after_s.has_value());
  EXPECT_EQ(*z.humidity[0].stale_after_s, 0.0);  // never stale
  ASSERT_EQ(z.surfaces.size(), 1u);
  EXPECT_EQ(z.surfaces[0].field, "/ceiling/surface_c");
  ASSERT_TRUE(z.condensation_switch.has_value());
  EXPECT_EQ(z.condensation_switch->field, "/wet");
  // YAML's true and 1 are kept as the payload text they stand for.
  EXPECT_EQ(z.condensation_switch->active, (std::vector<std::string>{"true", "1", "wet"}));
  EXPECT_EQ(z.condensation_switch->unit, input_unit::none);
  ASSERT_TRUE(z.window_contact.has_value());
  EXPECT_EQ(z.window_contact->active, (std::vector<std::string>{"open", "tilted"}));
  EXPECT_EQ(z.window_contact->inactive, (std::vector<std::string>{"shut", "false", "0"}));
  EXPECT_TRUE(z.condensation_switch->inactive.empty()) << "none written: the decoder's defaults apply";
  ASSERT_TRUE(z.valve.has_value());
  EXPECT_EQ(z.valve->topic, "bldg/room-1/valve/set");
  EXPECT_EQ(z.valve->open_payload, "100");
  EXPECT_EQ(z.valve->closed_payload, "0");
  EXPECT_EQ(z.valve->reopen_after_s, 900.0);
}

TEST(ConfigLoader, ReadsFahrenheitFractionAndFlowUnits) {
  const site_config c = load_good("fahrenheit_fraction.yaml");
  ASSERT_EQ(c.loops.size(), 2u);
  EXPECT_EQ(c.loops[0].supply_temp.unit, input_unit::fahrenheit);
  EXPECT_EQ(c.loops[0].return_temp->unit, input_unit::fahrenheit);
  EXPECT_EQ(c.loops[0].flow->unit, input_unit::us_gallons_per_minute);
  EXPECT_EQ(c.loops[1].supply_temp.unit, input_unit::celsius);
  EXPECT_EQ(c.loops[1].flow->unit, input_unit::litres_per_second);
  EXPECT_EQ(c.loops[1].setpoint.min_c, c.loops[1].setpoint.max_c);  // a fixed setpoint is allowed
  ASSERT_EQ(c.zones.size(), 2u);
  EXPECT_EQ(c.zones[0].air_temp.unit, input_unit::fahrenheit);
  EXPECT_EQ(c.zones[0].humidity[0].unit, input_unit::fraction);
  ASSERT_EQ(c.zones[0].surfaces.size(), 2u);
  EXPECT_EQ(c.zones[0].surfaces[0].unit, input_unit::fahrenheit);
  EXPECT_EQ(c.zones[0].surfaces[1].unit, input_unit::celsius);
  EXPECT_EQ(c.zones[1].humidity[0].unit, input_unit::percent);
}

TEST(ConfigLoader, MergesDefaultsWithZoneOverrides) {
  const site_config c = load_good("multiple_humidity.yaml");
  EXPECT_EQ(c.defaults.margin_warn_k, 2.5);
  EXPECT_EQ(c.defaults.trend_window_s, 900.0);
  ASSERT_EQ(c.zones.size(), 2u);

  const band_thresholds& open_plan = c.zones[0].thresholds;
  EXPECT_EQ(open_plan.margin_warn_k, 3.0);   // zone's own
  EXPECT_EQ(open_plan.confirm_s, 45.0);      // zone's own
  EXPECT_EQ(open_plan.margin_alarm_k, 1.2);  // from defaults
  EXPECT_EQ(open_plan.hysteresis_k, 0.4);
  EXPECT_EQ(open_plan.stale_after_s, 120.0);
  EXPECT_EQ(open_plan.trend_window_s, 900.0);

  const band_thresholds& meeting = c.zones[1].thresholds;
  EXPECT_EQ(meeting.margin_warn_k, 2.5);
  EXPECT_EQ(meeting.margin_alarm_k, 1.2);
  EXPECT_EQ(meeting.confirm_s, 20.0);

  ASSERT_EQ(c.zones[0].humidity.size(), 2u);
  EXPECT_EQ(c.zones[0].humidity[0].topic, "bldg/open-plan/rh-north");
  EXPECT_FALSE(c.zones[0].humidity[0].stale_after_s.has_value());
  EXPECT_EQ(c.zones[0].humidity[1].topic, "bldg/open-plan/rh-south");
  EXPECT_EQ(c.zones[0].humidity[1].stale_after_s.value_or(-1.0), 600.0);
  EXPECT_EQ(c.zones[0].surfaces.size(), 2u);

  ASSERT_EQ(c.loops.size(), 2u);
  EXPECT_EQ(c.loops[0].stale_after_s, 120.0);  // defaults.stale_after_s
  EXPECT_EQ(c.loops[1].stale_after_s, 300.0);  // the loop's own

  EXPECT_EQ(c.plausibility.air_temp_c.min, -10.0);
  EXPECT_EQ(c.plausibility.air_temp_c.max, 50.0);
  EXPECT_EQ(c.plausibility.humidity_pct.max, 101.0);
  EXPECT_EQ(c.plausibility.water_c.max, 90.0);  // untouched default

  ASSERT_EQ(c.dehumidifiers.size(), 1u);
  EXPECT_EQ(c.dehumidifiers[0].zones, (std::vector<std::string>{"open-plan", "meeting"}));
  EXPECT_EQ(c.dehumidifiers[0].dew_point_request.min_c, 8.0);
  EXPECT_EQ(c.dehumidifiers[0].dew_point_request.max_c, 14.0);
  EXPECT_EQ(c.dehumidifiers[0].dew_point_request.offset_k, 3.0);
}

TEST(ConfigLoader, ExampleConfigOfTheRepositoryIsValid) {
  const auto r = load_config_file(fs::path(DEWMARGIN_SOURCE_DIR) / "config" / "example.yaml");
  ASSERT_TRUE(r.ok()) << all_errors(r);
  const site_config& c = *r.config;
  EXPECT_EQ(c.loops.size(), 3u);
  EXPECT_EQ(c.zones.size(), 6u);
  EXPECT_EQ(c.dehumidifiers.size(), 1u);
  const auto has = [&](auto pred) { return std::any_of(c.zones.begin(), c.zones.end(), pred); };
  EXPECT_TRUE(has([](const zone_config& z) { return !z.air_temp.field.empty(); }));
  EXPECT_TRUE(has([](const zone_config& z) { return z.window_contact.has_value(); }));
  EXPECT_TRUE(has([](const zone_config& z) { return z.condensation_switch.has_value(); }));
  EXPECT_TRUE(has([](const zone_config& z) { return z.valve.has_value(); }));
}

// ---- rules checked on small texts (one error each)

const std::string k_head =
    "site: s\n"
    "broker: {uri: tcp://127.0.0.1:1883, client_id: c}\n"
    "storage: {path: p.db}\n";
const std::string k_loop =
    "loops:\n"
    "  - {id: la, supply_temp: {topic: p/s}, setpoint: {topic: p/sp, min_c: 15, max_c: 20}}\n";
const std::string k_zone =
    "zones:\n"
    "  - {id: z1, loop: la, air_temp: {topic: b/t}, humidity: {topic: b/h}}\n";
const std::string k_zone_block =  // lines 6-10, so a test can add keys to the zone
    "zones:\n"
    "  - id: z1\n"
    "    loop: la\n"
    "    air_temp: {topic: b/t}\n"
    "    humidity: {topic: b/h}\n";

struct text_case {
  const char* name;
  std::string yaml;
  int line;
  int column;
  const char* message_part;
};

class ConfigRule : public ::testing::TestWithParam<text_case> {};

TEST_P(ConfigRule, ReportsOneLocatedError) {
  const text_case& c = GetParam();
  const auto r = load_config_text(c.yaml, "t.yaml");
  ASSERT_EQ(r.errors.size(), 1u) << c.name << all_errors(r);
  EXPECT_FALSE(r.config.has_value());
  EXPECT_EQ(r.errors[0].line, c.line) << r.errors[0].to_string();
  EXPECT_EQ(r.errors[0].column, c.column) << r.errors[0].to_string();
  EXPECT_NE(r.errors[0].message.find(c.message_part), std::string::npos) << r.errors[0].to_string();
}

const text_case k_rule_cases[] = {
    {"prefix_wildcard", k_head + "publish: {prefix: dm/#}\n" + k_loop + k_zone, 4, 19,
     "publish prefix 'dm/#' must not contain the MQTT wildcards"},
    {"prefix_trailing_slash", k_head + "publish: {prefix: dm/}\n" + k_loop + k_zone, 4, 19,
     "publish prefix 'dm/' must not start or end with '/'"},
    {"prefix_empty", k_head + "publish: {prefix: ''}\n" + k_loop + k_zone, 4, 19, "publish prefix must not be empty"},
    {"tls_on_plain_tcp",
     "site: s\nbroker: {uri: tcp://h:1883, client_id: c, tls: {ca_file: ca.pem}}\nstorage: {path: p.db}\n" + k_loop +
         k_zone,
     2, 43, "'tls' is set but uri 'tcp://h:1883' is not ssl:// or mqtts://"},
    {"key_without_cert",
     "site: s\nbroker: {uri: ssl://h:8883, client_id: c, tls: {key_file: k.pem}}\nstorage: {path: p.db}\n" + k_loop +
         k_zone,
     2, 49, "'key_file' needs the client certificate in 'cert_file'"},
    {"password_file_without_username",
     "site: s\nbroker: {uri: tcp://h, client_id: c, password_file: pw}\nstorage: {path: p.db}\n" + k_loop + k_zone, 2,
     38, "'password_file' needs a 'username'"},
    {"uri_without_host",
     "site: s\nbroker: {uri: 'mqtt://:1883', client_id: c}\nstorage: {path: p.db}\n" + k_loop + k_zone, 2, 15,
     "must name a host"},
    {"uri_bad_port", "site: s\nbroker: {uri: 'tcp://h:0', client_id: c}\nstorage: {path: p.db}\n" + k_loop + k_zone, 2,
     15, "has a bad port '0'"},
    {"client_id_empty", "site: s\nbroker: {uri: tcp://h, client_id: ''}\nstorage: {path: p.db}\n" + k_loop + k_zone, 2,
     35, "'client_id' must not be empty"},
    {"client_id_missing", "site: s\nbroker: {uri: tcp://h}\nstorage: {path: p.db}\n" + k_loop + k_zone, 2, 9,
     "broker: missing required key 'client_id'"},
    {"keepalive_fraction",
     "site: s\nbroker: {uri: tcp://h, client_id: c, keepalive_s: 2.5}\nstorage: {path: p.db}\n" + k_loop + k_zone, 2,
     51, "'keepalive_s' must be a whole number of seconds"},
    {"storage_path_missing",
     "site: s\nbroker: {uri: tcp://h, client_id: c}\nstorage: {keep_events_days: 10}\n" + k_loop + k_zone, 3, 10,
     "storage: missing required key 'path'"},
    {"retention_zero",
     "site: s\nbroker: {uri: tcp://h, client_id: c}\nstorage: {path: p, keep_samples_days: 0}\n" + k_loop + k_zone, 3,
     39, "'keep_samples_days' must be greater than 0, got 0"},
    {"rollup_zero",
     "site: s\nbroker: {uri: tcp://h, client_id: c}\nstorage: {path: p, keep_minute_samples_days: 0}\n" + k_loop +
         k_zone,
     3, 46, "'keep_minute_samples_days' must be greater than 0, got 0"},
    {"logging_level", k_head + "logging: {level: loud}\n" + k_loop + k_zone, 4, 18,
     "logging level 'loud' is not one of trace, debug, info"},
    {"clock_source", k_head + "clock: {source: gps}\n" + k_loop + k_zone, 4, 17,
     "clock source 'gps' is not one of wall, readings"},
    {"clock_field", k_head + "clock: {source: readings, field: ts}\n" + k_loop + k_zone, 4, 34,
     "'field' must be a JSON pointer starting with '/'"},
    {"plausibility_inverted", k_head + "plausibility: {water_c: {min: 30, max: 30}}\n" + k_loop + k_zone, 4, 31,
     "plausibility water_c: 'min' (30) must be below 'max' (30)"},
    {"output_reserved_by_service",
     k_head +
         "loops:\n  - {id: la, supply_temp: {topic: p/s}, setpoint: {topic: dewmargin/events, min_c: 15, max_c: "
         "20}}\n" +
         k_zone,
     5, 59, "topic 'dewmargin/events' is reserved for the service's own messages under 'dewmargin/'"},
    {"output_wildcard",
     k_head + "loops:\n  - {id: la, supply_temp: {topic: p/s}, setpoint: {topic: p/#, min_c: 15, max_c: 20}}\n" +
         k_zone,
     5, 59, "topic 'p/#' must not contain the MQTT wildcards '+' or '#' (the service publishes to exact topics)"},
    {"setpoint_min_missing",
     k_head + "loops:\n  - {id: la, supply_temp: {topic: p/s}, setpoint: {topic: p/sp, max_c: 20}}\n" + k_zone, 5, 51,
     "loop 'la' setpoint: missing required key 'min_c'"},
    {"fall_rate_zero",
     k_head +
         "loops:\n  - {id: la, supply_temp: {topic: p/s}, setpoint: {topic: p/sp, min_c: 15, max_c: 20, "
         "fall_k_per_min: 0}}\n" +
         k_zone,
     5, 103, "'fall_k_per_min' must be greater than 0, got 0"},
    {"flow_unit",
     k_head +
         "loops:\n  - {id: la, supply_temp: {topic: p/s}, flow: {topic: p/f, unit: kg/s},\n"
         "     setpoint: {topic: p/sp, min_c: 15, max_c: 20}}\n" +
         k_zone,
     5, 66, "unit 'kg/s' is not valid for a flow input; use 'L/s', 'm3/h' or 'gpm'"},
    {"temperature_unit",
     k_head + k_loop + "zones:\n  - {id: z1, loop: la, air_temp: {topic: b/t, unit: K}, humidity: {topic: b/h}}\n", 7,
     53, "unit 'K' is not valid for a temperature input; use 'C' or 'F'"},
    {"pointer_bad_escape",
     k_head + k_loop + "zones:\n  - {id: z1, loop: la, air_temp: {topic: b/t, field: /a~2}, humidity: {topic: b/h}}\n",
     7, 54, "'field' '/a~2' is not a valid JSON pointer"},
    {"unit_on_switch",
     k_head + k_loop + k_zone_block + "    condensation_switch: {topic: b/w, active: [wet], unit: C}\n", 11, 54,
     "unknown key 'unit' in zone 'z1' condensation_switch"},
    {"active_missing", k_head + k_loop + k_zone_block + "    window_contact: {topic: b/win}\n", 11, 21,
     "zone 'z1' window_contact: missing required key 'active'"},
    {"active_not_a_list", k_head + k_loop + k_zone_block + "    window_contact: {topic: b/win, active: open}\n", 11, 44,
     "'active' must be a non-empty list of payloads"},
    {"inactive_not_a_list",
     k_head + k_loop + k_zone_block + "    window_contact: {topic: b/win, active: [open], inactive: shut}\n", 11, 62,
     "'inactive' must be a non-empty list of payloads"},
    {"inactive_empty_word",
     k_head + k_loop + k_zone_block + "    window_contact: {topic: b/win, active: [open], inactive: ['']}\n", 11, 63,
     "an 'inactive' payload must not be empty"},
    {"word_both_active_and_inactive",
     k_head + k_loop + k_zone_block +
         "    condensation_switch: {topic: b/w, active: [wet, 1], inactive: [dry, '1.0']}\n",
     11, 73, "zone 'z1' condensation_switch: payload '1.0' is listed as both active and inactive"},
    {"inactive_on_a_sensor",
     k_head + k_loop +
         "zones:\n  - {id: z1, loop: la, air_temp: {topic: b/t, inactive: [x]}, humidity: {topic: b/h}}\n",
     7, 47, "unknown key 'inactive' in zone 'z1' air_temp"},
    {"valve_same_payloads", k_head + k_loop + k_zone_block + "    valve: {topic: b/v, open: x, closed: x}\n", 11, 42,
     "zone 'z1' valve: 'open' and 'closed' payloads must differ"},
    {"zone_id_with_slash",
     k_head + k_loop + "zones:\n  - {id: a/b, loop: la, air_temp: {topic: b/t}, humidity: {topic: b/h}}\n", 7, 10,
     "zone id 'a/b' must not contain '/', '+' or '#'"},
    {"humidity_empty_list", k_head + k_loop + "zones:\n  - {id: z1, loop: la, air_temp: {topic: b/t}, humidity: []}\n",
     7, 58, "'humidity' must be a map like { topic: ... } or a list of them (at least one)"},
    {"topic_empty", k_head + k_loop + "zones:\n  - {id: z1, loop: la, air_temp: {topic: ''}, humidity: {topic: b/h}}\n",
     7, 42, "'topic' must not be empty"},
    {"same_topic_same_field",
     k_head + k_loop +
         "zones:\n  - {id: z1, loop: la, air_temp: {topic: b/j, field: /t}, humidity: {topic: b/j, field: /t}}\n",
     7, 77, "topic 'b/j' field '/t' is already read by zone 'z1' air_temp (line 7)"},
    {"duplicate_loop_id",
     k_head + k_loop + "  - {id: la, supply_temp: {topic: p/s2}, setpoint: {topic: p/sp2, min_c: 15, max_c: 20}}\n" +
         k_zone,
     6, 10, "duplicate loop id 'la' (first defined at line 5)"},
    {"zones_empty", k_head + k_loop + "zones: []\n", 6, 8, "'zones' must list at least one zone"},
    {"zones_missing", k_head + k_loop, 1, 1, "missing required key 'zones'"},
    {"dehumidifier_range",
     k_head + k_loop + k_zone +
         "dehumidifiers:\n  - {id: d, zones: [z1], dew_point_request: {topic: p/d, min_c: 14, max_c: 8}}\n",
     9, 65, "dehumidifier 'd' dew_point_request: 'min_c' (14) must not be above 'max_c' (8)"},
    {"dehumidifier_no_zones",
     k_head + k_loop + k_zone +
         "dehumidifiers:\n  - {id: d, zones: [], dew_point_request: {topic: p/d, min_c: 8, max_c: 14}}\n",
     9, 20, "'zones' must be a non-empty list of zone ids"},
    {"unknown_key_far_from_all", k_head + "colour: blue\n" + k_loop + k_zone, 4, 1,
     "unknown key 'colour' at the top level (expected one of: site, broker"},
    {"misspelt_required_key_reported_once",
     k_head + k_loop + "zones:\n  - {id: z1, loop: la, air_temp: {topic: b/t}, humidty: {topic: b/h}}\n", 7, 48,
     "unknown key 'humidty' in zone 'z1'; did you mean 'humidity'?"},
    {"number_not_finite", k_head + "defaults: {confirm_s: .inf}\n" + k_loop + k_zone, 4, 23,
     "'confirm_s' must be a number, got '.inf'"},
    {"number_given_a_map", k_head + "defaults: {confirm_s: {a: 1}}\n" + k_loop + k_zone, 4, 23,
     "'confirm_s' must be a number, got a map"},
    {"margins_inverted_in_defaults_reported_once",
     k_head + "defaults: {margin_warn_k: 1.0, margin_alarm_k: 1.0}\n" + k_loop + k_zone +
         "  - {id: z2, loop: la, air_temp: {topic: b/t2}, humidity: {topic: b/h2}}\n",
     4, 48, "defaults: margin_alarm_k (1) must be below margin_warn_k (1)"},
    {"zone_warn_below_default_alarm",
     k_head + k_loop +
         "zones:\n  - {id: z1, loop: la, margin_warn_k: 0.5, air_temp: {topic: b/t}, humidity: {topic: b/h}}\n",
     7, 39, "zone 'z1': margin_alarm_k (1) must be below margin_warn_k (0.5), and margin_alarm_k comes from defaults"},
    {"merge_key", k_head + "<<: {site: t}\n" + k_loop + k_zone, 4, 1, "YAML merge keys ('<<') are not supported"},
    {"second_document", k_head + k_loop + k_zone + "---\nsite: other\n", 9, 1, "only one YAML document is expected"},
    {"second_document_after_a_leading_marker", "# site\n---\n" + k_head + k_loop + k_zone + "---\nsite: other\n", 11, 1,
     "only one YAML document is expected"},
    {"second_document_after_an_end_marker", k_head + k_loop + k_zone + "...\nsite: other\n", 9, 1,
     "only one YAML document is expected"},
    {"top_level_list", "- site: s\n", 1, 1, "the top level must be a map of sections"},
    {"empty_text", "", 1, 1, "the file holds no config"},
    // yaml-cpp's LoadAll() never returned on these (found by fuzzing): `check` hung, and so did a reload.
    {"lone_comma", ",\n", 1, 1, "the file holds no config"},
    {"anchor_and_comma", "&Y,", 1, 1, "the file holds no config"},
    {"config_then_comma", k_head + k_loop + k_zone + ",\n", 8, 1, "YAML syntax error"},
    {"tab_indentation", k_head + "loops:\n\t- id: la\n", 5, 2, "YAML syntax error"},
    // Text that is not UTF-8, or control characters: located at the byte, before any YAML.
    {"site_latin1", "site: caf\xE9\n" + k_head.substr(8) + k_loop + k_zone, 1, 10,
     "byte 0xE9 is not UTF-8 text; a config file must be saved as UTF-8"},
    {"zone_id_invalid_byte",
     k_head + k_loop + "zones:\n  - {id: z\x80, loop: la, air_temp: {topic: b/t}, humidity: {topic: b/h}}\n", 7, 11,
     "byte 0x80 is not UTF-8 text"},
    {"topic_cut_character",
     k_head + k_loop + "zones:\n  - {id: z1, loop: la, air_temp: {topic: b/t\xC3}, humidity: {topic: b/h}}\n", 7, 45,
     "byte 0xC3 is not UTF-8 text"},
    {"active_word_overlong",
     k_head + k_loop + k_zone_block + "    window_contact: {topic: b/win, active: [\xC0\xAFopen]}\n", 11, 45,
     "byte 0xC0 is not UTF-8 text"},
    {"valve_payload_surrogate", k_head + k_loop + k_zone_block + "    valve: {topic: b/v, open: \xED\xA0\x80}\n", 11,
     31, "byte 0xED is not UTF-8 text"},
    {"raw_control_character",
     "site: a\x01"
     "b\n" +
         k_head.substr(8) + k_loop + k_zone,
     1, 8, "control character U+0001 is not allowed in a config file"},
    {"raw_escape_character", k_head + "publish: {prefix: dm\x1b[2J}\n" + k_loop + k_zone, 4, 21,
     "control character U+001B is not allowed in a config file"},
    {"raw_nul",
     k_head + k_loop + "zones:\n  - {id: z1, loop: la, air_temp: {topic: \"b/t" + std::string(1, '\0') +
         "\"}, humidity: {topic: b/h}}\n",
     7, 46, "control character U+0000 is not allowed in a config file"},
    {"raw_c1_control",
     "site: a\xC2\x85"
     "b\n" +
         k_head.substr(8) + k_loop + k_zone,
     1, 8, "control character U+0085 is not allowed in a config file"},
    {"escaped_nul_in_site", "site: \"a\\0b\"\n" + k_head.substr(8) + k_loop + k_zone, 1, 7,
     "'site' must not hold a control character (U+0000 at byte 2)"},
    {"escaped_nul_in_topic",
     k_head + k_loop + "zones:\n  - {id: z1, loop: la, air_temp: {topic: \"b/t\\0\"}, humidity: {topic: b/h}}\n", 7, 42,
     "'topic' must not hold a control character (U+0000 at byte 4)"},
    {"escaped_escape_in_prefix", k_head + "publish: {prefix: \"dm\\e[2J\"}\n" + k_loop + k_zone, 4, 19,
     "'prefix' must not hold a control character (U+001B at byte 3)"},
    {"escaped_newline_in_zone_id",
     k_head + k_loop + "zones:\n  - {id: \"z\\n1\", loop: la, air_temp: {topic: b/t}, humidity: {topic: b/h}}\n", 7, 10,
     "'id' must not hold a control character (U+000A at byte 2)"},
    {"escaped_tab_in_active_word",
     k_head + k_loop + k_zone_block + "    window_contact: {topic: b/win, active: [\"op\\ten\"]}\n", 11, 45,
     "an 'active' payload must not hold a control character (U+0009 at byte 3)"},
};

std::string name_of_case(const ::testing::TestParamInfo<text_case>& case_info) { return case_info.param.name; }

INSTANTIATE_TEST_SUITE_P(Cases, ConfigRule, ::testing::ValuesIn(k_rule_cases), name_of_case);

TEST(ConfigLoader, PreventiveRulesTakeTheirDefaultsAndTheirKeys) {
  // Issue 10: valve.close_ahead_min 5, valve.open_margin_k = the zone's margin_alarm_k,
  // publish.setpoint_event_k 0.5, dew_point_request step_s 120, respond_k 0.3, max_step_k 1.0,
  // trim_k 0.1.
  const std::string zone_with_valve =
      "zones:\n"
      "  - {id: z1, loop: la, air_temp: {topic: b/t}, humidity: {topic: b/h}, valve: {topic: b/v}}\n";
  const std::string doas =
      "dehumidifiers:\n"
      "  - {id: d1, zones: [z1], dew_point_request: {topic: p/dp, min_c: 8, max_c: 14}}\n";
  const auto plain = load_config_text(k_head + k_loop + zone_with_valve + doas, "t.yaml");
  ASSERT_TRUE(plain.ok()) << all_errors(plain);
  const site_config& d = *plain.config;
  EXPECT_EQ(d.publish.setpoint_event_k, 0.5);
  EXPECT_EQ(d.zones[0].valve->close_ahead_min, 5.0);
  EXPECT_FALSE(d.zones[0].valve->open_margin_k.has_value()) << "the zone's margin_alarm_k";
  const dew_point_request_config& q = d.dehumidifiers[0].dew_point_request;
  EXPECT_EQ(q.step_s, 120.0);
  EXPECT_EQ(q.respond_k, 0.3);
  EXPECT_EQ(q.max_step_k, 1.0);
  EXPECT_EQ(q.trim_k, 0.1);
  EXPECT_FALSE(d.dehumidifiers[0].fault.has_value());
  EXPECT_FALSE(d.dehumidifiers[0].supply_dew_point.has_value());
  EXPECT_EQ(d.dehumidifiers[0].fault_k, 2.0);
  EXPECT_EQ(d.dehumidifiers[0].fault_after_s, 600.0);

  const std::string zone_set =
      "zones:\n"
      "  - {id: z1, loop: la, air_temp: {topic: b/t}, humidity: {topic: b/h},\n"
      "     valve: {topic: b/v, close_ahead_min: 8, open_margin_k: 1.5}}\n";
  const std::string doas_set =
      "dehumidifiers:\n"
      "  - {id: d1, zones: [z1], dew_point_request: {topic: p/dp, min_c: 8, max_c: 14, step_s: 300,\n"
      "     respond_k: 0.2, max_step_k: 0.6, trim_k: 0.05},\n"
      "     fault: {topic: p/doas-fault, active: [tripped]}, supply_dew_point: {topic: p/doas-dp},\n"
      "     fault_k: 3, fault_after_s: 900}\n";
  const auto set =
      load_config_text(k_head + "publish: {setpoint_event_k: 0.2}\n" + k_loop + zone_set + doas_set, "t.yaml");
  ASSERT_TRUE(set.ok()) << all_errors(set);
  const site_config& c = *set.config;
  EXPECT_EQ(c.publish.setpoint_event_k, 0.2);
  EXPECT_EQ(c.zones[0].valve->close_ahead_min, 8.0);
  EXPECT_EQ(c.zones[0].valve->open_margin_k, 1.5);
  const dew_point_request_config& r = c.dehumidifiers[0].dew_point_request;
  EXPECT_EQ(r.step_s, 300.0);
  EXPECT_EQ(r.respond_k, 0.2);
  EXPECT_EQ(r.max_step_k, 0.6);
  EXPECT_EQ(r.trim_k, 0.05);
  const dehumidifier_config& u = c.dehumidifiers[0];
  ASSERT_TRUE(u.fault.has_value());
  EXPECT_EQ(u.fault->topic, "p/doas-fault");
  EXPECT_EQ(u.fault->active, std::vector<std::string>{"tripped"});
  ASSERT_TRUE(u.supply_dew_point.has_value());
  EXPECT_EQ(u.supply_dew_point->topic, "p/doas-dp");
  EXPECT_EQ(u.fault_k, 3.0);
  EXPECT_EQ(u.fault_after_s, 900.0);
}

TEST(ConfigLoader, ClockDefaultsToWallAndReadsEventTime) {
  const auto wall = load_config_text(k_head + k_loop + k_zone, "t.yaml");
  ASSERT_TRUE(wall.ok()) << all_errors(wall);
  EXPECT_EQ(wall.config->clock.source, clock_source::wall);
  const auto events =
      load_config_text(k_head + "clock: {source: readings, field: /time}\n" + k_loop + k_zone, "t.yaml");
  ASSERT_TRUE(events.ok()) << all_errors(events);
  EXPECT_EQ(events.config->clock.source, clock_source::readings);
  EXPECT_EQ(events.config->clock.field, "/time");
}

TEST(ConfigLoader, QuotedNumbersAreReadAsNumbers) {
  const auto r = load_config_text(k_head + "defaults: {confirm_s: '45'}\n" + k_loop + k_zone, "t.yaml");
  ASSERT_TRUE(r.ok()) << all_errors(r);
  EXPECT_EQ(r.config->zones[0].thresholds.confirm_s, 45.0);
}

TEST(ConfigLoader, ReportsErrorsInFileOrderWhateverTheSectionOrder) {
  // zones before loops before defaults: the readers take defaults first, the report stays in file order.
  const std::string yaml =
      "zones:\n"
      "  - {id: z1, loop: nope, air_temp: {topic: b/t}, humidity: {topic: b/h}}\n"
      "loops:\n"
      "  - {id: la, supply_temp: {topic: p/s}, setpoint: {topic: p/sp, min_c: 25, max_c: 20}}\n"
      "defaults: {confirm_s: -1}\n" +
      k_head;
  const auto r = load_config_text(yaml, "t.yaml");
  ASSERT_EQ(r.errors.size(), 3u) << all_errors(r);
  EXPECT_EQ(r.errors[0].to_string(), "t.yaml:2:20: zone 'z1': unknown loop 'nope' (known loops: la)");
  EXPECT_EQ(r.errors[1].to_string(), "t.yaml:4:72: loop 'la' setpoint: 'min_c' (25) must not be above 'max_c' (20)");
  EXPECT_EQ(r.errors[2].to_string(), "t.yaml:5:23: 'confirm_s' must not be negative, got -1");
}

TEST(ConfigLoader, JudgesAZoneThatWritesBothMarginsEvenWhenTheDefaultIsBad) {
  const std::string yaml =
      k_head + "defaults: {margin_warn_k: x}\n" + k_loop +
      "zones:\n  - {id: z1, loop: la, margin_warn_k: 1, margin_alarm_k: 2, air_temp: {topic: b/t}, "
      "humidity: {topic: b/h}}\n";
  const auto r = load_config_text(yaml, "t.yaml");
  ASSERT_EQ(r.errors.size(), 2u) << all_errors(r);
  EXPECT_EQ(r.errors[0].to_string(), "t.yaml:4:27: 'margin_warn_k' must be a number, got 'x'");
  EXPECT_EQ(r.errors[1].to_string(), "t.yaml:8:58: zone 'z1': margin_alarm_k (2) must be below margin_warn_k (1)");
}

TEST(ConfigLoader, UnusableIdsCauseNoSecondErrorAtTheirReferences) {
  const std::string yaml =
      k_head +
      "loops:\n  - {id: l/a, supply_temp: {topic: p/s}, setpoint: {topic: p/sp, min_c: 15, max_c: 20}}\n"
      "zones:\n  - {id: z1, loop: l/a, air_temp: {topic: b/t}, humidity: {topic: b/h}}\n";
  const auto r = load_config_text(yaml, "t.yaml");
  ASSERT_EQ(r.errors.size(), 1u) << all_errors(r);
  EXPECT_EQ(r.errors[0].line, 5);
}

TEST(ConfigLoader, UnreadableFileGivesOneUnlocatedError) {
  const fs::path missing = k_config_data / "no-such-file.yaml";
  const auto r = load_config_file(missing);
  ASSERT_EQ(r.errors.size(), 1u);
  EXPECT_EQ(r.errors[0].line, 0);
  EXPECT_EQ(r.errors[0].to_string(), missing.string() + ": cannot read: No such file or directory");

  const auto dir = load_config_file(k_config_data);
  ASSERT_EQ(dir.errors.size(), 1u);
  EXPECT_EQ(dir.errors[0].to_string(), k_config_data.string() + ": cannot read: Is a directory");
}

// A config file full of random bytes (SIGHUP with a broken file used to stop the service:
// junk was quoted raw into the reload event). Every error is located, printable UTF-8 and
// one line; nothing throws.
TEST(ConfigLoader, RandomBytesGiveLocatedPrintableErrors) {
  std::mt19937 random(20260714);  // fixed seed: the same bytes every run
  for (int round = 0; round < 200; ++round) {
    std::string text(static_cast<std::size_t>(random() % 4096), '\0');
    for (char& c : text) c = static_cast<char>(random() & 0xFF);
    if (round % 2 == 1) {
      for (char& c : text) c = static_cast<char>(0x20 + (static_cast<unsigned char>(c) % 0x5F));  // ASCII junk
    }
    config_load_result r;
    ASSERT_NO_THROW(r = load_config_text(text, "junk.yaml")) << "round " << round;
    EXPECT_FALSE(r.ok()) << "round " << round;
    ASSERT_FALSE(r.errors.empty()) << "round " << round;
    EXPECT_LE(r.errors.size(), 11u) << "round " << round << all_errors(r);
    for (const auto& e : r.errors) {
      const std::string line = e.to_string();
      EXPECT_TRUE(is_valid_utf8(line)) << "round " << round << ": " << line;
      EXPECT_EQ(first_control_char(line), std::string::npos) << "round " << round << ": " << line;
      EXPECT_LE(line.size(), 450u) << "round " << round;
      EXPECT_GT(e.line, 0) << "round " << round << ": " << line;
    }
    // What the service does with the first error on SIGHUP.
    event_json event("site", from_unix_ms(0), subject_type::site, "", "service");
    event.text("reason", "reload rejected; first: " + r.errors.front().to_string());
    EXPECT_NO_THROW((void)event.dump()) << "round " << round;
  }
}

TEST(ConfigLoader, ReportsAtMostTenLinesOfBytesThatAreNotText) {
  std::string text;
  for (int i = 0; i < 25; ++i) text += "site: \xFF\n";
  const auto r = load_config_text(text, "t.yaml");
  ASSERT_EQ(r.errors.size(), 11u) << all_errors(r);
  EXPECT_EQ(r.errors[9].to_string(), "t.yaml:10:7: byte 0xFF is not UTF-8 text; a config file must be saved as UTF-8");
  EXPECT_EQ(r.errors[10].to_string(),
            "t.yaml:11:7: 15 more lines with bytes that are not UTF-8 text or with control characters");
}

TEST(ConfigLoader, AcceptsAByteOrderMarkAndCharactersBeyondAscii) {
  const auto r = load_config_text(
      "\xEF\xBB\xBF"
      "site: Caf\xC3\xA9 \xE2\x82\xAC \xF0\x9F\x92\xA7\n" +
          k_head.substr(8) + k_loop + k_zone,
      "t.yaml");
  ASSERT_TRUE(r.ok()) << all_errors(r);
  EXPECT_EQ(r.config->site, "Caf\xC3\xA9 \xE2\x82\xAC \xF0\x9F\x92\xA7");
}

TEST(ConfigLoader, QuotesLongValuesAsShortPrintableExcerpts) {
  const std::string long_value(5000, 'x');
  const auto r = load_config_text(k_head + "defaults: {confirm_s: " + long_value + "}\n" + k_loop + k_zone, "t.yaml");
  ASSERT_EQ(r.errors.size(), 1u) << all_errors(r);
  EXPECT_EQ(r.errors[0].message, "'confirm_s' must be a number, got '" + std::string(60, 'x') + "...'");
  const auto key = load_config_text(k_head + "\"bad\\x7fkey\": 1\n" + k_loop + k_zone, "t.yaml");
  ASSERT_EQ(key.errors.size(), 1u) << all_errors(key);
  EXPECT_NE(key.errors[0].message.find("unknown key 'bad\\x7fkey' at the top level"), std::string::npos)
      << key.errors[0].message;
}

TEST(ConfigDiagnostic, FormatsWithAndWithoutPlace) {
  EXPECT_EQ((config_diagnostic{"a.yaml", 3, 7, "bad"}).to_string(), "a.yaml:3:7: bad");
  EXPECT_EQ((config_diagnostic{"a.yaml", 0, 0, "cannot read: x"}).to_string(), "a.yaml: cannot read: x");
  EXPECT_EQ((config_diagnostic{"a\x80\n.yaml", 1, 2, "bad"}).to_string(), "a\xEF\xBF\xBD\\n.yaml:1:2: bad");
}

// A marker before the first document, and a marker line inside a block scalar, are not a
// second document (the loader reads on past the first document only when a marker follows content).
TEST(ConfigLoader, ADocumentMarkerBeforeTheConfigIsNotASecondDocument) {
  const auto r = load_config_text("# site\n---\n" + k_head + k_loop + k_zone, "m.yaml");
  EXPECT_TRUE(r.ok()) << (r.errors.empty() ? "" : r.errors.front().to_string());
  const auto indented =
      load_config_text("---\n" + k_head + "logging: {level: info}\n" + k_loop + k_zone + "# ---\n  # ...\n", "m.yaml");
  EXPECT_TRUE(indented.ok()) << (indented.errors.empty() ? "" : indented.errors.front().to_string());
}

// Ten thousand zones take the same rules as one: duplicates are still found (the checks
// are hash lookups now, not pairwise scans).
TEST(ConfigLoader, DuplicatesAreFoundAmongManyZones) {
  std::string zones = "zones:\n";
  for (int z = 0; z < 2000; ++z) {
    const std::string id = "z" + std::to_string(z);
    zones += "  - {id: " + id + ", loop: la, air_temp: {topic: b/" + id + "/t}, humidity: {topic: b/" + id + "/h}}\n";
  }
  zones += "  - {id: z7, loop: la, air_temp: {topic: b/z9/t}, humidity: {topic: b/new/h}}\n";
  const auto r = load_config_text(k_head + k_loop + zones, "many.yaml");
  ASSERT_EQ(r.errors.size(), 2u);
  EXPECT_NE(r.errors[0].message.find("duplicate zone id 'z7' (first defined at line 14)"), std::string::npos)
      << r.errors[0].to_string();
  EXPECT_NE(r.errors[1].message.find("topic 'b/z9/t' is already read by zone 'z9' air_temp (line 16)"),
            std::string::npos)
      << r.errors[1].to_string();
}

// The loader builds its own compact tree from the YAML parser's events (yaml_document.h), not
// yaml-cpp's node graph: anchors and aliases still stand for the anchored node, wherever it is
// used, and an alias keeps the place of the anchored node.
TEST(ConfigLoader, AnAliasStandsForItsAnchoredNode) {
  const auto r = load_config_text(k_head + k_loop +
                                      "zones:\n"
                                      "  - {id: z1, loop: la, air_temp: {topic: b/t}, humidity: &rh {topic: b/h, "
                                      "stale_after_s: 90}}\n"
                                      "  - {id: z2, loop: la, air_temp: {topic: b/t2}, humidity: {topic: b/h2}, "
                                      "thresholds_from: *rh}\n",
                                  "a.yaml");
  // thresholds_from is no key: the alias is read as the anchored map, the key still refused.
  ASSERT_EQ(r.errors.size(), 1u) << all_errors(r);
  EXPECT_EQ(r.errors[0].line, 8);
  EXPECT_NE(r.errors[0].message.find("unknown key 'thresholds_from'"), std::string::npos) << r.errors[0].to_string();

  const auto reused = load_config_text(k_head + k_loop +
                                           "defaults: &d {stale_after_s: 120}\n"
                                           "zones:\n"
                                           "  - {id: z1, loop: la, air_temp: {topic: b/t}, humidity: {topic: b/h}}\n"
                                           "plausibility: *d\n",
                                       "a.yaml");
  // The aliased map is read again in its new place, with that section's keys.
  ASSERT_EQ(reused.errors.size(), 1u) << all_errors(reused);
  EXPECT_EQ(reused.errors[0].line, 6);  // the anchored map's place
  EXPECT_NE(reused.errors[0].message.find("unknown key 'stale_after_s'"), std::string::npos)
      << reused.errors[0].to_string();

  const auto ok = load_config_text(k_head + k_loop +
                                       "zones:\n"
                                       "  - {id: z1, loop: la, air_temp: &t {topic: b/t}, humidity: {topic: b/h}}\n"
                                       "  - {id: z2, loop: la, air_temp: {topic: b/t2}, humidity: {topic: b/h2}}\n"
                                       "  - {id: z3, loop: la, air_temp: *t, humidity: {topic: b/h3}}\n",
                                   "a.yaml");
  // z3 reads z1's topic through the alias: the one-reader rule still sees it.
  ASSERT_EQ(ok.errors.size(), 1u) << all_errors(ok);
  EXPECT_NE(ok.errors[0].message.find("topic 'b/t' is already read by zone 'z1' air_temp"), std::string::npos)
      << ok.errors[0].to_string();
}

// A long list whose items are not maps reserves nothing and reports each item.
TEST(ConfigLoader, ZonesThatAreNotMapsAreEachReported) {
  const auto r = load_config_text(k_head + k_loop + "zones: [1, 2, [3]]\n", "n.yaml");
  ASSERT_EQ(r.errors.size(), 3u) << all_errors(r);
  for (const auto& e : r.errors) EXPECT_NE(e.message.find("each zone must be a map"), std::string::npos);
}

}  // namespace
}  // namespace dewmargin
