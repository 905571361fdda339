#pragma once
// Turning stored events into the columns `dewmargin history` prints (and CSV export uses).
#include <string>
#include <string_view>
#include <vector>

#include "dewmargin/history_reader.h"

namespace dewmargin {

struct event_columns {
  std::string ts;            // ISO 8601 UTC, from the indexed column
  std::string subject_type;  // site, zone, loop, dehumidifier
  std::string subject;       // its id (empty for the site)
  std::string kind;
  std::string from;  // "from"/"to" of the event: strings as they are, numbers as JSON, null as ""
  std::string to;
  std::string details_json;  // the other fields (not ts, site, the subject's own key, kind, from, to)
                             // as one compact JSON object; "" when there are none
  std::string details_text;  // the same as `key=value` pairs for a terminal, on one line
  bool json_valid = true;    // false: the stored text is not a JSON object; details hold it raw
};

[[nodiscard]] event_columns event_columns_of(const stored_event& event);

// RFC 4180 field: quoted when it holds a comma, a double quote, CR or LF; quotes doubled inside.
[[nodiscard]] std::string csv_field(std::string_view text);

// One RFC 4180 record, fields joined by commas, ended by CRLF.
[[nodiscard]] std::string csv_record(const std::vector<std::string>& fields);

// Columns on a terminal: UTF-8 code points (each counted as one column).
[[nodiscard]] std::size_t display_width(std::string_view utf8);

}  // namespace dewmargin
