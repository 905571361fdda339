#include <gtest/gtest.h>

#include <string>
#include <vector>

#include "dewmargin/replay_csv.h"

namespace dewmargin {
namespace {

const timestamp k_start = from_unix_ms(1'784'030'400'000);  // 2026-07-14T12:00:00Z

timestamp after_ms(std::int64_t ms) { return k_start + std::chrono::milliseconds(ms); }

struct expected_row {
  int line;
  timestamp ts;
  std::string topic;
  std::string payload;
};

void expect_rows(const std::string& text, const std::vector<expected_row>& expected, const std::string& what) {
  const auto r = parse_replay_csv(text, k_start);
  ASSERT_TRUE(r.ok()) << what << ": " << r.err().message;
  const auto& rows = r.value();
  ASSERT_EQ(rows.size(), expected.size()) << what;
  for (std::size_t i = 0; i < rows.size(); ++i) {
    EXPECT_EQ(rows[i].line, expected[i].line) << what << ", row " << i;
    EXPECT_EQ(rows[i].ts, expected[i].ts) << what << ", row " << i;
    EXPECT_EQ(rows[i].topic, expected[i].topic) << what << ", row " << i;
    EXPECT_EQ(rows[i].payload, expected[i].payload) << what << ", row " << i;
  }
}

TEST(ReplayCsv, SkipsHeaderCommentsAndBlankLines) {
  const std::string text =
      "ts,topic,payload\n"       // 1
      "# recorded on level 2\n"  // 2
      "\n"                       // 3
      "0,bldg/l2e/temp,24.5\n"   // 4
      "#,not,a record\n"         // 5
      "\n"                       // 6
      "1.5,bldg/l2e/rh,55\n";    // 7
  expect_rows(text, {{4, after_ms(0), "bldg/l2e/temp", "24.5"}, {7, after_ms(1500), "bldg/l2e/rh", "55"}}, "LF");
}

TEST(ReplayCsv, ReadsQuotedJsonPayloadsAndKeepsLineNumbers) {
  const std::string text =
      "ts,topic,payload\n"                                         // 1
      "0,bldg/l2e/air,\"{\"\"t\"\": 24.5, \"\"rh\"\": 55}\"\n"     // 2
      "1,\"bldg/l2e/note\",\"first line\nsecond, line\nthird\"\n"  // 3-5
      "2,bldg/l2e/empty,\"\"\n"                                    // 6
      "3,bldg/l2e/quote,\"\"\"\"\n"                                // 7
      "4,bldg/l2e/bare,\n"                                         // 8
      "5,bldg/l2e/last,21";                                        // 9, no final newline
  expect_rows(text,
              {{2, after_ms(0), "bldg/l2e/air", R"({"t": 24.5, "rh": 55})"},
               {3, after_ms(1000), "bldg/l2e/note", "first line\nsecond, line\nthird"},
               {6, after_ms(2000), "bldg/l2e/empty", ""},
               {7, after_ms(3000), "bldg/l2e/quote", "\""},
               {8, after_ms(4000), "bldg/l2e/bare", ""},
               {9, after_ms(5000), "bldg/l2e/last", "21"}},
              "quoted");
}

TEST(ReplayCsv, AcceptsCrlfLineEnds) {
  const std::string text =
      "ts,topic,payload\r\n"
      "# comment\r\n"
      "\r\n"
      "0,bldg/l2e/temp,24.5\r\n"
      "2,bldg/l2e/air,\"{\"\"t\"\": 1}\"\r\n";
  expect_rows(text, {{4, after_ms(0), "bldg/l2e/temp", "24.5"}, {5, after_ms(2000), "bldg/l2e/air", R"({"t": 1})"}},
              "CRLF");
}

struct ts_case {
  const char* ts;
  timestamp expected;
};

TEST(ReplayCsv, ReadsIsoTimesAndSecondsFromTheStart) {
  const std::vector<ts_case> cases = {
      {"0", k_start},
      {"0.001", after_ms(1)},
      {"3600", after_ms(3'600'000)},
      {"2.5e1", after_ms(25'000)},
      {"2026-07-14T13:00:00Z", from_unix_ms(1'784'034'000'000)},
      {"2026-07-14T15:00:00+02:00", from_unix_ms(1'784'034'000'000)},
      {"2026-07-14T13:00:00.250Z", from_unix_ms(1'784'034'000'250)},
      {"2026-07-14 13:00:00", from_unix_ms(1'784'034'000'000)},
      {"2026-07-14", from_unix_ms(1'783'987'200'000)},  // a date alone is its midnight UTC
  };
  for (const auto& c : cases) {
    const auto r = parse_replay_csv(std::string(c.ts) + ",t,1\n", k_start);
    ASSERT_TRUE(r.ok()) << c.ts << ": " << r.err().message;
    ASSERT_EQ(r.value().size(), 1u) << c.ts;
    EXPECT_EQ(r.value()[0].ts, c.expected) << c.ts << " gave " << format_iso8601_utc(r.value()[0].ts);
  }
}

TEST(ReplayCsv, ReadsNothingFromAnEmptyFile) {
  for (const char* text : {"", "ts,topic,payload\n", "# only a comment\n\n"}) {
    const auto r = parse_replay_csv(text, k_start);
    ASSERT_TRUE(r.ok()) << r.err().message;
    EXPECT_TRUE(r.value().empty()) << "'" << text << "'";
  }
}

struct error_case {
  const char* name;
  std::string text;
  std::string message;
};

TEST(ReplayCsv, NamesTheLineOfEachMalformedRecord) {
  const std::vector<error_case> cases = {
      {"two fields", "ts,topic,payload\n0,t\n", "2: expected 3 fields ts,topic,payload, found 2"},
      {"four fields", "0,t,1,2\n", "1: expected 3 fields ts,topic,payload, found 4"},
      {"unquoted JSON with commas", "0,t,{\"a\":1,\"b\":2}\n", "1: quote inside an unquoted field"},
      {"blank-only line", "0,t,1\n   \n", "2: expected 3 fields ts,topic,payload, found 1"},
      {"after a multi-line record", "0,t,\"a\nb\nc\"\n1,t\n", "4: expected 3 fields ts,topic,payload, found 2"},
      {"unclosed quote", "ts,topic,payload\n0,t,1\n1,t,\"{\"\"a\"\": 1\n2,t,3\n",
       "3: quoted field not closed before the end of the file"},
      {"text after closing quote", "0,t,\"open\"ed\n", "1: text after a closing quote"},
      {"blank after closing quote", "0,\"t\" ,1\n", "1: text after a closing quote"},
      {"quote inside a field", "0,t,ab\"c\"\n", "1: quote inside an unquoted field"},
      {"empty ts", ",t,1\n", "1: empty ts"},
      {"negative seconds", "-5,t,1\n", "1: ts '-5' is neither ISO 8601 nor seconds from the start (>= 0)"},
      {"two points", "1.2.3,t,1\n", "1: ts '1.2.3' is neither ISO 8601 nor seconds from the start (>= 0)"},
      {"word ts", "soon,t,1\n", "1: ts: 'soon' is not an ISO 8601 time (e.g. 2026-07-14T13:00:00Z or 2026-07-14)"},
      {"impossible date", "0,t,1\n2026-02-30T00:00:00Z,t,1\n",
       "2: ts: '2026-02-30T00:00:00Z' is not an ISO 8601 time (e.g. 2026-07-14T13:00:00Z or 2026-07-14)"},
      {"header not first", "0,t,1\nts,topic,payload\n",
       "2: ts: 'ts' is not an ISO 8601 time (e.g. 2026-07-14T13:00:00Z or 2026-07-14)"},
      {"empty topic", "ts,topic,payload\n# c\n0,,1\n", "3: empty topic"},
      {"CRLF line count", "0,t,1\r\n\r\n1,t\r\n", "3: expected 3 fields ts,topic,payload, found 2"},
  };
  for (const auto& c : cases) {
    const auto r = parse_replay_csv(c.text, k_start);
    ASSERT_FALSE(r.ok()) << c.name;
    EXPECT_EQ(r.err().code, error_code::parse_error) << c.name;
    EXPECT_EQ(r.err().message, c.message) << c.name;
  }
}

}  // namespace
}  // namespace dewmargin
