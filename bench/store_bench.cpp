// Store writer benchmark, in three parts of one run:
//  1. Burst: 100,000 engine outputs of 2 events + 1 sample (300,000 rows) handed to store_writer
//     as fast as enqueue() takes them, then flushed: the rows per second the writer sustains,
//     its commits, and the enqueue latency (which must stay far below a commit: the caller never
//     waits for the disk).
//  2. SQLite's own bulk insert of the same rows into tables of the same shape (the columns and
//     indexes of events and zone_samples), in a file set up as the writer's (WAL,
//     synchronous=NORMAL, auto_vacuum=INCREMENTAL): prepared statements, 1,000-row transactions,
//     nothing else; and beside it the same inserts in 10,000-row transactions (the size at which
//     the writer commits early), since the writer's batches under a burst are that large or
//     larger. Parts 1 and 2 alternate for 3 rounds, each in a fresh file; the figures are the
//     medians and the ratio of the medians.
//  3. Offered rate: rows fed at a fixed rate (30,000 rows/s, the service's peak, for 5 s) to a
//     writer with the service's default options; the pending queue is sampled after every
//     enqueue. It must stay bounded (no drops, never near its limit) and drain within seconds
//     once the feed stops.
// The writer also does what the service needs and the plain insert does not: the copy on
// enqueue, its own thread, and the hourly summaries (zone_hours) of every hour the samples
// complete, in the same commits.
//
// Figures only; no target is asserted. Besides the table, one `RESULT <name> <value> <unit>`
// line per headline figure, for bench/run.
//
// Usage: dewmargin_store_bench [--smoke] [DIRECTORY]   (default: the system's temporary directory)
//   --smoke: 1,000 outputs, one round and half a second of offered rate (a run of seconds)
#include <sqlite3.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cstdarg>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <optional>
#include <string>
#include <thread>
#include <vector>

#include "dewmargin/store.h"

namespace {

namespace fs = std::filesystem;
using steady = std::chrono::steady_clock;

struct bench_params {
  int burst_outputs = 100'000;  // × (2 events + 1 sample)
  int rounds = 3;
  double offered_rows_per_s = 30'000.0;
  double offered_s = 5.0;
};

constexpr int k_zones = 1000;
constexpr std::int64_t k_start_ms = 1'784'034'000'000;  // 2026-07-14T13:00:00Z
// The comparison's transaction size, and the writer's own early-commit batch (its default
// commit_early_rows) as a second baseline.
constexpr int k_sqlite_rows_per_transaction = 1000;
constexpr int k_sqlite_large_rows_per_transaction = 10'000;

double seconds_since(steady::time_point t0) { return std::chrono::duration<double>(steady::now() - t0).count(); }

double median(std::vector<double> v) {
  if (v.empty()) return 0.0;
  std::sort(v.begin(), v.end());
  const std::size_t n = v.size();
  return n % 2 == 1 ? v[n / 2] : (v[n / 2 - 1] + v[n / 2]) / 2.0;
}

double percentile(const std::vector<double>& sorted, double p) {
  if (sorted.empty()) return 0.0;
  return sorted[static_cast<std::size_t>(p * static_cast<double>(sorted.size() - 1))];
}

std::string zone_name(int z) {
  char buf[16];
  std::snprintf(buf, sizeof buf, "zone-%04d", z);
  return buf;
}

// Invented rows shaped like the service's: each output is two band events (~150-byte JSON) and
// one per-minute sample; `zones` zones in turn, so each zone gets one sample per minute and the
// samples of one minute are consecutive, as the engine writes them. `first` numbers the outputs
// so that two sets never share a (minute, zone) key.
std::vector<dewmargin::engine_output> make_outputs(int first, int count) {
  std::vector<dewmargin::engine_output> outputs(static_cast<std::size_t>(count));
  for (int n = 0; n < count; ++n) {
    const int i = first + n;
    const std::string zone = zone_name(i % k_zones);
    const std::int64_t minute_ms = k_start_ms + static_cast<std::int64_t>(i / k_zones) * 60'000;
    const auto ts = dewmargin::from_unix_ms(minute_ms + (i % k_zones) * 50);
    auto& out = outputs[static_cast<std::size_t>(n)];
    out.events.resize(2);
    for (auto& e : out.events) {
      e.ts = ts;
      e.subject = dewmargin::subject_type::zone;
      e.subject_id = zone;
      e.kind = "band";
      e.json = R"({"ts":")" + dewmargin::format_iso8601_utc(ts) + R"(","site":"bench","zone":")" + zone +
               R"(","kind":"band","from":"safe","to":"tight","margin_k":1.84,"dew_point_c":16.21})";
    }
    out.samples.resize(1);
    auto& s = out.samples[0];
    s.minute_start = dewmargin::from_unix_ms(minute_ms);
    s.zone = zone;
    s.min_margin_k = 1.84;
    s.max_dew_point_c = 16.21;
    s.worst_band = "tight";
    s.air_temp_c = 25.1;
    s.rh_pct = 55.0;
    s.surface_min_c = 18.05;
    s.supply_c = 17.2;
  }
  return outputs;
}

