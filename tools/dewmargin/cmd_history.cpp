// `dewmargin history`: prints the event log of a history database (read-only, so it works
// while the service writes). Formats: table (terminal), csv (RFC 4180), json (one object per
// line). Rows are streamed from the database as they are read: a year of events is never held
// in memory. The table reads the rows twice (column widths first, then the rows).
#include <algorithm>
#include <array>
#include <chrono>
#include <nlohmann/json.hpp>
#include <ostream>
#include <string>
#include <string_view>
#include <vector>

#include "commands.h"
#include "dewmargin/event_kind.h"
#include "dewmargin/history_format.h"
#include "dewmargin/history_reader.h"
#include "dewmargin/json_dump.h"
#include "dewmargin/timestamp.h"

namespace dewmargin::cli {
namespace {

constexpr std::string_view k_prog = "dewmargin history: ";
// A bare date given to --until means "up to the end of that day".
bool is_bare_date(std::string_view text) { return text.size() == 10; }

std::string subject_text(const event_columns& c) {
  return c.subject.empty() ? c.subject_type : c.subject_type + " " + c.subject;
}

std::string transition_text(const event_columns& c) {
  if (c.from.empty() && c.to.empty()) return {};
  return (c.from.empty() ? std::string() : c.from + " ") + "→" + (c.to.empty() ? std::string() : " " + c.to);
}

void pad(std::ostream& out, const std::string& text, std::size_t width) {
  out << text;
  for (std::size_t n = display_width(text); n < width; ++n) out << ' ';
}

// The stored JSON of an event, or (when it is not a JSON object) an object that says so.
std::string json_text(const stored_event& e, const event_columns& c) {
  if (c.json_valid) return e.record.json;
  nlohmann::ordered_json j;
  j["ts"] = c.ts;
  j[c.subject_type] = c.subject;
  j["kind"] = c.kind;
  j["invalid_stored_json"] = e.record.json;
  return json_dump(j);  // raw text may not be UTF-8
}

}  // namespace

int run_history(const history_options& o, std::ostream& out, std::ostream& err) {
  if (o.format != "table" && o.format != "csv" && o.format != "json") {
    err << k_prog << "--format '" << o.format << "' is not one of table, csv, json\n";
    return k_exit_usage;
  }
  event_filter filter;
  if (!o.zone.empty()) filter.subject_id = o.zone;
  for (const auto& kind : o.kinds) {
    if (!parse_event_kind(kind)) {
      err << k_prog << "--kind '" << kind << "' is not an event kind (" << event_kind_list() << ")\n";
      return k_exit_usage;
    }
    if (std::find(filter.kinds.begin(), filter.kinds.end(), kind) == filter.kinds.end()) filter.kinds.push_back(kind);
  }
  if (!o.since_text.empty()) {
    const auto since = parse_iso8601(o.since_text);
    if (!since.ok()) {
      err << k_prog << "--since: " << since.err().message << '\n';
      return k_exit_usage;
    }
    filter.since = since.value();
  }
  if (!o.until_text.empty()) {
    const auto until = parse_iso8601(o.until_text);
    if (!until.ok()) {
      err << k_prog << "--until: " << until.err().message << '\n';
      return k_exit_usage;
    }
    filter.until = is_bare_date(o.until_text) ? until.value() + std::chrono::hours{24} : until.value();
  }
  if (filter.since && filter.until && *filter.since >= *filter.until) {
    err << k_prog << "--since " << format_iso8601_utc(*filter.since) << " is not before --until "
        << format_iso8601_utc(*filter.until) << '\n';
    return k_exit_usage;
  }
  if (o.db.empty()) {
    err << k_prog << "--db FILE is required\n";
    return k_exit_usage;
  }

  const auto reader = history_reader::open(o.db);
  if (!reader.ok()) {
    err << k_prog << reader.err().message << '\n';
    return k_exit_runtime;
  }

  std::size_t invalid_count = 0;
  std::int64_t first_invalid_id = 0;
  const auto note_invalid = [&](const stored_event& e, const event_columns& c) {
    if (c.json_valid) return;
    if (invalid_count++ == 0) first_invalid_id = e.id;
  };
  store_result<std::size_t> visited = std::size_t{0};
  if (o.format == "csv") {
    out << csv_record({"ts", "subject_type", "subject", "kind", "from", "to", "details"});
    visited = reader.value().for_each_event(filter, [&](const stored_event& e) {
      const event_columns c = event_columns_of(e);
      note_invalid(e, c);
      out << csv_record({c.ts, c.subject_type, c.subject, c.kind, c.from, c.to, c.details_json});
    });
  } else if (o.format == "json") {
    visited = reader.value().for_each_event(filter, [&](const stored_event& e) {
      const event_columns c = event_columns_of(e);
      note_invalid(e, c);
      out << json_text(e, c) << '\n';
    });
  } else {
    using row = std::array<std::string, 5>;  // time, subject, kind, from → to, details
    const auto row_of = [](const event_columns& c) -> row {
      return {c.ts, subject_text(c), c.kind, transition_text(c), c.details_text};
    };
    const row header = {"TIME (UTC)", "SUBJECT", "KIND", "FROM → TO", "DETAILS"};
    std::array<std::size_t, 5> width{};
    for (std::size_t col = 0; col < width.size(); ++col) width[col] = display_width(header[col]);
    visited = reader.value().for_each_event(filter, [&](const stored_event& e) {
      const row r = row_of(event_columns_of(e));
      for (std::size_t col = 0; col < width.size(); ++col) width[col] = std::max(width[col], display_width(r[col]));
    });
    const auto print_row = [&](const row& r) {
      for (std::size_t col = 0; col + 1 < r.size(); ++col) pad(out, r[col], width[col] + 2);
      out << r.back() << '\n';
    };
    if (visited.ok() && visited.value() == 0) {
      const bool filtered = filter.subject_id || !filter.kinds.empty() || filter.since || filter.until;
      out << (filtered ? "no events match the filters\n" : "no events\n");
    } else if (visited.ok()) {
      print_row(header);
      visited = reader.value().for_each_event(filter, [&](const stored_event& e) {
        const event_columns c = event_columns_of(e);
        note_invalid(e, c);
        print_row(row_of(c));
      });
    }
  }
  out.flush();

  if (!visited.ok()) {
    err << k_prog << visited.err().message << '\n';
    return k_exit_runtime;
  }
  if (invalid_count > 0) {
    err << o.db << ": " << invalid_count << " stored event(s) are not valid JSON objects (first id "
        << first_invalid_id << "); shown as stored\n";
    return k_exit_runtime;
  }
  return k_exit_ok;
}

}  // namespace dewmargin::cli
