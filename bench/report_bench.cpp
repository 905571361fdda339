// Report and history benchmark (figures only, no pass/fail).
//   1. Builds a history of 200 zones × 30 days of per-minute samples (8.64 million rows) and
//      about 40 alarm-related events per zone and day, through the service's store_writer.
//   2. A report over all of it (read, compute, render): median of 3 runs (target: under 3 s).
//   3. One zone's month of history, formatted as `dewmargin history --format csv` does:
//      median of 7 runs (target: under 100 ms).
//   4. Storage: bytes per zone per day of per-minute samples, then everything rolled up into
//      hourly rows, bytes per zone-hour, and the size after a year for 200 zones.
// Usage: dewmargin_report_bench [DIRECTORY] [ZONES] [DAYS] [FILE]   (default: temp dir, 200, 30)
//   FILE: a history file to keep (for profiling the report alone): written when missing, reused
//   as it is when present; it is not rolled up (step 4 is skipped) and not removed.
#include <sys/resource.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <sstream>
#include <string>
#include <vector>

#include "dewmargin/report/report_data.h"
#include "dewmargin/store.h"

namespace {

using steady = std::chrono::steady_clock;
using dewmargin::from_unix_ms;
constexpr std::int64_t k_start_ms = 1'782'864'000'000;  // 2026-07-01T00:00:00Z
constexpr std::int64_t k_min_ms = 60'000;

double ms_since(steady::time_point t) { return std::chrono::duration<double, std::milli>(steady::now() - t).count(); }

// CPU time of this process (all threads), ms: the figure that does not depend on what else the
// machine runs. On an idle machine with two cores the report's wall time is about half of it.
double cpu_ms() {
  rusage u{};
  getrusage(RUSAGE_SELF, &u);
  return (static_cast<double>(u.ru_utime.tv_sec + u.ru_stime.tv_sec) * 1000.0) +
         static_cast<double>(u.ru_utime.tv_usec + u.ru_stime.tv_usec) / 1000.0;
}

double median(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  return v[v.size() / 2];
}

std::uintmax_t db_bytes(const std::filesystem::path& file) {
  std::uintmax_t total = std::filesystem::file_size(file);
  std::error_code ec;
  const auto wal = std::filesystem::file_size(file.string() + "-wal", ec);
  if (!ec) total += wal;
  return total;
}

std::string zone_name(int z) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "l%d-zone-%03d", z % 8, z);
  return buf;
}

// A band event as the engine writes it (~300 bytes of JSON).
dewmargin::event_record band_event(std::int64_t ts_ms, const std::string& zone, const char* from, const char* to,
                                   bool active) {
  dewmargin::event_record e;
  e.ts = from_unix_ms(ts_ms);
  e.subject = dewmargin::subject_type::zone;
  e.subject_id = zone;
  e.kind = "band";
  e.json = std::string(R"({"ts":")") + dewmargin::format_iso8601_utc(e.ts) + R"(","site":"bench-site","zone":")" +
           zone + R"(","kind":"band","from":")" + from + R"(","to":")" + to +
           R"(","margin_k":0.85,"dew_point_c":15.2,"surface_min_c":16.05,"supply_c":15.5,"margin_source":"surface",)" +
           R"("alarm":{"active":)" + (active ? "true" : "false") + R"(,"acknowledged":false,"shelved_until":null}})";
  return e;
}

}  // namespace

