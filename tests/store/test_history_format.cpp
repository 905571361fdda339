// Columns of `dewmargin history` and RFC 4180 CSV.
#include "store_test_support.h"

namespace dewmargin {
namespace {

stored_event stored(subject_type type, const std::string& id, const std::string& kind, const std::string& json) {
  stored_event e;
  e.id = 1;
  e.record.ts = from_unix_ms(store_test::k_t0_ms);
  e.record.subject = type;
  e.record.subject_id = id;
  e.record.kind = kind;
  e.record.json = json;
  return e;
}

struct csv_case {
  const char* text;
  const char* field;
};

// Test names stay on one line: control characters are shown escaped.
void PrintTo(const csv_case& c, std::ostream* os) {
  *os << "csv_field of '";
  for (const char* p = c.text; *p != '\0'; ++p) {
    if (*p == '\n') {
      *os << "\\n";
    } else if (*p == '\r') {
      *os << "\\r";
    } else {
      *os << *p;
    }
  }
  *os << "'";
}

// RFC 4180 section 2: fields with commas, double quotes or line breaks are enclosed in double
// quotes, and a double quote inside is written twice.
class CsvField : public ::testing::TestWithParam<csv_case> {};

TEST_P(CsvField, QuotesPerRfc4180) { EXPECT_EQ(csv_field(GetParam().text), GetParam().field); }

INSTANTIATE_TEST_SUITE_P(Rfc4180, CsvField,
                         ::testing::Values(csv_case{"plain", "plain"}, csv_case{"", ""},
                                           csv_case{" spaced ", " spaced "}, csv_case{"a,b", "\"a,b\""},
                                           csv_case{"say \"dry\"", "\"say \"\"dry\"\"\""}, csv_case{"\"", "\"\"\"\""},
                                           csv_case{"line1\nline2", "\"line1\nline2\""},
                                           csv_case{"cr\rhere", "\"cr\rhere\""},
                                           csv_case{"crlf\r\nhere", "\"crlf\r\nhere\""},
                                           csv_case{"{\"a\":1,\"b\":\"x\"}", "\"{\"\"a\"\":1,\"\"b\"\":\"\"x\"\"}\""},
                                           csv_case{"→ unicode", "→ unicode"}));

TEST(CsvRecord, JoinsFieldsWithCommasAndEndsWithCrlf) {
  EXPECT_EQ(csv_record({"a", "b,c", "", "d\"e"}), "a,\"b,c\",,\"d\"\"e\"\r\n");
  EXPECT_EQ(csv_record({"only"}), "only\r\n");
}

TEST(EventColumns, SplitsFromToAndDetails) {
  const auto c = event_columns_of(stored(
      subject_type::zone, "level2-east", "band",
      R"({"ts":"2026-07-14T13:00:00Z","site":"s","zone":"level2-east","kind":"band","from":"safe","to":"tight","margin_k":1.84,"loop":"loop-a"})"));
  EXPECT_TRUE(c.json_valid);
  EXPECT_EQ(c.ts, "2026-07-14T13:00:00Z");
  EXPECT_EQ(c.subject_type, "zone");
  EXPECT_EQ(c.subject, "level2-east");
  EXPECT_EQ(c.kind, "band");
  EXPECT_EQ(c.from, "safe");
  EXPECT_EQ(c.to, "tight");
  EXPECT_EQ(c.details_json, R"({"margin_k":1.84,"loop":"loop-a"})")
      << "in published order; another subject's key stays";
  EXPECT_EQ(c.details_text, "margin_k=1.84 loop=loop-a");
}

TEST(EventColumns, NumbersAndNullsInFromAndTo) {
  const auto c = event_columns_of(
      stored(subject_type::loop, "loop-a", "setpoint", R"({"loop":"loop-a","kind":"setpoint","from":17.5,"to":null})"));
  EXPECT_EQ(c.from, "17.5");
  EXPECT_EQ(c.to, "");
  EXPECT_EQ(c.details_json, "");
  EXPECT_EQ(c.details_text, "");
}

TEST(EventColumns, DetailsTextQuotesWhatWouldBreakTheLine) {
  const auto c = event_columns_of(stored(
      subject_type::zone, "z1", "ack", R"({"zone":"z1","by":"AB","note":"checked, \"dry\"\nok","count":2,"ok":true})"));
  EXPECT_EQ(c.details_text, R"(by=AB note="checked, \"dry\"\nok" count=2 ok=true)");
  EXPECT_EQ(c.details_json, R"({"by":"AB","note":"checked, \"dry\"\nok","count":2,"ok":true})");
  EXPECT_EQ(csv_field(c.details_json),
            R"("{""by"":""AB"",""note"":""checked, \""dry\""\nok"",""count"":2,""ok"":true}")");
}

TEST(EventColumns, ARawLineBreakInAValueIsQuotedInCsv) {
  // An input event whose "to" carries a sensor's payload with a decimal comma and a newline.
  const auto c = event_columns_of(
      stored(subject_type::zone, "z1", "input", R"({"zone":"z1","kind":"input","from":"ok","to":"12,5\r\n"})"));
  EXPECT_EQ(c.to, "12,5\r\n");
  EXPECT_EQ(csv_record({c.ts, c.subject_type, c.subject, c.kind, c.from, c.to, c.details_json}),
            "2026-07-14T13:00:00Z,zone,z1,input,ok,\"12,5\r\n\",\r\n");
}

TEST(EventColumns, SiteEventsHaveNoSubjectId) {
  const auto c = event_columns_of(
      stored(subject_type::site, "", "service", R"({"ts":"x","site":"demo","kind":"service","action":"start"})"));
  EXPECT_EQ(c.subject_type, "site");
  EXPECT_EQ(c.subject, "");
  EXPECT_EQ(c.details_text, "action=start") << "the site label is the same on every row and left out";
}

TEST(EventColumns, MarksStoredTextThatIsNotAJsonObject) {
  for (const char* bad : {"not json", "[1,2]", "{\"truncated\":", ""}) {
    const auto c = event_columns_of(stored(subject_type::zone, "z1", "band", bad));
    EXPECT_FALSE(c.json_valid) << bad;
    EXPECT_EQ(c.details_json, bad);
    EXPECT_EQ(c.details_text.front(), '"') << "shown quoted on a terminal";
    EXPECT_EQ(c.kind, "band") << "the indexed columns are still shown";
  }
}

TEST(DisplayWidth, CountsCodePointsNotBytes) {
  EXPECT_EQ(display_width("safe → tight"), 12u);
  EXPECT_EQ(display_width(""), 0u);
  EXPECT_EQ(display_width("°C"), 2u);
}

}  // namespace
}  // namespace dewmargin
