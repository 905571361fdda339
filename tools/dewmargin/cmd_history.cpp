// `dewmargin history`: prints the event log of a history database (read-only, so it works
// while the service writes). Formats: table (terminal), csv (RFC 4180), json (one array).
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
  return j.dump(-1, ' ', false, nlohmann::ordered_json::error_handler_t::replace);  // raw text may not be UTF-8
}

}  // namespace

int run_history(const history_options& o, std::ostream& out, std::ostream& err) {
  if (o.format != "table" && o.format != "csv" && o.format != "json") {
    err << k_prog << "--format '" << o.format << "' is not one of table, csv, json\n";
    return k_exit_usage;
  }
  event_filter filter;
  if (!o.zone.empty()) filter.subject_id = o.zone;
  if (!o.kind.empty()) {
    if (!parse_event_kind(o.kind)) {
      err << k_prog << "--kind '" << o.kind << "' is not an event kind (" << event_kind_list() << ")\n";
      return k_exit_usage;
    }
    filter.kind = o.kind;
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
    err << reader.err().message << '\n';
    return k_exit_runtime;
  }

  std::vector<std::int64_t> invalid_ids;
  std::vector<std::array<std::string, 5>> table_rows;  // time, subject, kind, from → to, details
  std::size_t json_rows = 0;
  if (o.format == "csv") out << csv_record({"ts", "subject_type", "subject", "kind", "from", "to", "details"});
  if (o.format == "json") out << '[';

  const auto visited = reader.value().for_each_event(filter, [&](const stored_event& e) {
    const event_columns c = event_columns_of(e);
    if (!c.json_valid) invalid_ids.push_back(e.id);
    if (o.format == "csv") {
      out << csv_record({c.ts, c.subject_type, c.subject, c.kind, c.from, c.to, c.details_json});
    } else if (o.format == "json") {
      out << (json_rows++ == 0 ? "\n" : ",\n") << json_text(e, c);
    } else {
      table_rows.push_back({c.ts, subject_text(c), c.kind, transition_text(c), c.details_text});
    }
  });

  if (o.format == "json") out << (json_rows == 0 ? "]\n" : "\n]\n");
  if (o.format == "table") {
    const bool filtered = filter.subject_id || filter.kind || filter.since || filter.until;
    if (table_rows.empty() && visited.ok()) {
      out << (filtered ? "no events match the filters\n" : "no events\n");
    } else if (!table_rows.empty()) {
      const std::array<std::string, 5> header = {"TIME (UTC)", "SUBJECT", "KIND", "FROM → TO", "DETAILS"};
      std::array<std::size_t, 5> width{};
      for (std::size_t col = 0; col < width.size(); ++col) width[col] = display_width(header[col]);
      for (const auto& row : table_rows) {
        for (std::size_t col = 0; col < width.size(); ++col) width[col] = std::max(width[col], display_width(row[col]));
      }
      const auto print_row = [&](const std::array<std::string, 5>& row) {
        for (std::size_t col = 0; col + 1 < row.size(); ++col) pad(out, row[col], width[col] + 2);
        out << row.back() << '\n';
      };
      print_row(header);
      for (const auto& row : table_rows) print_row(row);
    }
  }
  out.flush();

  if (!visited.ok()) {
    err << visited.err().message << '\n';
    return k_exit_runtime;
  }
  if (!invalid_ids.empty()) {
    err << o.db << ": " << invalid_ids.size() << " stored event(s) are not valid JSON objects (first id "
        << invalid_ids.front() << "); shown as stored\n";
    return k_exit_runtime;
  }
  return k_exit_ok;
}

}  // namespace dewmargin::cli