__attribute__((format(printf, 1, 2))) std::string fmt(const char* format, ...) {
  char buf[160];
  va_list args;
  va_start(args, format);
  std::vsnprintf(buf, sizeof buf, format, args);
  va_end(args);
  return buf;
}

std::size_t rows_of(const dewmargin::engine_output& out) { return out.events.size() + out.samples.size(); }

fs::path bench_file(const fs::path& dir, const std::string& what) {
  return dir / ("dewmargin_store_bench_" + std::to_string(::getpid()) + "_" + what + ".db");
}

void remove_db(const fs::path& file) {
  std::error_code ec;
  for (const char* suffix : {"", "-wal", "-shm"}) fs::remove(file.string() + suffix, ec);
}

struct error_sink {
  std::size_t reported = 0;
  void operator()(const std::string& line) {
    if (reported++ < 5) std::fprintf(stderr, "store: %s\n", line.c_str());
  }
};

std::optional<dewmargin::store_writer> open_writer(dewmargin::store_writer_options options, error_sink& errors) {
  options.report_error = [&errors](const std::string& line) { errors(line); };
  auto opened = dewmargin::store_writer::open(options);
  if (!opened.ok()) {
    std::fprintf(stderr, "store_bench: %s\n", opened.err().message.c_str());
    return std::nullopt;
  }
  return std::move(opened).value();
}

// ---- 1. the writer's burst -------------------------------------------------------------------

struct writer_pass {
  bool ok = false;
  double rows_per_s = 0.0;
  double total_s = 0.0;
  double enqueue_s = 0.0;
  dewmargin::store_writer_counters counters;
  std::vector<double> enqueue_us;
};

writer_pass run_writer_burst(const fs::path& file, const std::vector<dewmargin::engine_output>& outputs) {
  writer_pass pass;
  dewmargin::store_writer_options options;
  options.path = file;
  // The burst arrives far faster than any disk takes it; a larger bound than the service's
  // default (200,000) measures the writer, not the overflow policy (part 3 uses the default).
  options.max_pending_rows = 1'000'000;
  error_sink errors;
  auto writer = open_writer(options, errors);
  if (!writer) return pass;
  pass.enqueue_us.reserve(outputs.size());
  const auto started = steady::now();
  for (const auto& out : outputs) {
    const auto t0 = steady::now();
    writer->enqueue(out);
    pass.enqueue_us.push_back(std::chrono::duration<double, std::micro>(steady::now() - t0).count());
  }
  pass.enqueue_s = seconds_since(started);
  const bool flushed = writer->flush(std::chrono::minutes{2});
  pass.total_s = seconds_since(started);
  pass.counters = writer->counters();
  writer->stop();
  pass.rows_per_s = static_cast<double>(pass.counters.rows_written) / pass.total_s;
  pass.ok = flushed && pass.counters.errors == 0 && pass.counters.dropped_rows == 0;
  if (!flushed) std::fprintf(stderr, "store_bench: the writer's flush timed out\n");
  return pass;
}

// ---- 2. SQLite's own bulk insert ---------------------------------------------------------------

// The columns and indexes of the history's events and zone_samples tables (schema version 3,
// dewmargin/store_schema.h), so that both sides write the same b-trees.
constexpr const char* k_baseline_schema = R"sql(
CREATE TABLE events (id INTEGER PRIMARY KEY, ts_ms INTEGER NOT NULL, subject_type TEXT NOT NULL,
  subject_id TEXT NOT NULL, kind TEXT NOT NULL, json TEXT NOT NULL);
