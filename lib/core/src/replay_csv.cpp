#include "dewmargin/replay_csv.h"

#include <cerrno>
#include <cmath>
#include <cstdlib>

namespace dewmargin {
namespace {

error line_error(int line, const std::string& message) {
  return make_error(error_code::parse_error, std::to_string(line) + ": " + message);
}

// Splits one record starting at `pos`; advances `pos` past its line end and `line`
// past any newlines inside quoted fields.
result<std::vector<std::string>> read_record(std::string_view text, std::size_t& pos, int& line) {
  std::vector<std::string> fields;
  std::string field;
  const int start_line = line;
  bool quoted = false;
  bool after_quote = false;  // a quoted field ended; only a comma or line end may follow
  while (pos < text.size()) {
    const char c = text[pos];
    if (quoted) {
      if (c == '"') {
        if (pos + 1 < text.size() && text[pos + 1] == '"') {
          field += '"';
          pos += 2;
          continue;
        }
        quoted = false;
        after_quote = true;
        ++pos;
        continue;
      }
      if (c == '\n') ++line;
      field += c;
      ++pos;
      continue;
    }
    if (c == ',') {
      fields.push_back(std::move(field));
      field.clear();
      after_quote = false;
      ++pos;
      continue;
    }
    if (c == '\r' && pos + 1 < text.size() && text[pos + 1] == '\n') {
      ++pos;
      continue;
    }
    if (c == '\n') {
      ++pos;
      ++line;
      fields.push_back(std::move(field));
      return fields;
    }
    if (after_quote) return line_error(start_line, "text after a closing quote");
    if (c == '"') {
      if (!field.empty()) return line_error(start_line, "quote inside an unquoted field");
      quoted = true;
      ++pos;
      continue;
    }
    field += c;
    ++pos;
  }
  if (quoted) return line_error(start_line, "quoted field not closed before the end of the file");
  fields.push_back(std::move(field));
  ++line;
  return fields;
}

result<timestamp> parse_ts(const std::string& text, timestamp start, int line) {
  if (text.empty()) return line_error(line, "empty ts");
  const bool numeric = text.find_first_not_of("0123456789.+-eE") == std::string::npos;
  if (numeric) {
    errno = 0;
    char* end = nullptr;
    const double s = std::strtod(text.c_str(), &end);
    if (end == text.c_str() + text.size() && errno != ERANGE && std::isfinite(s) && s >= 0.0) {
      return start + std::chrono::milliseconds(static_cast<std::int64_t>(std::llround(s * 1000.0)));
    }
    // A date alone ("2026-07-14") is made of the same characters and is ISO 8601 too.
    if (auto date = parse_iso8601(text)) return date.value();
    return line_error(line, "ts '" + text + "' is neither ISO 8601 nor seconds from the start (>= 0)");
  }
  auto t = parse_iso8601(text);
  if (!t) return line_error(line, "ts: " + t.err().message);
  return t.value();
}

}  // namespace

result<std::vector<replay_row>> parse_replay_csv(std::string_view text, timestamp start) {
  std::vector<replay_row> rows;
  std::size_t pos = 0;
  int line = 1;
  bool first = true;
  while (pos < text.size()) {
    const int record_line = line;
    // Blank lines and comment lines are not records.
    if (text[pos] == '\n' || (text[pos] == '\r' && pos + 1 < text.size() && text[pos + 1] == '\n')) {
      pos += text[pos] == '\r' ? 2 : 1;
      ++line;
      continue;
    }
    if (text[pos] == '#') {
      const std::size_t eol = text.find('\n', pos);
      pos = eol == std::string_view::npos ? text.size() : eol + 1;
      ++line;
      continue;
    }
    auto rec = read_record(text, pos, line);
    if (!rec) return rec.err();
    auto& f = rec.value();
    if (first && f.size() == 3 && f[0] == "ts" && f[1] == "topic" && f[2] == "payload") {
      first = false;
      continue;
    }
    first = false;
    if (f.size() != 3) {
      return line_error(record_line, "expected 3 fields ts,topic,payload, found " + std::to_string(f.size()));
    }
    if (f[1].empty()) return line_error(record_line, "empty topic");
    auto ts = parse_ts(f[0], start, record_line);
    if (!ts) return ts.err();
    rows.push_back({record_line, ts.value(), std::move(f[1]), std::move(f[2])});
  }
  return rows;
}

}  // namespace dewmargin
