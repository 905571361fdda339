// Floods of bad readings and commands: one event per change of an input's state or kind of
// fault, one `rejected` event per change of (topic, kind), a command rate limit, and
// counters for everything that was not reported one by one.
#include <gtest/gtest.h>

#include <string>

#include "dewmargin/command_guard.h"
#include "dewmargin/engine.h"
#include "dewmargin/operator_command.h"
#include "engine_fixture.h"

namespace dewmargin {
namespace {

using testing_support::engine_driver;
using testing_support::small_site;

TEST(EngineFloods, FiveThousandDifferentOutOfRangeValuesAreOneEvent) {
  engine_driver d(small_site());
  d.readings(24, 50, 17, 16);
  for (int i = 0; i < 5000; ++i) d.send("b/z1/surface", std::to_string(100 + i));
  const auto inputs = d.input_events("b/z1/surface");
  ASSERT_EQ(inputs.size(), 1u);
  EXPECT_EQ(inputs[0]["to"], "bad");
  EXPECT_EQ(inputs[0]["fault"], "out_of_range");
  EXPECT_EQ(inputs[0]["reason"], "surface temperature 100.00 °C is outside the plausible range -20.0 to 80.0 °C");
  EXPECT_EQ(d.core().counters().bad_readings, 5000u);
  EXPECT_EQ(d.core().counters().suppressed_input_events, 4999u);
  // Recovery says how many bad messages there were.
  d.send("b/z1/surface", "17");
  const auto after = d.input_events("b/z1/surface");
  ASSERT_EQ(after.size(), 2u);
  EXPECT_EQ(after[1]["from"], "bad");
  EXPECT_EQ(after[1]["to"], "ok");
  EXPECT_EQ(after[1]["bad_messages"], 5000);
}

TEST(EngineFloods, TwoBadPayloadsTakingTurnsAreOneEventPerKind) {
  engine_driver d(small_site());
  d.readings(24, 50, 17, 16);
  for (int i = 0; i < 20000; ++i) d.send("b/z1/surface", i % 2 ? "warm" : "999");
  const auto inputs = d.input_events("b/z1/surface");
  ASSERT_EQ(inputs.size(), 2u);
  EXPECT_EQ(inputs[0]["fault"], "out_of_range");
  EXPECT_EQ(inputs[1]["fault"], "not_a_number");
  EXPECT_EQ(inputs[1]["from"], "bad");
  EXPECT_EQ(d.core().counters().suppressed_input_events, 19998u);
}

TEST(EngineFloods, ABadSpellAfterRecoveryIsReportedAgain) {
  engine_driver d(small_site());
  d.readings(24, 50, 17, 16);
  d.send("b/z1/surface", "warm");
  d.send("b/z1/surface", "17");
  d.send("b/z1/surface", "cold");
  const auto inputs = d.input_events("b/z1/surface");
  ASSERT_EQ(inputs.size(), 3u);
  EXPECT_EQ(inputs[0]["to"], "bad");
  EXPECT_EQ(inputs[1]["to"], "ok");
  EXPECT_EQ(inputs[1]["bad_messages"], 1);
  EXPECT_EQ(inputs[2]["to"], "bad");
  EXPECT_EQ(inputs[2]["reason"], "payload 'cold' is not a number");
}

TEST(EngineFloods, OutOfOrderReadingsAreAFaultKindOfTheirOwn) {
  engine_driver d(small_site());
  d.readings(24, 50, 17, 16);
  d.advance(10);
  engine_output out;
  for (int i = 1; i <= 100; ++i) d.core().on_message("b/z1/surface", "17", d.now() - std::chrono::seconds(i), out);
  int events = 0;
  for (const auto& m : out.messages) {
    if (m.topic != "dm/events") continue;
    const auto j = nlohmann::json::parse(m.payload);
    EXPECT_EQ(j["fault"], "out_of_order");
    ++events;
  }
  EXPECT_EQ(events, 1);
}

TEST(EngineFloods, RepeatedRejectionIsOneEventPerWindowAndCounted) {
  engine_driver d(small_site());
  d.readings(24, 50, 17, 16);
  d.clear_log();
  for (int i = 0; i < 5; ++i) d.at(1, "dm/cmd/ack", R"({"zone":"z1","by":"ab"})");  // nothing to acknowledge
  ASSERT_EQ(d.events("rejected").size(), 1u);
  EXPECT_EQ(d.core().counters().rejected, 5u);
  EXPECT_EQ(d.core().counters().suppressed_rejections, 4u);
  // Another kind on the same topic is reported at once ...
  d.at(1, "dm/cmd/ack", R"({"zone":"nowhere","by":"ab"})");
  ASSERT_EQ(d.events("rejected").size(), 2u);
  EXPECT_EQ(d.events("rejected")[1]["reason"], "unknown zone 'nowhere'");
  // ... and so is the first kind again, being a change.
  d.at(1, "dm/cmd/ack", R"({"zone":"z1","by":"ab"})");
  ASSERT_EQ(d.events("rejected").size(), 3u);
  // The same rejection after the window is reported again.
  d.at(k_rejection_repeat_s, "dm/cmd/ack", R"({"zone":"z1","by":"ab"})");
  EXPECT_EQ(d.events("rejected").size(), 4u);
}

TEST(EngineFloods, OversizedCommandIsRejectedWithoutBeingRead) {
  engine_driver d(small_site());
  d.readings(24, 50, 17, 16);
  d.send("b/z1/surface", "12.5");
  d.clear_log();
  const std::string payload = R"({"zone":"z1","by":"ab","note":")" + std::string(5000, 'n') + R"("})";
  d.send("dm/cmd/ack", payload);
  const auto rej = d.events("rejected");
  ASSERT_EQ(rej.size(), 1u);
  EXPECT_EQ(rej[0]["reason"], "command too large (" + std::to_string(payload.size()) + " bytes, at most 4096)");
  // 4,096 bytes exactly still fit.
  const std::string fits = R"({"zone":"z1","by":"ab","note":")";
  d.send("dm/cmd/ack", fits + std::string(k_max_command_bytes - fits.size() - 2, 'n') + R"("})");
  EXPECT_EQ(d.events("ack").size(), 1u);
  d.clear_log();
}

