#include <gtest/gtest.h>

#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "dewmargin/operator_command.h"

namespace dewmargin {
namespace {

struct rejection_case {
  const char* name;
  std::string verb;
  std::string payload;
  error_code code;
  std::string reason;
  std::string zone_out;  // what the rejected event can name; empty when the payload names none
};

TEST(OperatorCommand, RejectsEveryMalformedCommandWithItsReason) {
  const std::vector<rejection_case> cases = {
      {"unknown verb", "acknowledge", R"({"zone":"l2e","by":"jd"})", error_code::invalid_argument,
       "unknown command 'acknowledge' (ack, shelve, unshelve)", "l2e"},
      {"verb in capitals", "ACK", R"({"zone":"l2e","by":"jd"})", error_code::invalid_argument,
       "unknown command 'ACK' (ack, shelve, unshelve)", "l2e"},
      {"unknown verb, not JSON", "silence", "zone l2e", error_code::invalid_argument,
       "unknown command 'silence' (ack, shelve, unshelve)", ""},
      {"long unknown verb echoed cut to 40", std::string(60, 'v'), "{}", error_code::invalid_argument,
       "unknown command '" + std::string(40, 'v') + "' (ack, shelve, unshelve)", ""},
      {"not JSON", "ack", "zone=l2e", error_code::parse_error, "payload is not valid JSON (at byte 1)", ""},
      {"number beyond double", "ack", R"({"zone":"l2e","by":"jd","n":1e999})", error_code::parse_error,
       "payload is not valid JSON (a number out of range)", ""},
      {"JSON cut short", "ack", "[[[[", error_code::parse_error, "payload is not valid JSON (at byte 5)", ""},
      {"empty", "ack", "", error_code::parse_error, "payload is empty (a JSON object is expected)", ""},
      {"invalid UTF-8 in a value", "ack", "{\"zone\":\"\x80\",\"by\":\"jd\"}", error_code::parse_error,
       "payload is not valid UTF-8 (at byte 10)", ""},
      {"array", "ack", R"(["l2e"])", error_code::parse_error, "payload must be a JSON object", ""},
      {"string", "ack", R"("l2e")", error_code::parse_error, "payload must be a JSON object", ""},
      {"missing zone", "ack", R"({"by":"jd"})", error_code::invalid_argument, "missing 'zone'", ""},
      {"null zone", "ack", R"({"zone":null,"by":"jd"})", error_code::invalid_argument, "missing 'zone'", ""},
      {"zone a number", "ack", R"({"zone":7,"by":"jd"})", error_code::parse_error, "'zone' must be a string", ""},
      {"zone an object", "shelve", R"({"zone":{},"by":"jd","minutes":5})", error_code::parse_error,
       "'zone' must be a string", ""},
      {"missing by", "ack", R"({"zone":"l2e"})", error_code::invalid_argument, "missing 'by' (who gives the command)",
       "l2e"},
      {"null by", "unshelve", R"({"zone":"l2e","by":null})", error_code::invalid_argument,
       "missing 'by' (who gives the command)", "l2e"},
      {"empty by", "ack", R"({"zone":"l2e","by":""})", error_code::invalid_argument,
       "'by' is blank (who gives the command)", "l2e"},
      {"blank by", "ack", R"({"zone":"l2e","by":"  "})", error_code::invalid_argument,
       "'by' is blank (who gives the command)", "l2e"},
      {"by a number", "ack", R"({"zone":"l2e","by":42})", error_code::parse_error, "'by' must be a string", "l2e"},
      {"note not a string", "ack", R"({"zone":"l2e","by":"jd","note":5})", error_code::parse_error,
       "'note' must be a string", "l2e"},
      {"reason not a string", "shelve", R"({"zone":"l2e","by":"jd","minutes":5,"reason":["x"]})",
       error_code::parse_error, "'reason' must be a string", "l2e"},
      {"minutes missing", "shelve", R"({"zone":"l2e","by":"jd"})", error_code::invalid_argument,
       "missing 'minutes' (1 to 1440)", "l2e"},
      {"minutes null", "shelve", R"({"zone":"l2e","by":"jd","minutes":null})", error_code::invalid_argument,
       "missing 'minutes' (1 to 1440)", "l2e"},
      {"minutes a string", "shelve", R"({"zone":"l2e","by":"jd","minutes":"30"})", error_code::parse_error,
       "'minutes' must be a number (1 to 1440)", "l2e"},
      {"minutes a boolean", "shelve", R"({"zone":"l2e","by":"jd","minutes":true})", error_code::parse_error,
       "'minutes' must be a number (1 to 1440)", "l2e"},
      {"minutes 0", "shelve", R"({"zone":"l2e","by":"jd","minutes":0})", error_code::out_of_range,
       "'minutes' must be a whole number from 1 to 1440 (got 0)", "l2e"},
      {"minutes 1441", "shelve", R"({"zone":"l2e","by":"jd","minutes":1441})", error_code::out_of_range,
       "'minutes' must be a whole number from 1 to 1440 (got 1441)", "l2e"},
      {"minutes 2.5", "shelve", R"({"zone":"l2e","by":"jd","minutes":2.5})", error_code::out_of_range,
       "'minutes' must be a whole number from 1 to 1440 (got 2.5)", "l2e"},
      {"minutes negative", "shelve", R"({"zone":"l2e","by":"jd","minutes":-30})", error_code::out_of_range,
       "'minutes' must be a whole number from 1 to 1440 (got -30)", "l2e"},
      {"minutes huge", "shelve", R"({"zone":"l2e","by":"jd","minutes":1e300})", error_code::out_of_range,
       "'minutes' must be a whole number from 1 to 1440 (got 1e+300)", "l2e"},
  };
  for (const auto& c : cases) {
    std::string zone_out;
    const auto r = parse_operator_command(c.verb, c.payload, zone_out);
    ASSERT_FALSE(r.ok()) << c.name;
    EXPECT_EQ(r.err().code, c.code) << c.name;
    EXPECT_EQ(r.err().message, c.reason) << c.name;
    EXPECT_EQ(zone_out, c.zone_out) << c.name << ": zone named in the rejected event";
  }
}

TEST(OperatorCommand, AcceptsAnAcknowledgement) {
  std::string zone_out;
  const auto r =
      parse_operator_command("ack", R"({"zone":"level2-east","by":"jd","note":"checked the panel"})", zone_out);
  ASSERT_TRUE(r.ok()) << r.err().message;
  EXPECT_EQ(r.value().verb, command_verb::ack);
  EXPECT_EQ(r.value().zone, "level2-east");
  EXPECT_EQ(r.value().by, "jd");
  EXPECT_EQ(r.value().note, "checked the panel");
  EXPECT_EQ(zone_out, "level2-east");
}

TEST(OperatorCommand, TakesAMissingOrNullNoteAsEmpty) {
  for (const char* payload : {R"({"zone":"z","by":"jd"})", R"({"zone":"z","by":"jd","note":null})"}) {
    std::string zone_out;
    const auto r = parse_operator_command("ack", payload, zone_out);
    ASSERT_TRUE(r.ok()) << payload << ": " << r.err().message;
    EXPECT_EQ(r.value().note, "") << payload;
  }
}

TEST(OperatorCommand, AcceptsShelvingFromOneTo1440WholeMinutes) {
  struct minutes_case {
    const char* minutes;
    int expected;
  };
  for (const auto& c : std::vector<minutes_case>{{"1", 1}, {"30", 30}, {"30.0", 30}, {"1440", 1440}}) {
    std::string zone_out;
    const std::string payload =
        std::string(R"({"zone":"l2e","by":"jd","reason":"sensor swap","minutes":)") + c.minutes + "}";
    const auto r = parse_operator_command("shelve", payload, zone_out);
    ASSERT_TRUE(r.ok()) << c.minutes << ": " << r.err().message;
    EXPECT_EQ(r.value().verb, command_verb::shelve);
    EXPECT_EQ(r.value().minutes, c.expected);
    EXPECT_EQ(r.value().reason, "sensor swap");
    EXPECT_EQ(r.value().zone, "l2e");
  }
}

TEST(OperatorCommand, AcceptsAnUnshelve) {
  std::string zone_out;
  const auto r = parse_operator_command("unshelve", R"({"zone":"l2e","by":"jd","reason":"swap done"})", zone_out);
  ASSERT_TRUE(r.ok()) << r.err().message;
  EXPECT_EQ(r.value().verb, command_verb::unshelve);
  EXPECT_EQ(r.value().by, "jd");
  EXPECT_EQ(r.value().reason, "swap done");
  EXPECT_EQ(r.value().minutes, 0) << "minutes only matter for shelve";
}

TEST(OperatorCommand, BoundsFreeTextTo200Bytes) {
  std::string zone_out;
  const std::string payload =
      R"({"zone":"l2e","by":")" + std::string(300, 'b') + R"(","note":")" + std::string(250, 'n') + R"("})";
  const auto r = parse_operator_command("ack", payload, zone_out);
  ASSERT_TRUE(r.ok()) << r.err().message;
  EXPECT_EQ(r.value().by, std::string(200, 'b'));
  EXPECT_EQ(r.value().note, std::string(200, 'n'));
}

TEST(OperatorCommand, CutsFreeTextOnlyBetweenUtf8Characters) {
  // 199 bytes and a two-byte "é": a cut at byte 200 would split the character, and the
  // rejected/ack event built from it could then not be serialised as JSON.
  const std::string text = std::string(199, 'a') + "\u00e9" + "tail";
  std::string zone_out;
  const std::string payload = nlohmann::json{{"zone", text}, {"by", text}, {"note", text}}.dump();
  const auto r = parse_operator_command("ack", payload, zone_out);
  ASSERT_TRUE(r.ok()) << r.err().message;
  EXPECT_EQ(zone_out, std::string(199, 'a'));
  EXPECT_EQ(r.value().by, std::string(199, 'a'));
  EXPECT_EQ(r.value().note, std::string(199, 'a'));
  const nlohmann::json event = {{"zone", zone_out}, {"by", r.value().by}, {"note", r.value().note}};
  EXPECT_NO_THROW((void)event.dump());

  // The unknown verb echoed in the reason is cut at 40 bytes, also between characters.
  std::string verb_zone;
  const auto bad_verb = parse_operator_command(std::string(39, 'v') + "\u00e9", "{}", verb_zone);
  ASSERT_FALSE(bad_verb.ok());
  EXPECT_EQ(bad_verb.err().message, "unknown command '" + std::string(39, 'v') + "' (ack, shelve, unshelve)");
  EXPECT_NO_THROW((void)nlohmann::json(bad_verb.err().message).dump());

  const std::string fits = std::string(198, 'a') + "\u00e9";  // exactly 200 bytes: kept whole
  std::string zone_fits;
  const auto whole = parse_operator_command("ack", nlohmann::json{{"zone", fits}, {"by", "jd"}}.dump(), zone_fits);
  ASSERT_TRUE(whole.ok()) << whole.err().message;
  EXPECT_EQ(zone_fits, fits);
}

TEST(CommandVerbNames, AreTheTopicLevels) {
  EXPECT_STREQ(command_verb_name(command_verb::ack), "ack");
  EXPECT_STREQ(command_verb_name(command_verb::shelve), "shelve");
  EXPECT_STREQ(command_verb_name(command_verb::unshelve), "unshelve");
}

}  // namespace
}  // namespace dewmargin