CREATE INDEX events_by_subject_ts ON events (subject_id, ts_ms);
CREATE INDEX events_by_ts ON events (ts_ms);
CREATE INDEX events_by_kind_ts ON events (kind, ts_ms);
CREATE TABLE zone_samples (minute_ms INTEGER NOT NULL, zone TEXT NOT NULL, min_margin_k REAL,
  max_dew_point_c REAL, worst_band TEXT NOT NULL, air_temp_c REAL, rh_pct REAL, surface_min_c REAL,
  supply_c REAL, surface_rh_pct REAL, PRIMARY KEY (minute_ms, zone)) WITHOUT ROWID;
)sql";

class sqlite_baseline {
 public:
  ~sqlite_baseline() {
    sqlite3_finalize(insert_event_);
    sqlite3_finalize(insert_sample_);
    sqlite3_close(db_);
  }

  // Empty on success, else what failed with SQLite's message.
  std::string open(const fs::path& file) {
    if (sqlite3_open(file.c_str(), &db_) != SQLITE_OK) return "opening " + file.string() + ": " + message();
    for (const char* sql : {"PRAGMA auto_vacuum = INCREMENTAL", "PRAGMA journal_mode = WAL",
                            "PRAGMA synchronous = NORMAL", k_baseline_schema}) {
      if (sqlite3_exec(db_, sql, nullptr, nullptr, nullptr) != SQLITE_OK) return std::string(sql) + ": " + message();
    }
    const char* event_sql =
        "INSERT INTO events (ts_ms, subject_type, subject_id, kind, json) VALUES (?1, ?2, ?3, ?4, ?5)";
    const char* sample_sql =
        "INSERT INTO zone_samples (minute_ms, zone, min_margin_k, max_dew_point_c, worst_band, air_temp_c, rh_pct, "
        "surface_min_c, supply_c, surface_rh_pct) VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9, ?10)";
    if (sqlite3_prepare_v2(db_, event_sql, -1, &insert_event_, nullptr) != SQLITE_OK ||
        sqlite3_prepare_v2(db_, sample_sql, -1, &insert_sample_, nullptr) != SQLITE_OK) {
      return "preparing the inserts: " + message();
    }
    return {};
  }

  // Inserts every row of `outputs` in transactions of `rows_per_transaction` rows; empty on success.
  std::string insert_all(const std::vector<dewmargin::engine_output>& outputs, int rows_per_transaction) {
    if (!exec("BEGIN")) return "BEGIN: " + message();
    int in_transaction = 0;
    const auto row_done = [&]() {
      if (++in_transaction < rows_per_transaction) return true;
      in_transaction = 0;
      return exec("COMMIT") && exec("BEGIN");
    };
    for (const auto& out : outputs) {
      for (const auto& e : out.events) {
        sqlite3_bind_int64(insert_event_, 1, dewmargin::to_unix_ms(e.ts));
        sqlite3_bind_text(insert_event_, 2, dewmargin::subject_type_name(e.subject), -1, SQLITE_STATIC);
        bind_text(insert_event_, 3, e.subject_id);
        bind_text(insert_event_, 4, e.kind);
        bind_text(insert_event_, 5, e.json);
        if (!step(insert_event_)) return "inserting an event: " + message();
        if (!row_done()) return "committing: " + message();
      }
      for (const auto& s : out.samples) {
        sqlite3_bind_int64(insert_sample_, 1, dewmargin::to_unix_ms(s.minute_start));
        bind_text(insert_sample_, 2, s.zone);
        bind_real(insert_sample_, 3, s.min_margin_k);
        bind_real(insert_sample_, 4, s.max_dew_point_c);
        bind_text(insert_sample_, 5, s.worst_band);
        bind_real(insert_sample_, 6, s.air_temp_c);
        bind_real(insert_sample_, 7, s.rh_pct);
        bind_real(insert_sample_, 8, s.surface_min_c);
        bind_real(insert_sample_, 9, s.supply_c);
        bind_real(insert_sample_, 10, s.surface_rh_pct);
        if (!step(insert_sample_)) return "inserting a sample: " + message();
        if (!row_done()) return "committing: " + message();
      }
    }
    if (!exec("COMMIT")) return "COMMIT: " + message();
    return {};
  }

