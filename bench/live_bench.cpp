// The live views' costs at N zones (default 1000): the worker's hand-over of one published
// zone state (parse for the margin history, then a short lock), a snapshot copy, /metrics
// and the margin history. Prints figures; no thresholds.
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <vector>

#include "dewmargin/live_snapshot.h"
#include "dewmargin/metrics_text.h"

namespace {

using clock_type = std::chrono::steady_clock;

double ms_since(clock_type::time_point t) {
  return std::chrono::duration<double, std::milli>(clock_type::now() - t).count();
}

std::string zone_state(int zone, int second) {
  char ts[32];
  std::snprintf(ts, sizeof ts, "2026-07-14T%02d:%02d:%02dZ", 12 + second / 3600, (second / 60) % 60, second % 60);
  const double margin = 2.0 + (zone % 17) * 0.1 - (second % 600) * 0.001;
  return R"({"site":"bench","zone":"zone-)" + std::to_string(zone) + R"(","ts":")" + ts +
         R"(","band":"tight","dew_point_c":16.21,"air_temp_c":24.5,"rh_pct":58.0,"surface_min_c":18.03,)"
         R"("supply_c":17.5,"margin_k":)" +
         std::to_string(margin) +
         R"(,"margin_source":"surface","valve":"open","alarm":{"active":false,"acknowledged":true,)"
         R"("shelved_until":null},"minutes_to_condensation":42.5})";
}

}  // namespace

int main(int argc, char** argv) {
  const int zones = argc > 1 ? std::atoi(argv[1]) : 1000;
  dewmargin::live_snapshot snapshot("dm", "bench", "0.1.0");
  // One hour of states, one per zone every 10 s (a busy site; the service publishes less).
  std::vector<std::string> payloads;
  for (int z = 0; z < zones; ++z) payloads.push_back(zone_state(z, 0));
  const auto fill = clock_type::now();
  long long published = 0;
  for (int second = 0; second < 3600; second += 10) {
    for (int z = 0; z < zones; ++z) {
      snapshot.on_published("dm/zone/zone-" + std::to_string(z) + "/state", zone_state(z, second));
      ++published;
    }
  }
  const double fill_ms = ms_since(fill);
  std::printf("zones %d: %lld states handed over in %.0f ms: %.2f us per state on the worker\n", zones, published,
              fill_ms, fill_ms * 1000.0 / static_cast<double>(published));

  const int rounds = 20;
  auto t = clock_type::now();
  for (int i = 0; i < rounds; ++i) (void)snapshot.take(false);
  std::printf("snapshot copy (states only, the lock is held meanwhile): %.2f ms\n", ms_since(t) / rounds);
  t = clock_type::now();
  std::size_t bytes = 0;
  for (int i = 0; i < rounds; ++i) bytes = dewmargin::format_metrics(snapshot.take(false)).size();
  std::printf("/metrics: %.2f ms, %zu bytes\n", ms_since(t) / rounds, bytes);
  t = clock_type::now();
  std::size_t points = 0;
  for (int i = 0; i < rounds; ++i) {
    const auto copy = snapshot.take(true);
    points = 0;
    for (const auto& [zone, series] : copy.margins) points += series.size();
  }
  std::printf("margin history for the page: %.2f ms, %zu points (the lock is held for the raw copy only)\n",
              ms_since(t) / rounds, points);
  return 0;
}
