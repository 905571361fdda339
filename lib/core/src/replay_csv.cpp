#include "dewmargin/replay_csv.h"

#include <cmath>
#include <cstdlib>

#include "dewmargin/safe_text.h"

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

// Times the service can meet: from the Unix epoch to the last instant ISO 8601 writes with
// four digits. Outside it, the seconds would wrap or stand for a year no timestamp shows.
constexpr std::int64_t k_first_ms = 0;                  // 1970-01-01T00:00:00Z
constexpr std::int64_t k_end_ms = 253'402'300'800'000;  // 10000-01-01T00:00:00Z

std::string quoted(const std::string& text) { return "'" + text_excerpt(text, 40) + "'"; }

error out_of_range(int line, const std::string& text) {
  return line_error(line, "ts " + quoted(text) + " is out of range: a time must lie from 1970-01-01 to 9999-12-31");
}

result<timestamp> parse_ts(const std::string& text, timestamp start, int line) {
  if (text.empty()) return line_error(line, "empty ts");
  const bool numeric = text.find_first_not_of("0123456789.+-eE") == std::string::npos;
  if (numeric) {
    char* end = nullptr;
    const double s = std::strtod(text.c_str(), &end);
    if (end == text.c_str() + text.size() && !std::isnan(s) && s >= 0.0) {
      // Compared as doubles before any conversion: 1e300 s would not fit in 64 bits.
      const double ms = static_cast<double>(to_unix_ms(start)) + s * 1000.0;
      if (!std::isfinite(s) || ms < static_cast<double>(k_first_ms) || ms >= static_cast<double>(k_end_ms)) {
        return out_of_range(line, text);
      }
      return start + std::chrono::milliseconds(static_cast<std::int64_t>(std::llround(s * 1000.0)));
    }
    // A date alone ("2026-07-14") is made of the same characters and is ISO 8601 too.
    if (auto date = parse_iso8601(text)) {
      if (to_unix_ms(date.value()) < k_first_ms) return out_of_range(line, text);
      return date.value();
    }
    return line_error(line, "ts " + quoted(text) + " is neither ISO 8601 nor seconds from the start (>= 0)");
  }
  auto t = parse_iso8601(text);
  if (!t) {
    // parse_iso8601's message would quote the text whole, and raw.
    return line_error(line,
                      "ts: " + quoted(text) + " is not an ISO 8601 time (e.g. 2026-07-14T13:00:00Z or 2026-07-14)");
  }
  const std::int64_t ms = to_unix_ms(t.value());
  if (ms < k_first_ms || ms >= k_end_ms) return out_of_range(line, text);
  return t.value();
}

bool is_header(const std::vector<std::string>& f) {
  return f.size() == 3 && f[0] == "ts" && f[1] == "topic" && f[2] == "payload";
}

// A reading arrives on one exact MQTT topic: UTF-8 text without NUL or wildcards
// (MQTT 3.1.1 sections 1.5.3 and 4.7, from memory).
std::string topic_problem(const std::string& topic) {
  if (topic.empty()) return "empty topic";
  if (topic.find('\0') != std::string::npos) {
    return "NUL byte in the topic at byte " + std::to_string(topic.find('\0') + 1);
  }
  if (!is_valid_utf8(topic)) {
    return "the topic " + quoted(topic) + " is not UTF-8 text (byte " + std::to_string(first_invalid_utf8(topic) + 1) +
           ")";
  }
  if (topic.find_first_of("+#") != std::string::npos) {
    return "the topic " + quoted(topic) + " holds an MQTT wildcard ('+' or '#')";
  }
  return {};
}

}  // namespace

result<std::vector<replay_row>> parse_replay_csv(std::string_view text, timestamp start) {
  std::vector<replay_row> rows;
  constexpr std::string_view k_bom = "\xEF\xBB\xBF";  // as some editors save UTF-8
  std::size_t pos = text.substr(0, k_bom.size()) == k_bom ? k_bom.size() : 0;
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
    if (first) {
      // Without it the first reading would be taken for the column names, or the other way round.
      if (!is_header(f)) {
        std::string found;
        for (const auto& field : f) found += (found.empty() ? "" : ",") + field;
        return line_error(record_line, "the first record must be the header ts,topic,payload, found " + quoted(found));
      }
      first = false;
      continue;
    }
    if (f.size() != 3) {
      return line_error(record_line, "expected 3 fields ts,topic,payload, found " + std::to_string(f.size()));
    }
    if (const std::string why = topic_problem(f[1]); !why.empty()) return line_error(record_line, why);
    if (const auto nul = f[2].find('\0'); nul != std::string::npos) {
      return line_error(record_line, "NUL byte in the payload at byte " + std::to_string(nul + 1));
    }
    auto ts = parse_ts(f[0], start, record_line);
    if (!ts) return ts.err();
    rows.push_back({record_line, ts.value(), std::move(f[1]), std::move(f[2])});
  }
  return rows;
}

}  // namespace dewmargin
