#include <gtest/gtest.h>

#include "dewmargin/event_emitter.h"
#include "dewmargin/event_kind.h"
#include "nlohmann/json.hpp"

namespace dewmargin {
namespace {

TEST(EventKind, EveryNameParsesBackToItsKind) {
  for (event_kind k : k_event_kinds) {
    const auto parsed = parse_event_kind(event_kind_name(k));
    ASSERT_TRUE(parsed) << event_kind_name(k);
    EXPECT_EQ(*parsed, k);
  }
  EXPECT_EQ(event_kind_list(), "band, ack, shelve, unshelve, valve, setpoint, dehumidify, input, rejected, service");
}

TEST(EventKind, ParsesOnlyTheExactPublishedName) {
  for (const char* text : {"", "Band", "BAND", " band", "band ", "bands", "alarm", "state"}) {
    EXPECT_FALSE(parse_event_kind(text)) << "'" << text << "'";
  }
}

TEST(EventEmitter, PublishesAndStoresTheSameObjectNamingSubjectAndKindOnce) {
  event_emitter emitter("site-1", "dm/events");
  engine_output out;
  const timestamp ts = from_unix_ms(1'800'000'000'000);
  emitter.emit(out, ts, {subject_type::zone, "z1"}, event_kind::valve,
               [](event_json& e) { e.text("from", "open").text("to", "closed"); });
  emitter.emit(
      out, ts, {}, event_kind::service, [](event_json& e) { e.text("to", "running"); }, true);
  ASSERT_EQ(out.messages.size(), 2u);
  ASSERT_EQ(out.events.size(), 2u);
  EXPECT_EQ(out.messages[0].topic, "dm/events");
  EXPECT_EQ(out.messages[0].cls, message_class::event);
  EXPECT_EQ(out.messages[1].cls, message_class::alarm_event);
  EXPECT_FALSE(out.messages[0].retained);
  EXPECT_EQ(out.events[0].json, out.messages[0].payload);
  EXPECT_EQ(out.events[0].kind, "valve");
  EXPECT_EQ(out.events[0].subject, subject_type::zone);
  EXPECT_EQ(out.events[0].subject_id, "z1");
  EXPECT_EQ(out.events[0].ts, ts);
  const auto j = nlohmann::json::parse(out.messages[0].payload);
  EXPECT_EQ(j["zone"], "z1");
  EXPECT_EQ(j["kind"], "valve");
  EXPECT_EQ(j["site"], "site-1");
  EXPECT_EQ(j["to"], "closed");
  const auto site = nlohmann::json::parse(out.messages[1].payload);
  EXPECT_FALSE(site.contains("zone"));
  EXPECT_EQ(out.events[1].subject, subject_type::site);
  EXPECT_EQ(out.events[1].subject_id, "");
}

}  // namespace
}  // namespace dewmargin
