// Hostile text from outside, through the whole core: whatever bytes a payload holds, the
// engine keeps running, keeps its last good state and says what was wrong in an `input`
// event whose JSON is valid UTF-8 (the daemon publishes and logs that text as it is).
#include <gtest/gtest.h>

#include <string>
#include <vector>

#include "dewmargin/safe_text.h"
#include "engine_fixture.h"

namespace dewmargin {
namespace {

using testing_support::engine_driver;
using testing_support::small_site;

const std::string k_fffd = "\xEF\xBF\xBD";

void expect_every_message_valid(const engine_driver& d) {
  for (const auto& p : d.log()) {
    EXPECT_TRUE(is_valid_utf8(p.payload)) << p.topic;
    EXPECT_FALSE(p.json().is_discarded() && p.cls != message_class::command) << p.topic << ": " << p.payload;
  }
}

TEST(OutsideText, InvalidUtf8InAReadingIsABadInputNotAFault) {
  struct bad_payload {
    const char* name;
    std::string payload;
    std::string reason;
  };
  const std::vector<bad_payload> cases = {
      {"one invalid byte", "\x80", "payload '" + k_fffd + "' is not a number"},
      {"character cut at the quote limit", std::string(39, '1') + "\xC2\xB0",
       "payload '" + std::string(39, '1') + "...' is not a number"},
      {"NUL and escape", std::string("\0\x1b[2J", 5), "payload '\\x00\\x1b[2J' is not a number"},
  };
  for (const auto& c : cases) {
    engine_driver d(small_site());
    d.readings(24, 50, 17, 16);
    ASSERT_NO_THROW(d.send("b/z1/temp", c.payload)) << c.name;
    const auto events = d.input_events("b/z1/temp");
    ASSERT_EQ(events.size(), 1u) << c.name;
    EXPECT_EQ(events[0]["reason"], c.reason) << c.name;
    EXPECT_EQ(d.last_json("dm/zone/z1/state")["air_temp_c"], 24.0) << c.name << ": the last good value stays";
    expect_every_message_valid(d);
  }
}

// After the switch read wet, junk must neither clear the condensation nor pass silently.
TEST(OutsideText, JunkOnAWetSwitchKeepsTheZoneCondensing) {
  for (const std::string junk : {"maybe", "[[[[", "\x80", "2", ""}) {
    engine_driver d(small_site());
    d.readings(24, 50, 20, 16);
    d.send("b/z1/wet", "1");
    ASSERT_EQ(d.last_json("dm/zone/z1/state")["band"], "condensing");
    ASSERT_EQ(d.last_payload("b/z1/valve"), "closed");
    d.clear_log();
    ASSERT_NO_THROW(d.send("b/z1/wet", junk)) << junk;
    const auto events = d.input_events("b/z1/wet");
    ASSERT_EQ(events.size(), 1u) << "'" << junk << "'";
    EXPECT_EQ(events[0]["to"], "bad") << junk;
    EXPECT_TRUE(d.events("band").empty()) << "'" << junk << "' changed the band";
    EXPECT_TRUE(d.on_topic("b/z1/valve").empty()) << "'" << junk << "' moved the valve";
    d.advance(5);
    d.send("b/z1/surface", "20.1");
    EXPECT_EQ(d.last_json("dm/zone/z1/state")["band"], "condensing") << "'" << junk << "'";
    expect_every_message_valid(d);

    d.send("b/z1/wet", "dry");  // a known inactive word is a good reading again
    EXPECT_EQ(d.last_json("dm/zone/z1/state")["band"], "safe") << "'" << junk << "'";
  }
}

TEST(OutsideText, InvalidUtf8InACommandIsRejectedWithValidJson) {
  engine_driver d(small_site());
  d.readings(24, 50, 17, 16);
  ASSERT_NO_THROW(d.send("dm/cmd/ack", "{\"zone\":\"z1\",\"by\":\"\x80\"}"));
  ASSERT_NO_THROW(d.send("dm/cmd/\xFF", "{}"));
  ASSERT_NO_THROW(d.send("dm/cmd/ack", "\xC3"));
  EXPECT_EQ(d.events("rejected").size(), 3u);
  expect_every_message_valid(d);
}

}  // namespace
}  // namespace dewmargin
