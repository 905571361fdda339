#include "dewmargin/safe_text.h"

#include <cstdio>

namespace dewmargin {
namespace {

constexpr std::string_view k_replacement = "\xEF\xBF\xBD";  // U+FFFD

bool is_continuation(unsigned char b) { return (b & 0xC0) == 0x80; }

// Length of the well-formed sequence at `pos`, or 0 with `bad_length` set to the length
// of the maximal ill-formed subpart (at least 1). Ranges: RFC 3629 section 4.
std::size_t sequence_length(std::string_view s, std::size_t pos, std::size_t& bad_length) {
  const auto b0 = static_cast<unsigned char>(s[pos]);
  bad_length = 1;
  if (b0 < 0x80) return 1;
  std::size_t length = 0;
  unsigned char lo = 0x80;
  unsigned char hi = 0xBF;
  if (b0 >= 0xC2 && b0 <= 0xDF) {
    length = 2;
  } else if (b0 >= 0xE0 && b0 <= 0xEF) {
    length = 3;
    if (b0 == 0xE0) lo = 0xA0;  // no overlong forms
    if (b0 == 0xED) hi = 0x9F;  // no surrogates
  } else if (b0 >= 0xF0 && b0 <= 0xF4) {
    length = 4;
    if (b0 == 0xF0) lo = 0x90;  // no overlong forms
    if (b0 == 0xF4) hi = 0x8F;  // nothing above U+10FFFF
  } else {
    return 0;  // a continuation byte, C0/C1 (overlong) or F5..FF
  }
  for (std::size_t i = 1; i < length; ++i) {
    if (pos + i >= s.size()) {
      bad_length = i;
      return 0;
    }
    const auto b = static_cast<unsigned char>(s[pos + i]);
    const bool ok = i == 1 ? (b >= lo && b <= hi) : is_continuation(b);
    if (!ok) {
      bad_length = i;
      return 0;
    }
  }
  return length;
}

void append_escape(std::string& out, unsigned code) {
  char buf[16];
  switch (code) {
    case '\n':
      out += "\\n";
      return;
    case '\r':
      out += "\\r";
      return;
    case '\t':
      out += "\\t";
      return;
    default:
      break;
  }
  if (code < 0x80) {
    std::snprintf(buf, sizeof buf, "\\x%02x", code);
  } else {
    std::snprintf(buf, sizeof buf, "\\u%04x", code);
  }
  out += buf;
}

}  // namespace

std::size_t first_invalid_utf8(std::string_view s) {
  std::size_t pos = 0;
  while (pos < s.size()) {
    std::size_t bad = 0;
    const std::size_t n = sequence_length(s, pos, bad);
    if (n == 0) return pos;
    pos += n;
  }
  return std::string_view::npos;
}

std::string to_valid_utf8(std::string_view s) {
  if (is_valid_utf8(s)) return std::string(s);
  std::string out;
  out.reserve(s.size() + 8);
  std::size_t pos = 0;
  while (pos < s.size()) {
    std::size_t bad = 0;
    const std::size_t n = sequence_length(s, pos, bad);
    if (n == 0) {
      out += k_replacement;
      pos += bad;
    } else {
      out.append(s.substr(pos, n));
      pos += n;
    }
  }
  return out;
}

std::string printable_text(std::string_view s) {
  const std::string valid = to_valid_utf8(s);
  std::string out;
  out.reserve(valid.size());
  for (std::size_t i = 0; i < valid.size(); ++i) {
    const auto b = static_cast<unsigned char>(valid[i]);
    if (b < 0x20 || b == 0x7F) {
      append_escape(out, b);
    } else if (b == 0xC2 && i + 1 < valid.size() && static_cast<unsigned char>(valid[i + 1]) < 0xA0) {
      // U+0080..U+009F, the C1 controls (some terminals act on U+009B as on ESC [).
      append_escape(out, static_cast<unsigned char>(valid[i + 1]));
      ++i;
    } else {
      out += valid[i];
    }
  }
  return out;
}

std::string text_excerpt(std::string_view s, std::size_t max_bytes) {
  const std::string valid = to_valid_utf8(s);
  if (valid.size() <= max_bytes) return printable_text(valid);
  std::size_t cut = max_bytes;
  while (cut > 0 && is_continuation(static_cast<unsigned char>(valid[cut]))) --cut;
  return printable_text(std::string_view(valid).substr(0, cut)) + "...";
}

std::size_t first_control_char(std::string_view s) {
  for (std::size_t i = 0; i < s.size(); ++i) {
    const auto b = static_cast<unsigned char>(s[i]);
    if (b < 0x20 || b == 0x7F) return i;
  }
  return std::string_view::npos;
}

}  // namespace dewmargin
