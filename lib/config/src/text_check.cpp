#include "text_check.h"

#include <cstdio>
#include <string>

#include "dewmargin/safe_text.h"

namespace dewmargin::config_detail {
namespace {

constexpr int k_max_reported_lines = 10;

std::string hex_byte(unsigned char b) {
  char buf[16];
  std::snprintf(buf, sizeof buf, "0x%02X", b);
  return buf;
}

std::string code_point_name(unsigned code) {
  char buf[16];
  std::snprintf(buf, sizeof buf, "U+%04X", code);
  return buf;
}

// The code point starting at `pos` of valid UTF-8, and its length.
unsigned decode_at(std::string_view s, std::size_t pos, std::size_t& length) {
  const auto b0 = static_cast<unsigned char>(s[pos]);
  const auto cont = [&](std::size_t i) { return static_cast<unsigned>(static_cast<unsigned char>(s[pos + i]) & 0x3F); };
  if (b0 < 0x80) {
    length = 1;
    return b0;
  }
  if (b0 < 0xE0) {
    length = 2;
    return (b0 & 0x1Fu) << 6 | cont(1);
  }
  if (b0 < 0xF0) {
    length = 3;
    return (b0 & 0x0Fu) << 12 | cont(1) << 6 | cont(2);
  }
  length = 4;
  return (b0 & 0x07u) << 18 | cont(1) << 12 | cont(2) << 6 | cont(3);
}

// YAML 1.2 allows in a stream only printable characters (section 5.1, "c-printable",
// from memory): tab and line breaks, but no other C0 control, no DEL, no C1 control
// (U+0085, which YAML counts as a line break, is refused too: line numbers would differ
// between readers) and no U+FFFE/U+FFFF.
bool printable_in_yaml(unsigned code) {
  if (code == '\t' || code == '\n' || code == '\r') return true;
  if (code < 0x20 || code == 0x7F) return false;
  if (code >= 0x80 && code <= 0x9F) return false;
  return code != 0xFFFE && code != 0xFFFF;
}

// The first problem of one line (without its line end), with its byte column (0-based).
std::string line_problem(std::string_view line, std::size_t& column) {
  const std::size_t bad = first_invalid_utf8(line);
  const std::size_t valid_until = bad == std::string_view::npos ? line.size() : bad;
  std::size_t pos = 0;
  while (pos < valid_until) {
    std::size_t length = 1;
    const unsigned code = decode_at(line, pos, length);
    if (!printable_in_yaml(code)) {
      column = pos;
      return "control character " + code_point_name(code) + " is not allowed in a config file";
    }
    pos += length;
  }
  if (bad == std::string_view::npos) return {};
  column = bad;
  return "byte " + hex_byte(static_cast<unsigned char>(line[bad])) +
         " is not UTF-8 text; a config file must be saved as UTF-8";
}

}  // namespace

bool check_config_text(std::string_view text, diagnostics& diag) {
  std::size_t start = 0;
  constexpr std::string_view k_bom = "\xEF\xBB\xBF";
  if (text.substr(0, k_bom.size()) == k_bom) start = k_bom.size();
  int line_number = 1;
  int reported = 0;
  int more = 0;
  source_mark first_unreported{};
  while (start <= text.size()) {
    std::size_t end = text.find('\n', start);
    if (end == std::string_view::npos) end = text.size();
    std::string_view line = text.substr(start, end - start);
    if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
    std::size_t column = 0;
    const std::string problem = line_problem(line, column);
    if (!problem.empty()) {
      const source_mark at{line_number, static_cast<int>(column) + 1};
      if (reported < k_max_reported_lines) {
        diag.error(at, problem);
        ++reported;
      } else {
        if (more == 0) first_unreported = at;
        ++more;
      }
    }
    if (end == text.size()) break;
    start = end + 1;
    ++line_number;
  }
  if (more > 0) {
    diag.error(first_unreported, std::to_string(more) + " more line" + (more == 1 ? "" : "s") +
                                     " with bytes that are not UTF-8 text or with control characters");
  }
  return reported == 0;
}

std::string text_value_problem(std::string_view value) {
  const std::size_t bad = first_invalid_utf8(value);
  if (bad != std::string_view::npos) {
    return "is not UTF-8 text (byte " + hex_byte(static_cast<unsigned char>(value[bad])) + " at byte " +
           std::to_string(bad + 1) + ")";
  }
  const std::size_t control = first_control_char(value);
  if (control != std::string_view::npos) {
    return "must not hold a control character (" + code_point_name(static_cast<unsigned char>(value[control])) +
           " at byte " + std::to_string(control + 1) + ")";
  }
  return {};
}

}  // namespace dewmargin::config_detail