int main(int argc, char** argv) {
  namespace fs = std::filesystem;
  const fs::path dir = argc > 1 ? fs::path(argv[1]) : fs::temp_directory_path();
  const int zones = argc > 2 ? std::atoi(argv[2]) : 200;
  const int days = argc > 3 ? std::atoi(argv[3]) : 30;
  const bool keep_file = argc > 4;
  const fs::path file =
      keep_file ? fs::path(argv[4]) : dir / ("dewmargin_report_bench_" + std::to_string(::getpid()) + ".db");
  const bool reuse = keep_file && fs::exists(file);

  dewmargin::store_writer_options options;
  options.path = file;
  options.max_pending_rows = 2'000'000;
  options.keep_minute_samples_days = 0;  // measured separately below
  options.keep_events_days = 0;
  options.keep_samples_days = 0;
  options.report_error = [](const std::string& line) { std::fprintf(stderr, "store: %s\n", line.c_str()); };
  if (!reuse) {
    auto opened = dewmargin::store_writer::open(options);
    if (!opened.ok()) {
      std::fprintf(stderr, "%s\n", opened.err().message.c_str());
      return 1;
    }
    auto writer = std::move(opened).value();
    const auto t = steady::now();
    std::vector<std::string> names;
    for (int z = 0; z < zones; ++z) names.push_back(zone_name(z));
    std::size_t events = 0;
    for (int d = 0; d < days; ++d) {
      dewmargin::engine_output out;
      for (int m = 0; m < 1440; ++m) {
        const std::int64_t minute_ms = k_start_ms + (static_cast<std::int64_t>(d) * 1440 + m) * k_min_ms;
        for (int z = 0; z < zones; ++z) {
          dewmargin::zone_sample s;
          s.minute_start = from_unix_ms(minute_ms);
          s.zone = names[static_cast<std::size_t>(z)];
          const double daily = std::sin((m / 1440.0) * 6.283 + z * 0.1);
          s.min_margin_k = 2.5 + 1.5 * daily;
          s.max_dew_point_c = 14.0 + daily;
          s.worst_band = *s.min_margin_k < 1.0 ? "alarm" : (*s.min_margin_k < 2.0 ? "tight" : "safe");
          s.air_temp_c = 24.0 + daily;
          s.rh_pct = 55.0 + 5 * daily;
          s.surface_min_c = 16.5 + 0.5 * daily;
          s.supply_c = 16.0;
          out.samples.push_back(std::move(s));
          // About 40 events per zone and day: 20 alarm visits.
          if (m % 72 == z % 72) {
            out.events.push_back(band_event(minute_ms, names[static_cast<std::size_t>(z)], "tight", "alarm", true));
            out.events.push_back(
                band_event(minute_ms + 30'000, names[static_cast<std::size_t>(z)], "alarm", "tight", false));
            events += 2;
          }
        }
        if (out.samples.size() >= 100'000) {
          writer.enqueue(out);
          out.clear();
        }
      }
      writer.enqueue(out);
      if (!writer.flush(std::chrono::minutes{5})) {
        std::fprintf(stderr, "flush timed out\n");
        return 1;
      }
    }
    writer.stop();
    const double took = ms_since(t) / 1000.0;
    const double rows = static_cast<double>(zones) * days * 1440;
    std::printf("history: %d zones × %d days: %.2f M samples, %zu events written in %.1f s\n", zones, days, rows / 1e6,
                events, took);
  }
  const auto minute_bytes = static_cast<double>(db_bytes(file));
  std::printf("storage, per-minute samples and events: %.1f MB, %.1f kB per zone per day\n", minute_bytes / 1e6,
              minute_bytes / 1e3 / zones / days);

  auto reader = dewmargin::history_reader::open(file);
  if (!reader.ok()) {
    std::fprintf(stderr, "%s\n", reader.err().message.c_str());
    return 1;
  }
  // The passes of a report on their own (one run each): the events read, then read and parsed
  // (JSON), and the sample rows as the report reads them (hourly summaries for whole hours).
  {
    auto t = steady::now();
    dewmargin::event_filter ef;
    ef.kinds = {"band", "ack", "shelve", "unshelve", "valve", "setpoint", "input", "service"};
    std::size_t bytes = 0;
    auto raw =
        reader.value().for_each_event(ef, [&](const dewmargin::stored_event& e) { bytes += e.record.json.size(); });
    const double read_ms = ms_since(t);
    t = steady::now();
    std::size_t n_events = 0;
    auto ev = reader.value().for_each_event(
        ef, [&](const dewmargin::stored_event& e) { n_events += dewmargin::report::facts_of(e).valid ? 1 : 0; });
    const double events_ms = ms_since(t);
    t = steady::now();
    const auto layout = dewmargin::report::layout_for(
        from_unix_ms(k_start_ms), from_unix_ms(k_start_ms + std::int64_t{days} * 1440 * k_min_ms), 480);
    std::size_t n_periods = 0;
    dewmargin::sample_filter sf;
    sf.whole_hours = layout.whole_hours();
    auto sp = reader.value().for_each_period(sf, [&](const dewmargin::zone_period& p) {
      (void)p;
      ++n_periods;
    });
    const double scan_ms = ms_since(t);
    if (!raw.ok() || !ev.ok() || !sp.ok()) return 1;
    std::printf(
        "passes: %zu events (%.1f MB JSON) read in %.0f ms, read and parsed in %.0f ms; %zu sample rows "
        "(%s) read in %.0f ms\n",
        n_events, static_cast<double>(bytes) / 1e6, read_ms, events_ms, n_periods,
        sf.whole_hours ? "hourly summaries and the minutes after them" : "minutes", scan_ms);
  }
  std::vector<double> report_ms;
  std::vector<double> report_cpu_ms;
  std::size_t html_bytes = 0;
  for (int run = 0; run < 3; ++run) {
    const auto t = steady::now();
    const double cpu0 = cpu_ms();
    dewmargin::report::report_options o;
    o.generated_at = from_unix_ms(k_start_ms);
    auto data = dewmargin::report::build_report(reader.value(), o);
    if (!data.ok()) {
      std::fprintf(stderr, "%s\n", data.err().message.c_str());
      return 1;
    }
    html_bytes = dewmargin::report::render_html(data.value()).size();
    report_ms.push_back(ms_since(t));
    report_cpu_ms.push_back(cpu_ms() - cpu0);
  }
  std::printf(
      "report, %d zones × %d days (read + compute + render, %.1f MB HTML): median %.0f ms of 3 (%.0f, %.0f, "
      "%.0f)\n",
      zones, days, static_cast<double>(html_bytes) / 1e6, median(report_ms), report_ms[0], report_ms[1], report_ms[2]);
  std::printf(
      "report CPU time (all threads): median %.0f ms; load average now %.1f on %ld cores\n", median(report_cpu_ms),
      [] {
        double load[1] = {0};
        return getloadavg(load, 1) == 1 ? load[0] : -1.0;
      }(),
      sysconf(_SC_NPROCESSORS_ONLN));

  std::vector<double> history_ms;
  std::size_t rows = 0;
  for (int run = 0; run < 7; ++run) {
    const auto t = steady::now();
    dewmargin::event_filter f;
    f.subject_id = zone_name(7);
    f.since = from_unix_ms(k_start_ms);
    f.until = from_unix_ms(k_start_ms + static_cast<std::int64_t>(days) * 1440 * k_min_ms);
    std::ostringstream out;
    rows = 0;
    auto n = reader.value().for_each_event(f, [&](const dewmargin::stored_event& e) {
      const auto c = dewmargin::event_columns_of(e);
      out << dewmargin::csv_record({c.ts, c.subject_type, c.subject, c.kind, c.from, c.to, c.details_json});
      ++rows;
    });
    if (!n.ok()) return 1;
    history_ms.push_back(ms_since(t));
  }
  std::printf("history, one zone's month as CSV (%zu events): median %.1f ms of 7\n", rows, median(history_ms));

  if (keep_file) return 0;
  // Everything rolled up into hours, then the file's size.
  {
    options.keep_minute_samples_days = 1.0 / 1440;  // everything older than a minute before "now"
    options.retention_now = [days] {
      return from_unix_ms(k_start_ms + (static_cast<std::int64_t>(days) + 1) * 1440 * k_min_ms);
    };
    options.rollup_pass_budget = std::chrono::hours{1};
    options.incremental_vacuum_pages = 1'000'000;
    options.checkpoint_truncate_every = 1;
    auto opened = dewmargin::store_writer::open(options);
    if (!opened.ok()) return 1;
    auto writer = std::move(opened).value();
    const auto t = steady::now();
    if (!writer.run_maintenance(std::chrono::minutes{30})) return 1;
    const double took = ms_since(t) / 1000.0;
    const auto rolled = writer.counters().minutes_rolled_up;
    writer.stop();
    const auto after = static_cast<double>(db_bytes(file));
    const double event_bytes_guess = 0;  // events stay; their share is in both figures
    (void)event_bytes_guess;
    const double hours = static_cast<double>(zones) * days * 24;
    std::printf("roll-up: %.2f M minutes into %.0f hourly rows in %.1f s; file now %.1f MB (events included)\n",
                static_cast<double>(rolled) / 1e6, hours, took, after / 1e6);
    const double per_zone_day_minutes = minute_bytes / static_cast<double>(zones) / days;
    const double per_zone_day_hours = after / static_cast<double>(zones) / days;
    std::printf(
        "year for 200 zones (35 days per-minute + 330 days hourly, events included): %.2f GB; all per-minute: "
        "%.2f GB\n",
        (per_zone_day_minutes * 35 + per_zone_day_hours * 330) * 200 / 1e9, per_zone_day_minutes * 365 * 200 / 1e9);
  }
  fs::remove(file);
  fs::remove(file.string() + "-wal");
  fs::remove(file.string() + "-shm");
  return 0;
}
