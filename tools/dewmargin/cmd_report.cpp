// `dewmargin report`: a self-contained HTML review of a history database (read-only). The
// figures and the page come from dewmargin::report; this file checks the options, reads the
// optional config (thresholds, loops) and writes the file whole or not at all.
#include <chrono>
#include <cstdio>
#include <fstream>
#include <ostream>
#include <system_error>

#include "commands.h"
#include "dewmargin/config_loader.h"
#include "dewmargin/history_reader.h"
#include "dewmargin/report/report_data.h"
#include "dewmargin/timestamp.h"

namespace dewmargin::cli {
namespace {

constexpr std::string_view k_prog = "dewmargin report: ";

bool is_bare_date(std::string_view text) { return text.size() == 10; }

report::site_settings settings_of(const site_config& cfg) {
  report::site_settings s;
  s.site = cfg.site;
  for (const auto& z : cfg.zones) {
    s.thresholds[z.id] = z.thresholds;
    s.loop_of_zone[z.id] = z.loop;
  }
  for (const auto& l : cfg.loops) s.setpoints[l.id] = l.setpoint;
  return s;
}

}  // namespace

int run_report(const report_options& o, std::ostream& out, std::ostream& err) {
  report::report_options ro;
  if (!o.since_text.empty()) {
    const auto since = parse_iso8601(o.since_text);
    if (!since.ok()) {
      err << k_prog << "--since: " << since.err().message << '\n';
      return k_exit_usage;
    }
    ro.since = since.value();
  }
  if (!o.until_text.empty()) {
    const auto until = parse_iso8601(o.until_text);
    if (!until.ok()) {
      err << k_prog << "--until: " << until.err().message << '\n';
      return k_exit_usage;
    }
    ro.until = is_bare_date(o.until_text) ? until.value() + std::chrono::hours{24} : until.value();
  }
  if (ro.since && ro.until && *ro.since >= *ro.until) {
    err << k_prog << "--since " << format_iso8601_utc(*ro.since) << " is not before --until "
        << format_iso8601_utc(*ro.until) << '\n';
    return k_exit_usage;
  }
  if (o.out.empty()) {
    err << k_prog << "--out FILE.html is required\n";
    return k_exit_usage;
  }
  if (!o.config_file.empty()) {
    const auto loaded = load_config_file(o.config_file);
    if (!loaded.ok()) {
      for (const auto& d : loaded.errors) err << d.to_string() << '\n';
      return k_exit_usage;
    }
    ro.settings = settings_of(*loaded.config);
    ro.config_label = o.config_file;
    for (const auto& z : o.zones) {
      if (ro.settings->thresholds.count(z) == 0) {
        err << k_prog << "--zone '" << z << "' is not a zone of " << o.config_file << '\n';
        return k_exit_usage;
      }
    }
  }
  ro.zones = o.zones;
  ro.db_label = o.db;
  ro.generated_at = std::chrono::time_point_cast<std::chrono::milliseconds>(std::chrono::system_clock::now());

  const auto reader = history_reader::open(o.db);
  if (!reader.ok()) {
    err << k_prog << reader.err().message << '\n';
    return k_exit_runtime;
  }
  const auto data = report::build_report(reader.value(), ro);
  if (!data.ok()) {
    err << k_prog << data.err().message << '\n';
    return k_exit_runtime;
  }
  if (data.value().zones.empty()) {
    err << k_prog << o.db << ": no zone has samples or events in the period"
        << (o.zones.empty() ? "" : " (for the zones asked)") << "; no report written\n";
    return k_exit_runtime;
  }
  const std::string html = report::render_html(data.value());

  // Written beside the target and renamed over it: a reader never sees half a report.
  const std::string tmp = o.out + ".tmp";
  {
    std::ofstream file(tmp, std::ios::binary | std::ios::trunc);
    file << html;
    file.flush();
    if (!file) {
      err << k_prog << tmp << ": cannot write the report\n";
      std::remove(tmp.c_str());
      return k_exit_runtime;
    }
  }
  std::error_code ec;
  std::filesystem::rename(tmp, o.out, ec);
  if (ec) {
    err << k_prog << o.out << ": cannot write the report (" << ec.message() << ")\n";
    std::remove(tmp.c_str());
    return k_exit_runtime;
  }
  out << "report written: " << o.out << " (" << data.value().zones.size() << " zones, " << data.value().events_read
      << " events, " << data.value().periods_read << " sample rows)\n";
  return k_exit_ok;
}

}  // namespace dewmargin::cli
