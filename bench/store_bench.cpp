// Store writer benchmark: 200,000 events and 100,000 samples through store_writer, as the
// engine would hand them over (one enqueue() per output of 2 events + 1 sample). Prints the
// throughput, the number of commits and the enqueue latency, which must stay far below the
// duration of a commit (the caller never waits for the disk). Figures only; no thresholds.
//
// Usage: dewmargin_store_bench [DIRECTORY]   (default: the system's temporary directory)
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <filesystem>
#include <string>
#include <vector>

#include "dewmargin/store.h"

namespace {

using steady = std::chrono::steady_clock;
constexpr int k_outputs = 100'000;  // × (2 events + 1 sample)

double percentile_us(std::vector<double>& sorted_us, double p) {
  const auto index = static_cast<std::size_t>(p * static_cast<double>(sorted_us.size() - 1));
  return sorted_us[index];
}

}  // namespace

int main(int argc, char** argv) {
  namespace fs = std::filesystem;
  const fs::path dir = argc > 1 ? fs::path(argv[1]) : fs::temp_directory_path();
  const fs::path file = dir / ("dewmargin_store_bench_" + std::to_string(::getpid()) + ".db");

  dewmargin::store_writer_options options;
  options.path = file;
  // The burst below arrives far faster than any disk takes it; a larger bound than the
  // service's default (200,000) measures the writer, not the overflow policy.
  options.max_pending_rows = 1'000'000;
  std::size_t reported = 0;
  options.report_error = [&reported](const std::string& line) {
    if (reported++ < 5) std::fprintf(stderr, "store: %s\n", line.c_str());
  };
  auto opened = dewmargin::store_writer::open(options);
  if (!opened.ok()) {
    std::fprintf(stderr, "%s\n", opened.err().message.c_str());
    return 1;
  }
  dewmargin::store_writer writer = std::move(opened).value();

  // Invented rows shaped like the service's: two zones, ~150-byte event JSON.
  const std::int64_t start_ms = 1'784'034'000'000;  // 2026-07-14T13:00:00Z
  std::vector<double> enqueue_us;
  enqueue_us.reserve(k_outputs);
  dewmargin::engine_output out;
  out.events.resize(2);
  out.samples.resize(1);
  const auto started = steady::now();
  for (int i = 0; i < k_outputs; ++i) {
    const auto ts = dewmargin::from_unix_ms(start_ms + i * 1000LL);
    const std::string zone = i % 2 == 0 ? "level2-east" : "level3-west";
    for (auto& e : out.events) {
      e.ts = ts;
      e.subject = dewmargin::subject_type::zone;
      e.subject_id = zone;
      e.kind = "band";
      e.json = R"({"ts":")" + dewmargin::format_iso8601_utc(ts) + R"(","site":"bench","zone":")" + zone +
               R"(","kind":"band","from":"safe","to":"tight","margin_k":1.84,"dew_point_c":16.21})";
    }
    auto& s = out.samples[0];
    s.minute_start = dewmargin::from_unix_ms(start_ms + i * 60'000LL);
    s.zone = zone;
    s.min_margin_k = 1.84;
    s.max_dew_point_c = 16.21;
    s.worst_band = "tight";
    s.air_temp_c = 25.1;
    s.rh_pct = 55.0;
    s.surface_min_c = 18.05;
    s.supply_c = 17.2;

    const auto t0 = steady::now();
    writer.enqueue(out);
    const auto t1 = steady::now();
    enqueue_us.push_back(std::chrono::duration<double, std::micro>(t1 - t0).count());
  }
  const auto enqueued = steady::now();
  const bool flushed = writer.flush(std::chrono::minutes{2});
  const auto done = steady::now();
  const auto c = writer.counters();
  writer.stop();

  std::sort(enqueue_us.begin(), enqueue_us.end());
  const double total_s = std::chrono::duration<double>(done - started).count();
  const double enqueue_s = std::chrono::duration<double>(enqueued - started).count();
  const double mean_commit_ms =
      c.commits > 0 ? static_cast<double>(c.total_commit_us) / 1000.0 / static_cast<double>(c.commits) : 0.0;
  std::printf("store_bench: %s (max_pending_rows %zu)\n", file.c_str(), options.max_pending_rows);
  std::printf("rows enqueued          %llu (200000 events + 100000 samples)\n",
              static_cast<unsigned long long>(c.rows_enqueued));
  std::printf("rows written           %llu%s\n", static_cast<unsigned long long>(c.rows_written),
              flushed ? "" : " (flush timed out)");
  std::printf("rows dropped           %llu\n", static_cast<unsigned long long>(c.dropped_rows));
  std::printf("errors                 %llu\n", static_cast<unsigned long long>(c.errors));
  std::printf("throughput             %.0f rows/s (enqueue to last commit, %.2f s)\n",
              static_cast<double>(c.rows_written) / total_s, total_s);
  std::printf("enqueue phase          %.3f s for %d calls\n", enqueue_s, k_outputs);
  std::printf("commits                %llu (mean %.2f ms, max %.2f ms)\n", static_cast<unsigned long long>(c.commits),
              mean_commit_ms, static_cast<double>(c.max_commit_us) / 1000.0);
  std::printf("enqueue latency        median %.2f us, p99 %.2f us, max %.1f us\n", percentile_us(enqueue_us, 0.5),
              percentile_us(enqueue_us, 0.99), enqueue_us.back());

  std::error_code ec;
  for (const char* suffix : {"", "-wal", "-shm"}) fs::remove(file.string() + suffix, ec);
  return flushed ? 0 : 1;
}
