#include "dewmargin/history_format.h"

#include <nlohmann/json.hpp>

#include "dewmargin/json_dump.h"

namespace dewmargin {
namespace {

using ordered_json = nlohmann::ordered_json;

// "from"/"to" as a column: strings as they are, null as nothing, anything else as JSON.
std::string value_text(const ordered_json& v) {
  if (v.is_null()) return {};
  if (v.is_string()) return v.get<std::string>();
  return json_dump(v);
}

// key=value for a terminal: a plain string stays bare; one with spaces, quotes, '=' or control
// characters is JSON-quoted so the row stays on one line and can be read back.
std::string detail_value_text(const ordered_json& v) {
  if (!v.is_string()) return json_dump(v);
  const auto& s = v.get_ref<const std::string&>();
  bool bare = !s.empty();
  for (const char c : s) {
    if (c == ' ' || c == '"' || c == '=' || c == '\\' || static_cast<unsigned char>(c) < 0x20) {
      bare = false;
      break;
    }
  }
  return bare ? s : json_dump(v);
}

}  // namespace

event_columns event_columns_of(const stored_event& event) {
  event_columns c;
  const event_record& r = event.record;
  c.ts = format_iso8601_utc(r.ts);
  c.subject_type = subject_type_name(r.subject);
  c.subject = r.subject_id;
  c.kind = r.kind;

  ordered_json j = ordered_json::parse(r.json, nullptr, /*allow_exceptions=*/false);
  if (!j.is_object()) {
    c.json_valid = false;
    c.details_json = r.json;
    // Quoted and escaped, so that stray line breaks or bytes cannot break the terminal's row.
    c.details_text = json_dump(ordered_json(r.json));
    return c;
  }
  ordered_json details = ordered_json::object();
  for (auto it = j.begin(); it != j.end(); ++it) {
    const std::string& key = it.key();
    if (key == "from") {
      c.from = value_text(it.value());
    } else if (key == "to") {
      c.to = value_text(it.value());
    } else if (key != "ts" && key != "site" && key != "kind" && key != c.subject_type) {
      details[key] = it.value();
    }
  }
  if (!details.empty()) {
    c.details_json = json_dump(details);
    for (auto it = details.begin(); it != details.end(); ++it) {
      if (!c.details_text.empty()) c.details_text += ' ';
      c.details_text += it.key() + "=" + detail_value_text(it.value());
    }
  }
  return c;
}

std::string csv_field(std::string_view text) {
  if (text.find_first_of(",\"\r\n") == std::string_view::npos) return std::string(text);
  std::string quoted;
  quoted.reserve(text.size() + 2);
  quoted += '"';
  for (const char ch : text) {
    if (ch == '"') quoted += '"';
    quoted += ch;
  }
  quoted += '"';
  return quoted;
}

std::string csv_record(const std::vector<std::string>& fields) {
  std::string line;
  for (std::size_t i = 0; i < fields.size(); ++i) {
    if (i > 0) line += ',';
    line += csv_field(fields[i]);
  }
  line += "\r\n";
  return line;
}

std::size_t display_width(std::string_view utf8) {
  std::size_t n = 0;
  for (const char ch : utf8) {
    if ((static_cast<unsigned char>(ch) & 0xC0) != 0x80) ++n;  // not a continuation byte
  }
  return n;
}

}  // namespace dewmargin
