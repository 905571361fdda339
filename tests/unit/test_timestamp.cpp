#include "dewmargin/timestamp.h"

#include <gtest/gtest.h>

namespace dewmargin {
namespace {

TEST(Timestamp, FormatsWholeSecondsWithoutFraction) {
  // 2026-07-14T13:00:00Z = 1784034000 s since the epoch (computed with GNU date -u -d).
  EXPECT_EQ(format_iso8601_utc(from_unix_ms(1784034000000)), "2026-07-14T13:00:00Z");
  EXPECT_EQ(format_iso8601_utc(from_unix_ms(1784034000250)), "2026-07-14T13:00:00.250Z");
  EXPECT_EQ(format_iso8601_utc(from_unix_ms(0)), "1970-01-01T00:00:00Z");
}

struct parse_case {
  const char* text;
  std::int64_t unix_ms;
};

class TimestampParse : public ::testing::TestWithParam<parse_case> {};

TEST_P(TimestampParse, AcceptsIsoForms) {
  const auto r = parse_iso8601(GetParam().text);
  ASSERT_TRUE(r.ok()) << GetParam().text << ": " << r.err().message;
  EXPECT_EQ(to_unix_ms(r.value()), GetParam().unix_ms) << GetParam().text;
}

INSTANTIATE_TEST_SUITE_P(Forms, TimestampParse,
                         ::testing::Values(parse_case{"2026-07-14T13:00:00Z", 1784034000000},
                                           parse_case{"2026-07-14", 1783987200000},
                                           parse_case{"2026-07-14T13:00Z", 1784034000000},
                                           parse_case{"2026-07-14T15:00:00+02:00", 1784034000000},
                                           parse_case{"2026-07-14 13:00:00", 1784034000000},
                                           parse_case{"2026-07-14T13:00:00.5Z", 1784034000500},
                                           parse_case{"2024-02-29T00:00:00Z", 1709164800000}));

TEST(Timestamp, RejectsMalformedText) {
  for (const char* bad : {"", "2026", "2026-13-01", "2026-02-30", "2026-07-14T25:00:00Z", "2026-07-14T13:00:00Q",
                          "yesterday", "2026-07-14T13:00:00Z junk"}) {
    const auto r = parse_iso8601(bad);
    EXPECT_FALSE(r.ok()) << bad;
    if (!r.ok()) {
      EXPECT_EQ(r.err().code, error_code::parse_error);
    }
  }
}

TEST(Timestamp, RoundTripsThroughText) {
  for (std::int64_t ms : {0LL, 1784034000000LL, 1784034000001LL, 4102444799999LL}) {
    EXPECT_EQ(to_unix_ms(parse_iso8601(format_iso8601_utc(from_unix_ms(ms))).value()), ms);
  }
}

}  // namespace
}  // namespace dewmargin
