#include <gtest/gtest.h>

#include <string>
#include <vector>

#include "dewmargin/input_decoder.h"

namespace dewmargin {
namespace {

input_config bare(input_unit unit = input_unit::celsius) {
  input_config c;
  c.topic = "bldg/l2e/temp";
  c.unit = unit;
  return c;
}
input_config json_at(const std::string& field, input_unit unit = input_unit::celsius) {
  input_config c = bare(unit);
  c.field = field;
  return c;
}
input_config switch_of(std::vector<std::string> active, const std::string& field = "") {
  input_config c;
  c.topic = "bldg/l2e/wet";
  c.field = field;
  c.active = std::move(active);
  return c;
}

struct number_case {
  const char* payload;
  double expected;
};

TEST(DecodeNumber, ReadsBareNumbersWithBlanksAndExponents) {
  const std::vector<number_case> cases = {
      {"21.5", 21.5},   {"  21.5", 21.5}, {"21.5 \r\n", 21.5}, {"\t-3", -3.0}, {"+4", 4.0},
      {"2.15e1", 21.5}, {"1E2", 100.0},   {"215e-1", 21.5},    {"0", 0.0},     {".5", 0.5},
  };
  for (const auto& c : cases) {
    const auto v = decode_number(c.payload, bare(), input_kind::air_temp);
    ASSERT_TRUE(v.ok()) << "'" << c.payload << "': " << v.err().message;
    EXPECT_DOUBLE_EQ(v.value(), c.expected) << c.payload;
  }
}

struct reject_case {
  const char* name;
  std::string payload;
  error_code code;
  std::string message;
};

void expect_rejected(const result<double>& v, const reject_case& c) {
  ASSERT_FALSE(v.ok()) << c.name << " gave " << v.value();
  EXPECT_EQ(v.err().code, c.code) << c.name;
  EXPECT_EQ(v.err().message, c.message) << c.name;
}

TEST(DecodeNumber, RejectsBarePayloadsThatAreNotOneFiniteNumber) {
  const std::vector<reject_case> cases = {
      {"empty", "", error_code::parse_error, "empty payload"},
      {"blanks", " \t\n", error_code::parse_error, "empty payload"},
      {"word", "warm", error_code::parse_error, "payload 'warm' is not a number"},
      {"unit suffix", "21.5 C", error_code::parse_error, "payload '21.5 C' is not a number"},
      {"decimal comma", "21,5", error_code::parse_error, "payload '21,5' is not a number"},
      {"two numbers", "21.5 22", error_code::parse_error, "payload '21.5 22' is not a number"},
      {"hexadecimal", "0x15", error_code::parse_error, "payload '0x15' is not a number"},
      {"JSON", "{\"t\":21.5}", error_code::parse_error, "payload '{\"t\":21.5}' is not a number"},
      {"long garbage excerpted", std::string(50, 'x'), error_code::parse_error,
       "payload '" + std::string(40, 'x') + "...' is not a number"},
      {"nan", "nan", error_code::not_finite, "payload 'nan' is not a finite number"},
      {"NaN", " NaN ", error_code::not_finite, "payload 'NaN' is not a finite number"},
      {"inf", "inf", error_code::not_finite, "payload 'inf' is not a finite number"},
      {"-Infinity", "-Infinity", error_code::not_finite, "payload '-Infinity' is not a finite number"},
      {"overflow", "1e999", error_code::not_finite, "payload '1e999' is not a finite number"},
  };
  for (const auto& c : cases) expect_rejected(decode_number(c.payload, bare(), input_kind::air_temp), c);
}

// A payload is outside text: its excerpt in an error message is valid UTF-8, printable,
// and cut between characters (a cut inside one used to stop the service when the message
// reached a JSON event).
TEST(DecodeNumber, QuotesBadPayloadsAsPrintableUtf8) {
  const std::string fffd = "\xEF\xBF\xBD";
  const std::vector<reject_case> cases = {
      {"invalid byte", "\x80", error_code::parse_error, "payload '" + fffd + "' is not a number"},
      {"invalid byte after digits", "21.5\xFF", error_code::parse_error, "payload '21.5" + fffd + "' is not a number"},
      {"two-byte character across the limit", std::string(39, '1') + "\xC2\xB0" + "C", error_code::parse_error,
       "payload '" + std::string(39, '1') + "...' is not a number"},
      {"three-byte character across the limit", std::string(38, '2') + "\xE2\x82\xAC", error_code::parse_error,
       "payload '" + std::string(38, '2') + "...' is not a number"},
      {"character that fits", std::string(38, '3') + "\xC2\xB0", error_code::parse_error,
       "payload '" + std::string(38, '3') + "\xC2\xB0' is not a number"},
      {"NUL inside",
       std::string("21\0"
                   "5",
                   4),
       error_code::parse_error, "payload '21\\x005' is not a number"},
      {"terminal escape", "\x1b[2J21", error_code::parse_error, "payload '\\x1b[2J21' is not a number"},
  };
  for (const auto& c : cases) expect_rejected(decode_number(c.payload, bare(), input_kind::air_temp), c);
  const auto j =
      decode_number(R"({"t": "x)" + std::string(45, 'y') + "\xC2\xB0\"}", json_at("/t"), input_kind::air_temp);
  ASSERT_FALSE(j.ok());
  EXPECT_EQ(j.err().message, "field /t: payload 'x" + std::string(39, 'y') + "...' is not a number");
  const auto invalid_json = decode_number("{\"t\": \"\x80\"}", json_at("/t"), input_kind::air_temp);
  ASSERT_FALSE(invalid_json.ok());
  EXPECT_EQ(invalid_json.err().message, "payload is not valid JSON");
}

struct field_case {
  const char* field;
  const char* payload;
  double expected;
};

TEST(DecodeNumber, ReadsAJsonFieldByPointer) {
  const std::vector<field_case> cases = {
      {"/temperature", R"({"temperature": 21.5, "rh": 50})", 21.5},
      {"/a/b", R"({"a": {"b": -3.25}})", -3.25},
      {"/values/1", R"({"values": [20.0, 21.0]})", 21.0},
      {"/t", R"({"t": 22})", 22.0},
      {"/t", R"({"t": "21.5"})", 21.5},  // a number sent as a string
      {"/t", R"({"t": " 2.15e1 "})", 21.5},
  };
  for (const auto& c : cases) {
    const auto v = decode_number(c.payload, json_at(c.field), input_kind::air_temp);
    ASSERT_TRUE(v.ok()) << c.payload << ": " << v.err().message;
    EXPECT_DOUBLE_EQ(v.value(), c.expected) << c.payload;
  }
}

TEST(DecodeNumber, RejectsJsonPayloadsWithoutANumberAtTheField) {
  struct json_reject_case {
    reject_case c;
    const char* field;
  };
  const std::vector<json_reject_case> cases = {
      {{"missing field", R"({"temp": 21.5})", error_code::parse_error, "JSON payload has no field /temperature"},
       "/temperature"},
      {{"missing nested field", R"({"a": {"c": 1}})", error_code::parse_error, "JSON payload has no field /a/b"},
       "/a/b"},
      {{"bare number with a field", "21.5", error_code::parse_error, "JSON payload has no field /t"}, "/t"},
      {{"not JSON", "{t: 21.5}", error_code::parse_error, "payload is not valid JSON"}, "/t"},
      {{"empty", "", error_code::parse_error, "payload is not valid JSON"}, "/t"},
      {{"number out of range", R"({"t": 1e400})", error_code::parse_error, "payload is not valid JSON"}, "/t"},
      {{"string not a number", R"({"t": "warm"})", error_code::parse_error, "field /t: payload 'warm' is not a number"},
       "/t"},
      {{"string nan", R"({"t": "nan"})", error_code::not_finite, "field /t: payload 'nan' is not a finite number"},
       "/t"},
      {{"empty string", R"({"t": ""})", error_code::parse_error, "field /t: empty payload"}, "/t"},
      {{"boolean", R"({"t": true})", error_code::parse_error, "field /t is not a number"}, "/t"},
      {{"null", R"({"t": null})", error_code::parse_error, "field /t is not a number"}, "/t"},
      {{"object", R"({"t": {"v": 1}})", error_code::parse_error, "field /t is not a number"}, "/t"},
      {{"array", R"({"t": [1]})", error_code::parse_error, "field /t is not a number"}, "/t"},
  };
  for (const auto& jc : cases)
    expect_rejected(decode_number(jc.c.payload, json_at(jc.field), input_kind::air_temp), jc.c);
}

struct unit_case {
  const char* name;
  input_unit unit;
  double raw;
  double expected;
};

TEST(DecodeNumber, ConvertsToCoreUnits) {
  // °F: t_C = (t_F - 32) × 5/9, the definition of the Fahrenheit scale (NIST SP 811, 2008,
  // Appendix B; from memory). Water boils at 212 °F = 100 °C and freezes at 32 °F = 0 °C at standard pressure.
  // m³/h: 1 m³ = 1000 L and 1 h = 3600 s (SI definitions), so 3.6 m³/h = 1 L/s.
  // US gpm: the US gallon is 231 in³ and the inch 25.4 mm, both exact by definition (NIST Handbook 44,
  // Appendix C; from memory): 231 × 2.54³ cm³ = 3785.411784 cm³, so 60 gpm = 3.785411784 L/s.
  const double us_gallon_l = 231.0 * 2.54 * 2.54 * 2.54 / 1000.0;
  const std::vector<unit_case> cases = {
      {"celsius", input_unit::celsius, 21.5, 21.5},
      {"212 °F", input_unit::fahrenheit, 212.0, 100.0},
      {"32 °F", input_unit::fahrenheit, 32.0, 0.0},
      {"71.6 °F", input_unit::fahrenheit, 71.6, 22.0},
      {"-40 °F", input_unit::fahrenheit, -40.0, -40.0},
      {"percent", input_unit::percent, 45.5, 45.5},
      {"fraction", input_unit::fraction, 0.455, 45.5},
      {"L/s", input_unit::litres_per_second, 0.8, 0.8},
      {"m3/h", input_unit::cubic_metres_per_hour, 3.6, 1.0},
      {"gpm", input_unit::us_gallons_per_minute, 60.0, us_gallon_l},
      {"gpm, 100", input_unit::us_gallons_per_minute, 100.0, 100.0 * 3.785411784 / 60.0},
  };
  EXPECT_NEAR(us_gallon_l, 3.785411784, 1e-12);
  for (const auto& c : cases) {
    const std::string payload = std::to_string(c.raw);
    const auto v = decode_number(payload, bare(c.unit), input_kind::air_temp);
    ASSERT_TRUE(v.ok()) << c.name << ": " << v.err().message;
    EXPECT_NEAR(v.value(), c.expected, 1e-9) << c.name;

    const auto j = decode_number("{\"v\": " + payload + "}", json_at("/v", c.unit), input_kind::air_temp);
    ASSERT_TRUE(j.ok()) << c.name << " in JSON: " << j.err().message;
    EXPECT_NEAR(j.value(), c.expected, 1e-9) << c.name << " in JSON";
  }
}

struct switch_case {
  const char* payload;
  bool expected;
};

TEST(DecodeSwitch, MatchesActiveWordsIgnoringCaseAndBlanks) {
  const input_config cfg = switch_of({"1", "true", "wet"});
  const std::vector<switch_case> cases = {
      {"1", true},  {"true", true},   {"TRUE", true}, {"Wet", true}, {"  wet\r\n", true},
      {"0", false}, {"false", false}, {"dry", false}, {"1.0", true},  // the same number as "1"
  };
  for (const auto& c : cases) {
    const auto v = decode_switch(c.payload, cfg);
    ASSERT_TRUE(v.ok()) << "'" << c.payload << "': " << v.err().message;
    EXPECT_EQ(v.value(), c.expected) << "'" << c.payload << "'";
  }
  const auto padded = decode_switch("open", switch_of({" OPEN "}));
  ASSERT_TRUE(padded.ok());
  EXPECT_TRUE(padded.value()) << "blanks and case in the configured word do not matter either";
}

TEST(DecodeSwitch, ReadsJsonStringBooleanAndNumberFields) {
  const input_config cfg = switch_of({"1", "true", "wet"}, "/state");
  const std::vector<switch_case> cases = {
      {R"({"state": true})", true},     {R"({"state": false})", false}, {R"({"state": 1})", true},
      {R"({"state": 0})", false},       {R"({"state": 1.0})", true},    {R"({"state": "WET"})", true},
      {R"({"state": " dry "})", false}, {R"({"state": "1"})", true},
  };
  for (const auto& c : cases) {
    const auto v = decode_switch(c.payload, cfg);
    ASSERT_TRUE(v.ok()) << c.payload << ": " << v.err().message;
    EXPECT_EQ(v.value(), c.expected) << c.payload;
  }
}

TEST(DecodeSwitch, ReadsTheDefaultInactiveWordsAndNumbersByValue) {
  const input_config cfg = switch_of({"wet"});
  for (const char* word : {"0", "0.0", " FALSE ", "off", "No", "dry", "closed", "normal"}) {
    const auto v = decode_switch(word, cfg);
    ASSERT_TRUE(v.ok()) << "'" << word << "': " << v.err().message;
    EXPECT_FALSE(v.value()) << "'" << word << "'";
  }
  EXPECT_EQ(default_inactive_payloads(),
            (std::vector<std::string>{"0", "false", "off", "no", "dry", "closed", "normal"}));
}

TEST(DecodeSwitch, ActiveWinsOverADefaultInactiveWord) {
  // A normally-closed contact that reports "closed" when it trips.
  const input_config cfg = switch_of({"closed"});
  EXPECT_EQ(inactive_payloads(cfg), (std::vector<std::string>{"0", "false", "off", "no", "dry", "normal"}));
  const auto v = decode_switch("CLOSED", cfg);
  ASSERT_TRUE(v.ok()) << v.err().message;
  EXPECT_TRUE(v.value());
  // Numbers compare by value here too: active "1.0" takes "1" out of nothing, "0" out of the defaults.
  EXPECT_EQ(inactive_payloads(switch_of({"0.0"})).front(), "false");
}

TEST(DecodeSwitch, OwnInactiveListReplacesTheDefaults) {
  input_config cfg = switch_of({"alarm"});
  cfg.inactive = {"quiet", "2"};
  EXPECT_EQ(inactive_payloads(cfg), cfg.inactive);
  const std::vector<switch_case> cases = {{"alarm", true}, {"Quiet", false}, {"2.0", false}};
  for (const auto& c : cases) {
    const auto v = decode_switch(c.payload, cfg);
    ASSERT_TRUE(v.ok()) << "'" << c.payload << "': " << v.err().message;
    EXPECT_EQ(v.value(), c.expected) << "'" << c.payload << "'";
  }
  const auto dry = decode_switch("dry", cfg);
  ASSERT_FALSE(dry.ok()) << "an own list drops the defaults";
  EXPECT_EQ(dry.err().message, "payload 'dry' is neither active (alarm) nor inactive (quiet, 2)");
}

// Junk on a moisture switch used to read as "dry": the zone turned safe, its valve could
// open. It is a bad reading now (the engine keeps the last good state and reports it).
TEST(DecodeSwitch, RejectsAPayloadThatIsNeitherActiveNorInactive) {
  struct junk_case {
    const char* name;
    std::string payload;
    std::string field;
    std::string message;
  };
  const std::string lists = " is neither active (1, true, wet) nor inactive (0, false, off, no, dry, closed, normal)";
  const std::vector<junk_case> cases = {
      {"word", "maybe", "", "payload 'maybe'" + lists},
      {"longer word", "wetter", "", "payload 'wetter'" + lists},
      {"brackets", "[[[[", "", "payload '[[[['" + lists},
      {"other number", "2", "", "payload '2'" + lists},
      {"invalid byte", "\x80", "", "payload '\xEF\xBF\xBD'" + lists},
      {"control characters", "wet\x1b[2J", "", "payload 'wet\\x1b[2J'" + lists},
      {"JSON number", R"({"s": 7})", "/s", "payload '7'" + lists},
      {"JSON string", R"({"s": "unsure"})", "/s", "payload 'unsure'" + lists},
  };
  for (const auto& c : cases) {
    const auto v = decode_switch(c.payload, switch_of({"1", "true", "wet"}, c.field));
    ASSERT_FALSE(v.ok()) << c.name << " read as " << v.value();
    EXPECT_EQ(v.err().code, error_code::parse_error) << c.name;
    EXPECT_EQ(v.err().message, c.message) << c.name;
  }
}

TEST(DecodeSwitch, RejectsEmptyAndMalformedPayloads) {
  struct switch_reject_case {
    const char* name;
    std::string payload;
    std::string field;
    std::string message;
  };
  const std::vector<switch_reject_case> cases = {
      {"empty", "", "", "empty payload"},
      {"blanks", "  \n", "", "empty payload"},
      {"not JSON", "wet", "/state", "payload is not valid JSON"},
      {"missing field", R"({"other": 1})", "/state", "JSON payload has no field /state"},
      {"null field", R"({"state": null})", "/state", "field /state is not a string, number or boolean"},
      {"object field", R"({"state": {}})", "/state", "field /state is not a string, number or boolean"},
      {"empty string field", R"({"state": ""})", "/state", "empty payload"},
  };
  for (const auto& c : cases) {
    const auto v = decode_switch(c.payload, switch_of({"wet"}, c.field));
    ASSERT_FALSE(v.ok()) << c.name;
    EXPECT_EQ(v.err().code, error_code::parse_error) << c.name;
    EXPECT_EQ(v.err().message, c.message) << c.name;
  }
}

struct plausible_case {
  input_kind kind;
  double value;
  double expected;
};

TEST(CheckPlausible, AcceptsEachKindInsideItsRange) {
  const plausibility_config p{};
  const std::vector<plausible_case> cases = {
      {input_kind::air_temp, -30.0, -30.0},   {input_kind::air_temp, 60.0, 60.0},
      {input_kind::surface, -20.0, -20.0},    {input_kind::surface, 80.0, 80.0},
      {input_kind::supply_temp, 0.0, 0.0},    {input_kind::supply_temp, 90.0, 90.0},
      {input_kind::return_temp, 16.0, 16.0},  {input_kind::flow, 0.0, 0.0},
      {input_kind::flow, 1000.0, 1000.0},     {input_kind::humidity, 0.5, 0.5},
      {input_kind::humidity, 100.0, 100.0},   {input_kind::humidity, 101.5, 100.0},  // overshoot clamped
      {input_kind::humidity, 103.0, 100.0},   {input_kind::condensation_switch, 1.0, 1.0},
      {input_kind::window_contact, 0.0, 0.0},
  };
  for (const auto& c : cases) {
    const auto v = check_plausible(c.value, c.kind, p);
    ASSERT_TRUE(v.ok()) << input_kind_name(c.kind) << " " << c.value << ": " << v.err().message;
    EXPECT_EQ(v.value(), c.expected) << input_kind_name(c.kind) << " " << c.value;
  }
}

TEST(CheckPlausible, RejectsEachKindOutsideItsRangeNamingIt) {
  const plausibility_config p{};
  struct implausible_case {
    input_kind kind;
    double value;
    std::string message;
  };
  const std::vector<implausible_case> cases = {
      {input_kind::air_temp, -30.5, "air temperature -30.50 °C is outside the plausible range -30.0 to 60.0 °C"},
      {input_kind::air_temp, 60.01, "air temperature 60.01 °C is outside the plausible range -30.0 to 60.0 °C"},
      {input_kind::surface, -20.5, "surface temperature -20.50 °C is outside the plausible range -20.0 to 80.0 °C"},
      {input_kind::surface, 85.0, "surface temperature 85.00 °C is outside the plausible range -20.0 to 80.0 °C"},
      {input_kind::supply_temp, -1.0, "water temperature -1.00 °C is outside the plausible range 0.0 to 90.0 °C"},
      {input_kind::return_temp, 95.0, "water temperature 95.00 °C is outside the plausible range 0.0 to 90.0 °C"},
      {input_kind::flow, -0.1, "flow -0.10 L/s is outside the plausible range 0.0 to 1000.0 L/s"},
      {input_kind::flow, 1200.0, "flow 1200.00 L/s is outside the plausible range 0.0 to 1000.0 L/s"},
      {input_kind::humidity, -1.0, "relative humidity -1.00 % is outside the plausible range 0.0 to 103.0 %"},
      {input_kind::humidity, 103.5, "relative humidity 103.50 % is outside the plausible range 0.0 to 103.0 %"},
      {input_kind::humidity, 0.0, "relative humidity 0 % is outside (0, 100]"},
  };
  for (const auto& c : cases) {
    const auto v = check_plausible(c.value, c.kind, p);
    ASSERT_FALSE(v.ok()) << input_kind_name(c.kind) << " " << c.value;
    EXPECT_EQ(v.err().code, error_code::out_of_range) << input_kind_name(c.kind) << " " << c.value;
    EXPECT_EQ(v.err().message, c.message);
  }
}

TEST(CheckPlausible, UsesTheConfiguredRanges) {
  plausibility_config p{};
  p.air_temp_c = {10.0, 35.0};
  EXPECT_TRUE(check_plausible(35.0, input_kind::air_temp, p).ok());
  const auto v = check_plausible(36.0, input_kind::air_temp, p);
  ASSERT_FALSE(v.ok());
  EXPECT_EQ(v.err().message, "air temperature 36.00 °C is outside the plausible range 10.0 to 35.0 °C");
}

TEST(InputKindNames, NameEveryKind) {
  EXPECT_STREQ(input_kind_name(input_kind::air_temp), "air_temp");
  EXPECT_STREQ(input_kind_name(input_kind::humidity), "humidity");
  EXPECT_STREQ(input_kind_name(input_kind::surface), "surface");
  EXPECT_STREQ(input_kind_name(input_kind::supply_temp), "supply_temp");
  EXPECT_STREQ(input_kind_name(input_kind::return_temp), "return_temp");
  EXPECT_STREQ(input_kind_name(input_kind::flow), "flow");
  EXPECT_STREQ(input_kind_name(input_kind::condensation_switch), "condensation_switch");
  EXPECT_STREQ(input_kind_name(input_kind::window_contact), "window_contact");
  EXPECT_TRUE(is_switch_kind(input_kind::condensation_switch));
  EXPECT_TRUE(is_switch_kind(input_kind::window_contact));
  EXPECT_FALSE(is_switch_kind(input_kind::humidity));
}

}  // namespace
}  // namespace dewmargin