 private:
  std::string message() const { return db_ != nullptr ? sqlite3_errmsg(db_) : "out of memory"; }
  bool exec(const char* sql) { return sqlite3_exec(db_, sql, nullptr, nullptr, nullptr) == SQLITE_OK; }
  static bool step(sqlite3_stmt* st) {
    const int rc = sqlite3_step(st);
    sqlite3_reset(st);
    return rc == SQLITE_DONE;
  }
  static void bind_text(sqlite3_stmt* st, int i, const std::string& v) {
    sqlite3_bind_text(st, i, v.data(), static_cast<int>(v.size()), SQLITE_STATIC);
  }
  static void bind_real(sqlite3_stmt* st, int i, const std::optional<double>& v) {
    if (v) {
      sqlite3_bind_double(st, i, *v);
    } else {
      sqlite3_bind_null(st, i);
    }
  }

  sqlite3* db_ = nullptr;
  sqlite3_stmt* insert_event_ = nullptr;
  sqlite3_stmt* insert_sample_ = nullptr;
};

struct sqlite_pass {
  bool ok = false;
  double rows_per_s = 0.0;
  double total_s = 0.0;
};

sqlite_pass run_sqlite_bulk(const fs::path& file, const std::vector<dewmargin::engine_output>& outputs,
                            int rows_per_transaction) {
  sqlite_pass pass;
  sqlite_baseline db;
  if (std::string failed = db.open(file); !failed.empty()) {
    std::fprintf(stderr, "store_bench: SQLite baseline: %s\n", failed.c_str());
    return pass;
  }
  std::size_t rows = 0;
  for (const auto& out : outputs) rows += rows_of(out);
  const auto started = steady::now();
  if (std::string failed = db.insert_all(outputs, rows_per_transaction); !failed.empty()) {
    std::fprintf(stderr, "store_bench: SQLite baseline: %s\n", failed.c_str());
    return pass;
  }
  pass.total_s = seconds_since(started);
  pass.rows_per_s = static_cast<double>(rows) / pass.total_s;
  pass.ok = true;
  return pass;
}

// ---- 3. a fixed offered rate -------------------------------------------------------------------

struct offered_pass {
  bool ok = false;
  double achieved_rows_per_s = 0.0;
  double feed_s = 0.0;
  std::uint64_t max_pending = 0;
  std::uint64_t max_pending_first_half = 0;
  std::uint64_t max_pending_second_half = 0;
  std::vector<std::uint64_t> max_pending_per_s;
  double drain_ms = 0.0;
  double sustained_rows_per_s = 0.0;  // rows written over the feed and the drain
  bool drained = false;
  bool bounded = false;
  std::size_t bound_rows = 0;
  dewmargin::store_writer_counters counters;
};

offered_pass run_offered_rate(const fs::path& file, const std::vector<dewmargin::engine_output>& outputs,
                              const bench_params& p) {
  offered_pass pass;
  dewmargin::store_writer_options options;  // the service's defaults
  options.path = file;
  pass.bound_rows = options.max_pending_rows;
  error_sink errors;
  auto writer = open_writer(options, errors);
  if (!writer) return pass;

  const double outputs_per_s = p.offered_rows_per_s / static_cast<double>(rows_of(outputs.front()));
  const std::size_t total = outputs.size();
  std::size_t next = 0;
  std::uint64_t rows_fed = 0;
  const auto started = steady::now();
  while (next < total) {
    const double elapsed_s = seconds_since(started);
    const auto due = std::min(total, static_cast<std::size_t>(elapsed_s * outputs_per_s) + 1);
    const auto second = static_cast<std::size_t>(elapsed_s);
    if (pass.max_pending_per_s.size() <= second) pass.max_pending_per_s.resize(second + 1, 0);
    for (; next < due; ++next) {
      writer->enqueue(outputs[next]);
      rows_fed += rows_of(outputs[next]);
      const std::uint64_t pending = writer->counters().pending_rows;
      pass.max_pending = std::max(pass.max_pending, pending);
      pass.max_pending_per_s[second] = std::max(pass.max_pending_per_s[second], pending);
      auto& half = elapsed_s < p.offered_s / 2.0 ? pass.max_pending_first_half : pass.max_pending_second_half;
      half = std::max(half, pending);
    }
    std::this_thread::sleep_for(std::chrono::milliseconds(1));
  }
  pass.feed_s = seconds_since(started);
  pass.achieved_rows_per_s = static_cast<double>(rows_fed) / pass.feed_s;
  const auto feed_end = steady::now();
  const bool flushed = writer->flush(std::chrono::seconds{60});
  pass.drain_ms = seconds_since(feed_end) * 1000.0;
  pass.counters = writer->counters();
  writer->stop();
  pass.drained = flushed && pass.counters.pending_rows == 0;
  // Bounded: nothing dropped, the pending list never near its limit, and empty soon after the
  // feed stops (a writer slower than the feed would grow the list until it drops rows, and then
  // need seconds to drain). The halves and the per-second maxima show the trend; a single slow
  // commit (the disk shared with other work) shows there as a peak that drains.
  pass.bounded = pass.drained && pass.counters.dropped_rows == 0 && pass.max_pending < pass.bound_rows / 2 &&
                 pass.drain_ms < 5000.0;
  pass.sustained_rows_per_s = static_cast<double>(pass.counters.rows_written) / (pass.feed_s + pass.drain_ms / 1000.0);
  pass.ok = flushed && pass.counters.errors == 0;
  if (!flushed) std::fprintf(stderr, "store_bench: the offered-rate writer did not drain within 60 s\n");
  return pass;
}

}  // namespace

