// facts_of: the fields the report takes from an event's JSON (a SAX pass, no document), with the
// same answers a document would give: types checked, a later duplicate key wins, anything that
// is not one JSON object is "not valid". Invented events (demo data).
#include <gtest/gtest.h>

#include "dewmargin/report/event_facts.h"

namespace dewmargin::report {
namespace {

event_facts facts(const std::string& json) {
  stored_event e;
  e.record.ts = parse_iso8601("2026-07-14T08:00:00Z").value();
  e.record.subject = subject_type::zone;
  e.record.subject_id = "a";
  e.record.kind = "band";
  e.record.json = json;
  return facts_of(e);
}

TEST(EventFacts, ReadsTheTopLevelFieldsAndTheAlarmObject) {
  const auto f =
      facts(R"({"ts":"2026-07-14T08:00:00Z","site":"s\u00e9","zone":"a","kind":"band","from":"safe","to":"alarm",)"
            R"("margin_k":0.8,"reason":"l2 dew point 15.2 \"x\"","alarm":{"active":true,"acknowledged":false,)"
            R"("shelved_until":null,"nested":{"active":false}},"suppressed_by":"window"})");
  ASSERT_TRUE(f.valid);
  EXPECT_EQ(f.subject_id, "a");
  EXPECT_EQ(f.kind, "band");
  EXPECT_EQ(f.site, "s\xc3\xa9");
  EXPECT_EQ(f.from, "safe");
  EXPECT_EQ(f.to, "alarm");
  EXPECT_FALSE(f.from_value.has_value());
  EXPECT_EQ(f.reason, "l2 dew point 15.2 \"x\"");
  EXPECT_EQ(f.alarm_active, std::optional<bool>(true));
  EXPECT_EQ(f.alarm_acknowledged, std::optional<bool>(false));
  EXPECT_TRUE(f.suppressed);
}

TEST(EventFacts, NumbersUntilAndTypesAsADocumentWouldGiveThem) {
  const auto f =
      facts(R"({"kind":"setpoint","from":16,"to":15.5,"limited":"max","until":"2026-07-14T09:30:00Z","topic":["x"],)"
            R"("suppressed_by":null,"alarm":"yes","site":{"name":"s"}})");
  ASSERT_TRUE(f.valid);
  EXPECT_EQ(f.from_value, std::optional<double>(16.0));
  EXPECT_EQ(f.to_value, std::optional<double>(15.5));
  EXPECT_EQ(f.from, "") << "a number is not text";
  EXPECT_EQ(f.limited, "max");
  ASSERT_TRUE(f.until.has_value());
  EXPECT_EQ(*f.until, parse_iso8601("2026-07-14T09:30:00Z").value());
  EXPECT_EQ(f.topic, "") << "an array is not text";
  EXPECT_FALSE(f.suppressed) << "null is not suppressed";
  EXPECT_FALSE(f.alarm_active.has_value()) << "alarm is not an object";
  EXPECT_EQ(f.site, "");
}

TEST(EventFacts, ALaterDuplicateKeyWins) {
  const auto f = facts(R"({"to":"alarm","to":2.5,"alarm":{"active":true},"alarm":{"acknowledged":true}})");
  ASSERT_TRUE(f.valid);
  EXPECT_EQ(f.to, "");
  EXPECT_EQ(f.to_value, std::optional<double>(2.5));
  EXPECT_FALSE(f.alarm_active.has_value()) << "the second alarm object has no active";
  EXPECT_EQ(f.alarm_acknowledged, std::optional<bool>(true));
}

TEST(EventFacts, AnythingButOneObjectIsNotValid) {
  for (const char* json : {"", "[1,2]", "\"text\"", "{\"to\":\"alarm\"", "{\"to\":\"alarm\"} {}", "{\"a\":\xff}",
                           "{\"to\":\"al\xffrm\"}"}) {
    const auto f = facts(json);
    EXPECT_FALSE(f.valid) << json;
    EXPECT_EQ(f.to, "") << json;
    EXPECT_EQ(f.kind, "band") << "the columns stay known";
  }
}

}  // namespace
}  // namespace dewmargin::report
