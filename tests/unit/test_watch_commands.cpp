// The command line of `dewmargin watch` (tools/dewmargin/watch/watch_commands.h).
#include <gtest/gtest.h>

#include <nlohmann/json.hpp>

#include "watch_commands.h"

namespace dewmargin::watch {
namespace {

TEST(WatchCommands, ParsesAckShelveAndUnshelve) {
  const struct {
    const char* line;
    const char* verb;
    const char* zone;
    int minutes;
    const char* text;
  } cases[] = {
      {"a room-a", "ack", "room-a", 0, ""},
      {"  a   room-a   window closed  ", "ack", "room-a", 0, "window closed"},
      {"ack bldg-a/dm/lobby", "ack", "bldg-a/dm/lobby", 0, ""},
      {"s lobby 60 sensor swap", "shelve", "lobby", 60, "sensor swap"},
      {"s lobby 1440", "shelve", "lobby", 1440, ""},
      {"u lobby sensor back", "unshelve", "lobby", 0, "sensor back"},
  };
  for (const auto& c : cases) {
    auto r = parse_operator_line(c.line);
    ASSERT_TRUE(r) << c.line << ": " << r.err().message;
    EXPECT_EQ(r.value().verb, c.verb);
    EXPECT_EQ(r.value().zone, c.zone);
    EXPECT_EQ(r.value().minutes, c.minutes);
    EXPECT_EQ(r.value().text, c.text);
  }
}

TEST(WatchCommands, RejectsBadLinesSayingHowTheyShouldLook) {
  const struct {
    const char* line;
    const char* error;
  } cases[] = {
      {"", "type a ZONE, s ZONE MIN or u ZONE (q quits)"},
      {"x room", "unknown command 'x': a ZONE [NOTE], s ZONE MIN [REASON], u ZONE [REASON]"},
      {"a", "ack needs a zone: a ZONE"},
      {"s lobby", "shelve needs whole minutes from 1 to 1440: s ZONE MIN [REASON]"},
      {"s lobby 0", "shelve needs whole minutes from 1 to 1440: s ZONE MIN [REASON]"},
      {"s lobby 1441", "shelve needs whole minutes from 1 to 1440: s ZONE MIN [REASON]"},
      {"s lobby 2.5", "shelve needs whole minutes from 1 to 1440: s ZONE MIN [REASON]"},
  };
  for (const auto& c : cases) {
    auto r = parse_operator_line(c.line);
    ASSERT_FALSE(r) << c.line;
    EXPECT_EQ(r.err().message, c.error);
  }
}

TEST(WatchCommands, PayloadsAreTheDocumentedCommands) {
  // docs/interface.md, Commands.
  auto ack = parse_operator_line("a first-south-meeting window closed").value();
  EXPECT_EQ(command_payload(ack, "first-south-meeting", "JK"),
            R"({"zone":"first-south-meeting","by":"JK","note":"window closed"})");
  auto shelve = parse_operator_line("s ground-lobby 60 sensor swap").value();
  EXPECT_EQ(command_payload(shelve, "ground-lobby", "JK"),
            R"({"zone":"ground-lobby","minutes":60,"by":"JK","reason":"sensor swap"})");
  auto unshelve = parse_operator_line("u b/dm/ground-lobby").value();
  EXPECT_EQ(command_payload(unshelve, "ground-lobby", "JK"), R"({"zone":"ground-lobby","by":"JK"})");
  // Quotes in free text stay valid JSON.
  auto quoted = parse_operator_line("a z \"wet\" \\ ceiling").value();
  EXPECT_EQ(nlohmann::json::parse(command_payload(quoted, "z", "JK"))["note"], "\"wet\" \\ ceiling");
}

TEST(WatchCommands, InitialsAreShortAndWithoutBlanks) {
  EXPECT_TRUE(valid_initials("JK"));
  EXPECT_TRUE(valid_initials("j.kowalski"));
  EXPECT_FALSE(valid_initials(""));
  EXPECT_FALSE(valid_initials("J K"));
  EXPECT_FALSE(valid_initials("abcdefghijklmnopq"));
}

}  // namespace
}  // namespace dewmargin::watch
