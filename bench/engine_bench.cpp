// Decision-core throughput: readings per second through engine::on_message for a site of
// N zones (default 1000), with the once-a-second tick, and the resident memory it takes.
// Prints figures; no pass/fail. Usage: dewmargin_engine_bench [ZONES] [READINGS]
#include <sys/resource.h>

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <vector>

#include "bench_site.h"
#include "dewmargin/config.h"
#include "dewmargin/engine.h"

namespace {

using dewmargin::engine;
using dewmargin::engine_output;

long resident_kb() {
  rusage u{};
  getrusage(RUSAGE_SELF, &u);
  return u.ru_maxrss;
}

}  // namespace

int main(int argc, char** argv) {
  const int zones = argc > 1 ? std::atoi(argv[1]) : 1000;
  const long readings = argc > 2 ? std::atol(argv[2]) : 2'000'000;
  const long before_kb = resident_kb();
  engine core(dewmargin::bench::bench_site(zones));
  engine_output out;
  auto now = dewmargin::from_unix_ms(1'800'000'000'000);
  core.begin(now, {}, out);
  out.clear();

  // Readings as a real feed would send them: each zone's three inputs in turn, values that
  // wander a little, one supply reading per loop every 100 readings; 2,000 readings per
  // simulated second (the tick runs once per simulated second).
  const std::vector<std::string> topics = dewmargin::bench::bench_zone_topics(zones);
  const auto& payloads = dewmargin::bench::k_bench_payloads;
  std::vector<double> per_million_s;
  std::size_t published = 0;
  const auto start = std::chrono::steady_clock::now();
  auto chunk_start = start;
  for (long i = 0; i < readings; ++i) {
    const std::size_t t = static_cast<std::size_t>(i) % topics.size();
    core.on_message(topics[t], payloads[t % 3][(i / static_cast<long>(topics.size())) % 4], now, out);
    if (i % 100 == 0) core.on_message("plant/loop-0/supply", "16.0", now, out);
    if (i % 2000 == 1999) {
      now += std::chrono::seconds(1);
      core.tick(now, out);
    }
    published += out.messages.size();
    out.clear();
    if (i % 200'000 == 199'999) {
      const auto t1 = std::chrono::steady_clock::now();
      per_million_s.push_back(std::chrono::duration<double>(t1 - chunk_start).count() * 5.0);
      chunk_start = t1;
    }
  }
  const double total_s = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  std::sort(per_million_s.begin(), per_million_s.end());
  const double median_s = per_million_s.empty() ? total_s : per_million_s[per_million_s.size() / 2];
  std::printf("zones %d, readings %ld, simulated %ld s\n", zones, readings, readings / 2000);
  std::printf("throughput: %.0f readings/s overall, median of 200k-reading chunks %.0f readings/s\n",
              static_cast<double>(readings) / total_s, 1e6 / median_s);
  std::printf("per reading: %.2f us (median chunk)\n", median_s);
  std::printf("published messages: %zu (%.3f per reading)\n", published,
              static_cast<double>(published) / static_cast<double>(readings));
  std::printf("peak resident: %ld kB (%ld kB before the engine)\n", resident_kb(), before_kb);
  return 0;
}