int main(int argc, char** argv) {
  bench_params p;
  fs::path dir = fs::temp_directory_path();
  for (int i = 1; i < argc; ++i) {
    if (std::strcmp(argv[i], "--smoke") == 0) {
      p.burst_outputs = 1000;
      p.rounds = 1;
      p.offered_s = 0.5;
    } else if (argv[i][0] == '-') {
      std::fprintf(stderr, "store_bench: unknown option '%s' (usage: dewmargin_store_bench [--smoke] [DIRECTORY])\n",
                   argv[i]);
      return 2;
    } else {
      dir = argv[i];
    }
  }
  if (std::error_code ec; !fs::is_directory(dir, ec)) {
    std::fprintf(stderr, "store_bench: '%s' is not a directory\n", dir.c_str());
    return 2;
  }

  const auto burst = make_outputs(0, p.burst_outputs);
  std::size_t burst_rows = 0;
  for (const auto& out : burst) burst_rows += rows_of(out);

  bool ok = true;
  std::vector<double> writer_rates;
  std::vector<double> sqlite_rates;
  std::vector<double> sqlite_large_rates;
  std::vector<double> enqueue_us;
  std::vector<writer_pass> writer_passes;
  for (int round = 0; round < p.rounds; ++round) {
    const fs::path wfile = bench_file(dir, "writer");
    writer_pass w = run_writer_burst(wfile, burst);
    remove_db(wfile);
    const fs::path sfile = bench_file(dir, "sqlite");
    const sqlite_pass s = run_sqlite_bulk(sfile, burst, k_sqlite_rows_per_transaction);
    remove_db(sfile);
    const sqlite_pass l = run_sqlite_bulk(sfile, burst, k_sqlite_large_rows_per_transaction);
    remove_db(sfile);
    ok = ok && w.ok && s.ok && l.ok;
    writer_rates.push_back(w.rows_per_s);
    sqlite_rates.push_back(s.rows_per_s);
    sqlite_large_rates.push_back(l.rows_per_s);
    std::printf(
        "round %d: writer %.0f rows/s (%.2f s, longest enqueue %.1f ms), SQLite bulk insert %.0f rows/s (%.2f s), "
        "with %d-row transactions %.0f rows/s (%.2f s)\n",
        round + 1, w.rows_per_s, w.total_s,
        w.enqueue_us.empty() ? 0.0 : *std::max_element(w.enqueue_us.begin(), w.enqueue_us.end()) / 1000.0, s.rows_per_s,
        s.total_s, k_sqlite_large_rows_per_transaction, l.rows_per_s, l.total_s);
    enqueue_us.insert(enqueue_us.end(), w.enqueue_us.begin(), w.enqueue_us.end());
    w.enqueue_us.clear();
    writer_passes.push_back(std::move(w));
  }
  std::sort(enqueue_us.begin(), enqueue_us.end());

  const auto offered_outputs = static_cast<int>(p.offered_rows_per_s * p.offered_s / 3.0);
  const auto offered_rows = make_outputs(p.burst_outputs, offered_outputs);
  const fs::path ofile = bench_file(dir, "offered");
  const offered_pass o = run_offered_rate(ofile, offered_rows, p);
  remove_db(ofile);
  ok = ok && o.ok;

  const double writer_rate = median(writer_rates);
  const double sqlite_rate = median(sqlite_rates);
  const double ratio = sqlite_rate > 0 ? writer_rate / sqlite_rate : 0.0;
  const double sqlite_large_rate = median(sqlite_large_rates);
  const auto& c = writer_passes.back().counters;
  const double mean_commit_ms =
      c.commits > 0 ? static_cast<double>(c.total_commit_us) / 1000.0 / static_cast<double>(c.commits) : 0.0;

  std::printf("\nstore_bench%s: %s, %zu rows per round (%d events + %d samples, %d zones), %d round(s)\n",
              p.rounds == 1 ? " (smoke)" : "", dir.c_str(), burst_rows, 2 * p.burst_outputs, p.burst_outputs, k_zones,
              p.rounds);
  std::printf("| %-44s | %-44s |\n", "figure", "value");
  std::printf("|%s|%s|\n", std::string(46, '-').c_str(), std::string(46, '-').c_str());
  const auto row = [](const char* what, const std::string& value) {
    std::printf("| %-44s | %-44s |\n", what, value.c_str());
  };
  row("store_writer (enqueue to last commit)", fmt("%.0f rows/s (median)", writer_rate));
  row("SQLite bulk insert (1,000-row transactions)", fmt("%.0f rows/s (median)", sqlite_rate));
  row("ratio writer / SQLite", fmt("%.2f", ratio));
  row("SQLite bulk insert (10,000-row transactions)", fmt("%.0f rows/s (median)", sqlite_large_rate));
  row("ratio writer / SQLite (10,000-row)", fmt("%.2f", sqlite_large_rate > 0 ? writer_rate / sqlite_large_rate : 0.0));
  row("writer commits (last round)", fmt("%llu, mean %.1f ms, max %.1f ms", static_cast<unsigned long long>(c.commits),
                                         mean_commit_ms, static_cast<double>(c.max_commit_us) / 1000.0));
  row("enqueue latency (all rounds)", fmt("median %.2f us, p99 %.2f us, p99.9 %.0f us", percentile(enqueue_us, 0.5),
                                          percentile(enqueue_us, 0.99), percentile(enqueue_us, 0.999)));
  row("enqueue calls over 1 ms / longest",
      fmt("%zu of %zu / %.1f ms",
          static_cast<std::size_t>(enqueue_us.end() - std::upper_bound(enqueue_us.begin(), enqueue_us.end(), 1000.0)),
          enqueue_us.size(), enqueue_us.empty() ? 0.0 : enqueue_us.back() / 1000.0));
  row("offered rate (target / achieved)",
      fmt("%.0f / %.0f rows/s for %.1f s", p.offered_rows_per_s, o.achieved_rows_per_s, o.feed_s));
  row("queue max (pending rows)",
      fmt("%llu of %zu allowed", static_cast<unsigned long long>(o.max_pending), o.bound_rows));
  row("queue max, first / second half of the feed",
      fmt("%llu / %llu", static_cast<unsigned long long>(o.max_pending_first_half),
          static_cast<unsigned long long>(o.max_pending_second_half)));
  std::string per_s;
  for (auto m : o.max_pending_per_s) per_s += (per_s.empty() ? "" : " ") + std::to_string(m);
  row("queue max per second of the feed", per_s);
  row("rows written / dropped at the offered rate",
      fmt("%llu / %llu", static_cast<unsigned long long>(o.counters.rows_written),
          static_cast<unsigned long long>(o.counters.dropped_rows)));
  row("drained after the feed", o.drained ? fmt("yes, in %.0f ms", o.drain_ms) : std::string("NO"));
  row("written over the feed and the drain", fmt("%.0f rows/s", o.sustained_rows_per_s));
  row("queue stayed bounded", o.bounded ? "yes" : "NO");

  std::printf("RESULT store_writer_rows_per_s %.0f rows/s\n", writer_rate);
  std::printf("RESULT sqlite_bulk_rows_per_s %.0f rows/s\n", sqlite_rate);
  std::printf("RESULT store_ratio %.2f x\n", ratio);
  std::printf("RESULT sqlite_bulk_10k_rows_per_s %.0f rows/s\n", sqlite_large_rate);
  std::printf("RESULT store_enqueue_median_us %.2f us\n", percentile(enqueue_us, 0.5));
  std::printf("RESULT store_offered_rows_per_s %.0f rows/s\n", o.achieved_rows_per_s);
  std::printf("RESULT store_queue_max_rows %llu rows\n", static_cast<unsigned long long>(o.max_pending));
  std::printf("RESULT store_queue_bounded %d bool\n", o.bounded ? 1 : 0);
  std::printf("RESULT store_drain_ms %.0f ms\n", o.drain_ms);
  if (!ok) std::fprintf(stderr, "store_bench: a pass failed (see above)\n");
  return ok ? 0 : 1;
}
