#include <gtest/gtest.h>

#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "dewmargin/json_dump.h"
#include "dewmargin/safe_text.h"

namespace dewmargin {
namespace {

const std::string k_fffd = "\xEF\xBF\xBD";

struct utf8_case {
  const char* name;
  std::string text;
  std::size_t first_invalid;  // npos: valid
  std::string replaced;
};

TEST(SafeText, FindsAndReplacesIllFormedUtf8) {
  const auto npos = std::string_view::npos;
  const std::vector<utf8_case> cases = {
      {"empty", "", npos, ""},
      {"ascii", "plant/l1/supply 21.5", npos, "plant/l1/supply 21.5"},
      {"two-byte",
       "21.5 \xC2\xB0"
       "C",
       npos,
       "21.5 \xC2\xB0"
       "C"},
      {"three-byte", "\xE2\x82\xAC", npos, "\xE2\x82\xAC"},
      {"four-byte", "\xF0\x9F\x92\xA7", npos, "\xF0\x9F\x92\xA7"},
      {"largest code point", "\xF4\x8F\xBF\xBF", npos, "\xF4\x8F\xBF\xBF"},
      {"NUL is valid UTF-8", std::string("a\0b", 3), npos, std::string("a\0b", 3)},
      {"lone continuation byte", "\x80", 0, k_fffd},
      {"byte FF",
       "a\xFF"
       "b",
       1, "a" + k_fffd + "b"},
      {"cut two-byte at the end", "ab\xC2", 2, "ab" + k_fffd},
      {"cut four-byte at the end", "\xF0\x9F\x92", 0, k_fffd},
      {"overlong slash", "\xC0\xAF", 0, k_fffd + k_fffd},
      {"overlong three-byte", "\xE0\x80\xAF", 0, k_fffd + k_fffd + k_fffd},
      {"surrogate", "\xED\xA0\x80", 0, k_fffd + k_fffd + k_fffd},
      {"above U+10FFFF", "\xF4\x90\x80\x80", 0, k_fffd + k_fffd + k_fffd + k_fffd},
      // The Unicode Standard, chapter 3.9, Table 3-8 (from memory): 61 F1 80 80 E1 80 C2 62 80 63 80 BF 64
      // gives a, FFFD, FFFD, FFFD, b, FFFD, c, FFFD, FFFD, d.
      {"maximal subparts", "\x61\xF1\x80\x80\xE1\x80\xC2\x62\x80\x63\x80\xBF\x64", 1,
       "a" + k_fffd + k_fffd + k_fffd + "b" + k_fffd + "c" + k_fffd + k_fffd + "d"},
  };
  for (const auto& c : cases) {
    EXPECT_EQ(first_invalid_utf8(c.text), c.first_invalid) << c.name;
    EXPECT_EQ(is_valid_utf8(c.text), c.first_invalid == npos) << c.name;
    const std::string replaced = to_valid_utf8(c.text);
    EXPECT_EQ(replaced, c.replaced) << c.name;
    EXPECT_TRUE(is_valid_utf8(replaced)) << c.name;
  }
}

struct printable_case {
  const char* name;
  std::string text;
  std::string expected;
};

TEST(SafeText, PrintableTextEscapesControlsAndKeepsCharacters) {
  const std::vector<printable_case> cases = {
      {"plain", "wet", "wet"},
      {"degree sign kept",
       "21 \xC2\xB0"
       "C",
       "21 \xC2\xB0"
       "C"},
      {"NUL", std::string("a\0b", 3), "a\\x00b"},
      {"line breaks and tab", "a\r\nb\tc", "a\\r\\nb\\tc"},
      {"escape sequence", "\x1B[31mred", "\\x1b[31mred"},
      {"DEL", "a\x7F", "a\\x7f"},
      {"C1 control CSI",
       "a\xC2\x9B"
       "31m",
       "a\\u009b31m"},
      {"no-break space kept",
       "a\xC2\xA0"
       "b",
       "a\xC2\xA0"
       "b"},
      {"invalid byte", "a\x80", "a" + k_fffd},
      {"backslash kept", "C:\\dir", "C:\\dir"},
  };
  for (const auto& c : cases) {
    const std::string p = printable_text(c.text);
    EXPECT_EQ(p, c.expected) << c.name;
    EXPECT_TRUE(is_valid_utf8(p)) << c.name;
    EXPECT_EQ(first_control_char(p), std::string_view::npos) << c.name;
  }
}

TEST(SafeText, ExcerptsCutBetweenCharacters) {
  EXPECT_EQ(text_excerpt("short", 40), "short");
  EXPECT_EQ(text_excerpt(std::string(41, 'x'), 40), std::string(40, 'x') + "...");
  // A two-byte character across the limit is left out whole, never cut in half.
  const std::string degrees = std::string(39, '1') + "\xC2\xB0" + "C";
  EXPECT_EQ(text_excerpt(degrees, 40), std::string(39, '1') + "...");
  const std::string euro = std::string(38, '1') + "\xE2\x82\xAC" + "x";
  EXPECT_EQ(text_excerpt(euro, 40), std::string(38, '1') + "...");
  EXPECT_EQ(text_excerpt(std::string(38, '1') + "\xE2\x82\xAC", 41), std::string(38, '1') + "\xE2\x82\xAC");
  // Invalid bytes count as the U+FFFD that stands for them.
  EXPECT_EQ(text_excerpt("\x80\x80", 3), k_fffd + "...");
  EXPECT_EQ(text_excerpt("\x80\x80", 2), "...");
  for (std::size_t limit = 0; limit < 50; ++limit) {
    EXPECT_TRUE(is_valid_utf8(text_excerpt("\xF0\x9F\x92\xA7\xC2\xB0\x80\xE2\x82\xAC\n\xFF", limit))) << limit;
  }
}

TEST(JsonDump, WritesCompactUtf8AndNeverThrowsOnInvalidBytes) {
  nlohmann::ordered_json j;
  j["site"] = "caf\xC3\xA9";
  j["reason"] = "payload '\x80' is not a number";
  j["nul"] = std::string("a\0b", 3);
  std::string text;
  ASSERT_NO_THROW(text = json_dump(j));
  EXPECT_EQ(text,
            "{\"site\":\"caf\xC3\xA9\",\"reason\":\"payload '" + k_fffd + "' is not a number\",\"nul\":\"a\\u0000b\"}");
  EXPECT_TRUE(is_valid_utf8(text));
  EXPECT_TRUE(nlohmann::json::accept(text));

  nlohmann::json unordered = {{"k", std::string("\xC3")}};
  EXPECT_EQ(json_dump(unordered), "{\"k\":\"" + k_fffd + "\"}");
}

}  // namespace
}  // namespace dewmargin