TEST(EngineFloods, CommandFloodIsRateLimitedInEventTime) {
  engine_driver d(small_site());
  d.readings(24, 50, 17, 16);
  d.send("b/z1/surface", "12.5");
  d.clear_log();
  // 1,000 commands in one second: the burst of 20 and the 9 tokens the second refills are
  // taken, the rest dropped.
  for (int i = 0; i < 1000; ++i) d.at(0.001, "dm/cmd/shelve", R"({"zone":"z1","by":"ab","minutes":5})");
  EXPECT_EQ(d.events("shelve").size(), 29u);
  EXPECT_EQ(d.core().counters().commands, 29u);
  EXPECT_EQ(d.core().counters().rate_limited, 971u);
  const auto rej = d.events("rejected");
  ASSERT_EQ(rej.size(), 1u);
  EXPECT_EQ(rej[0]["reason"], "too many commands: more than 10 a second (bursts of 20)");
  EXPECT_EQ(rej[0]["topic"], "dm/cmd/shelve");
  // Another second of flood: ten more taken, one more rejected event at most.
  for (int i = 0; i < 1000; ++i) d.at(0.001, "dm/cmd/shelve", R"({"zone":"z1","by":"ab","minutes":5})");
  EXPECT_EQ(d.core().counters().commands, 39u);
  EXPECT_EQ(d.events("rejected").size(), 2u);
  // Then a pause refills the bucket: an acknowledgement goes through.
  d.at(5, "dm/cmd/ack", R"({"zone":"z1","by":"ab"})");
  EXPECT_EQ(d.events("ack").size(), 1u);
}

TEST(EngineFloods, CommandsOnlyOnTheThreeCommandTopics) {
  engine_driver d(small_site());
  d.readings(24, 50, 17, 16);
  d.send("b/z1/surface", "12.5");
  d.clear_log();
  for (const char* topic : {"dm/cmd/ack/now", "dm/cmd/", "dm/cmd/ACK", "dm/cmd/ack "}) {
    d.send(topic, R"({"zone":"z1","by":"ab"})");
  }
  EXPECT_TRUE(d.events("ack").empty());
  EXPECT_EQ(d.events("rejected").size(), 4u);
  for (const auto& e : d.events("rejected")) {
    EXPECT_EQ(e["reason"].get<std::string>().rfind("unknown command '", 0), 0u) << e.dump();
  }
}

}  // namespace
}  // namespace dewmargin
