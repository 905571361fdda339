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
    const auto r = parse_replay_csv("ts,topic,payload\n" + std::string(c.ts) + ",t,1\n", k_start);
    ASSERT_TRUE(r.ok()) << c.ts << ": " << r.err().message;
    ASSERT_EQ(r.value().size(), 1u) << c.ts;
    EXPECT_EQ(r.value()[0].ts, c.expected) << c.ts << " gave " << format_iso8601_utc(r.value()[0].ts);
  }
}

TEST(ReplayCsv, ReadsNothingFromAnEmptyFile) {
  for (const char* text : {"", "ts,topic,payload\n", "# only a comment\n\n", "\xEF\xBB\xBF", "\n\n"}) {
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
      {"four fields", "ts,topic,payload\n0,t,1,2\n", "2: expected 3 fields ts,topic,payload, found 4"},
      {"unquoted JSON with commas", "ts,topic,payload\n0,t,{\"a\":1,\"b\":2}\n", "2: quote inside an unquoted field"},
      {"blank-only line", "ts,topic,payload\n0,t,1\n   \n", "3: expected 3 fields ts,topic,payload, found 1"},
      {"after a multi-line record", "ts,topic,payload\n0,t,\"a\nb\nc\"\n1,t\n",
       "5: expected 3 fields ts,topic,payload, found 2"},
      {"unclosed quote", "ts,topic,payload\n0,t,1\n1,t,\"{\"\"a\"\": 1\n2,t,3\n",
       "3: quoted field not closed before the end of the file"},
      {"text after closing quote", "ts,topic,payload\n0,t,\"open\"ed\n", "2: text after a closing quote"},
      {"blank after closing quote", "ts,topic,payload\n0,\"t\" ,1\n", "2: text after a closing quote"},
      {"quote inside a field", "ts,topic,payload\n0,t,ab\"c\"\n", "2: quote inside an unquoted field"},
      {"empty ts", "ts,topic,payload\n,t,1\n", "2: empty ts"},
      {"negative seconds", "ts,topic,payload\n-5,t,1\n",
       "2: ts '-5' is neither ISO 8601 nor seconds from the start (>= 0)"},
      {"two points", "ts,topic,payload\n1.2.3,t,1\n",
       "2: ts '1.2.3' is neither ISO 8601 nor seconds from the start (>= 0)"},
      {"word ts", "ts,topic,payload\nsoon,t,1\n",
       "2: ts: 'soon' is not an ISO 8601 time (e.g. 2026-07-14T13:00:00Z or 2026-07-14)"},
      {"impossible date", "ts,topic,payload\n0,t,1\n2026-02-30T00:00:00Z,t,1\n",
       "3: ts: '2026-02-30T00:00:00Z' is not an ISO 8601 time (e.g. 2026-07-14T13:00:00Z or 2026-07-14)"},
      {"header not first", "ts,topic,payload\n0,t,1\nts,topic,payload\n",
       "3: ts: 'ts' is not an ISO 8601 time (e.g. 2026-07-14T13:00:00Z or 2026-07-14)"},
      {"empty topic", "ts,topic,payload\n# c\n0,,1\n", "3: empty topic"},
      {"CRLF line count", "ts,topic,payload\r\n0,t,1\r\n\r\n1,t\r\n", "4: expected 3 fields ts,topic,payload, found 2"},
  };
  for (const auto& c : cases) {
    const auto r = parse_replay_csv(c.text, k_start);
    ASSERT_FALSE(r.ok()) << c.name;
    EXPECT_EQ(r.err().code, error_code::parse_error) << c.name;
    EXPECT_EQ(r.err().message, c.message) << c.name;
  }
}

// A file without the header used to have its first reading taken for the column names.
TEST(ReplayCsv, RequiresTheHeaderFirst) {
  const std::vector<error_case> cases = {
      {"first reading, no header", "0,t,1\n1,t,2\n",
       "1: the first record must be the header ts,topic,payload, found '0,t,1'"},
      {"after comments and blank lines", "# recorded on level 2\n\n0,t,1\n",
       "3: the first record must be the header ts,topic,payload, found '0,t,1'"},
      {"other names", "time,topic,value\n",
       "1: the first record must be the header ts,topic,payload, found 'time,topic,value'"},
      {"upper case", "TS,TOPIC,PAYLOAD\n",
       "1: the first record must be the header ts,topic,payload, found 'TS,TOPIC,PAYLOAD'"},
      {"two columns", "ts,topic\n", "1: the first record must be the header ts,topic,payload, found 'ts,topic'"},
      {"long first line excerpted", std::string(60, 'x') + "\n",
       "1: the first record must be the header ts,topic,payload, found '" + std::string(40, 'x') + "...'"},
      {"BOM and no header",
       "\xEF\xBB\xBF"
       "0,t,1\n",
       "1: the first record must be the header ts,topic,payload, found '0,t,1'"},
      {"BOM twice", "\xEF\xBB\xBF\xEF\xBB\xBFts,topic,payload\n",
       "1: the first record must be the header ts,topic,payload, found '\xEF\xBB\xBFts,topic,payload'"},
  };
  for (const auto& c : cases) {
    const auto r = parse_replay_csv(c.text, k_start);
    ASSERT_FALSE(r.ok()) << c.name;
    EXPECT_EQ(r.err().message, c.message) << c.name;
  }
}

// Some editors start a UTF-8 file with a byte-order mark; it used to make the header fail
// with an invisible character in the message.
TEST(ReplayCsv, SkipsAByteOrderMark) {
  expect_rows("\xEF\xBB\xBFts,topic,payload\n0,bldg/l2e/temp,24.5\n", {{2, after_ms(0), "bldg/l2e/temp", "24.5"}},
              "BOM");
  expect_rows("\xEF\xBB\xBF# comment\r\nts,topic,payload\r\n1,t,2\r\n", {{3, after_ms(1000), "t", "2"}}, "BOM, CRLF");
}

// `ts` of 1e300 used to wrap to year -292274999 with exit 0.
TEST(ReplayCsv, RefusesTimesOutsideTheYears1970To9999) {
  const std::string range = " is out of range: a time must lie from 1970-01-01 to 9999-12-31";
  const std::vector<error_case> cases = {
      {"1e300 seconds", "1e300", "2: ts '1e300'" + range},
      {"twenty nines", "99999999999999999999", "2: ts '99999999999999999999'" + range},
      {"overflow to infinity", "1e999", "2: ts '1e999'" + range},
      {"past 9999", "253402300800", "2: ts '253402300800'" + range},
      {"before 1970", "1969-12-31T23:59:59Z", "2: ts '1969-12-31T23:59:59Z'" + range},
      {"date before 1970", "1900-01-01", "2: ts '1900-01-01'" + range},
      {"year zero", "0000-01-01T00:00:00Z", "2: ts '0000-01-01T00:00:00Z'" + range},
      {"offset pushes past 9999", "9999-12-31T23:30:00-01:00", "2: ts '9999-12-31T23:30:00-01:00'" + range},
      {"offset pulls before 1970", "1970-01-01T00:30:00+01:00", "2: ts '1970-01-01T00:30:00+01:00'" + range},
  };
  for (const auto& c : cases) {
    const auto r = parse_replay_csv("ts,topic,payload\n" + c.text + ",t,1\n", from_unix_ms(0));
    ASSERT_FALSE(r.ok()) << c.name << " gave " << format_iso8601_utc(r.value().at(0).ts);
    EXPECT_EQ(r.err().message, c.message) << c.name;
  }
  // Seconds count from --start: the same number can be in range or not.
  const auto late = parse_replay_csv("ts,topic,payload\n3e11,t,1\n", from_unix_ms(0));
  ASSERT_FALSE(late.ok());
  const auto before = parse_replay_csv("ts,topic,payload\n0,t,1\n", from_unix_ms(-1000));
  ASSERT_FALSE(before.ok());
  EXPECT_EQ(before.err().message, "2: ts '0'" + range);
  // The edges themselves.
  for (const char* ok : {"1970-01-01T00:00:00Z", "9999-12-31T23:59:59.999Z", "253402300799.999", "0"}) {
    const auto r = parse_replay_csv("ts,topic,payload\n" + std::string(ok) + ",t,1\n", from_unix_ms(0));
    EXPECT_TRUE(r.ok()) << ok << ": " << r.err().message;
  }
}

// NUL bytes in topics and payloads used to pass silently.
TEST(ReplayCsv, RefusesNulBytesAndTopicsNoBrokerWouldCarry) {
  const std::string nul(1, '\0');
  const std::vector<error_case> cases = {
      {"NUL in the topic", "ts,topic,payload\n0,b/t" + nul + "x,1\n", "2: NUL byte in the topic at byte 4"},
      {"NUL in the payload", "ts,topic,payload\n0,b/t,2" + nul + "1\n", "2: NUL byte in the payload at byte 2"},
      {"NUL in a quoted payload", "ts,topic,payload\n0,b/t,\"{\"\"a\"\":\n" + nul + "}\"\n",
       "2: NUL byte in the payload at byte 7"},
      {"topic not UTF-8", "ts,topic,payload\n0,b/\xFF,1\n", "2: the topic 'b/\xEF\xBF\xBD' is not UTF-8 text (byte 3)"},
      {"wildcard topic", "ts,topic,payload\n0,b/+/t,1\n", "2: the topic 'b/+/t' holds an MQTT wildcard ('+' or '#')"},
      {"escape in a bad ts", "ts,topic,payload\n\x1b[2J,t,1\n",
       "2: ts: '\\x1b[2J' is not an ISO 8601 time (e.g. 2026-07-14T13:00:00Z or 2026-07-14)"},
  };
  for (const auto& c : cases) {
    const auto r = parse_replay_csv(c.text, k_start);
    ASSERT_FALSE(r.ok()) << c.name;
    EXPECT_EQ(r.err().message, c.message) << c.name;
  }
  // A payload that is not UTF-8 is still a payload (the decoder judges it).
  expect_rows("ts,topic,payload\n0,b/t,\x80\n", {{2, k_start, "b/t", "\x80"}}, "payload bytes");
}

}  // namespace
}  // namespace dewmargin
