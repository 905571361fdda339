// Micro-benchmarks of the decision core's hot paths (Google Benchmark), each calling the
// project's own code in lib/core: the dew point of one reading, one zone's margin and band
// evaluation, engine::on_message for one bare-number reading at 10 and 1,000 zones, payload
// decoding (bare number, JSON field) and the JSON of a band event and a zone state.
//
// Figures only: no target is asserted here (issue 14 asks for a dew point in at most 30 ns).
// Unless the command line sets --benchmark_repetitions, each benchmark runs 5 times and only
// the aggregates are shown; the median is the headline figure. After the table the program
// prints one line per benchmark for bench/run to collect:
//   RESULT <name>_ns <median CPU ns per item> ns
// CPU time rather than wall time: on a shared machine the wall time also counts the time
// other processes hold the core, which is not this code's cost.
//
// Usage: dewmargin_micro_bench [Google Benchmark flags]
//   smoke run (about 2 s): dewmargin_micro_bench --benchmark_min_time=0.01
#include <benchmark/benchmark.h>

#include <array>
#include <cstdio>
#include <cstring>
#include <map>
#include <string>
#include <vector>

#include "bench_site.h"
#include "dewmargin/config.h"
#include "dewmargin/engine.h"
#include "dewmargin/input_decoder.h"
#include "dewmargin/message_json.h"
#include "dewmargin/psychro.h"
#include "dewmargin/zone_margin.h"
#include "dewmargin/zone_steps.h"

namespace {

using dewmargin::timestamp;

constexpr std::size_t k_ring = 64;  // distinct inputs cycled through, so nothing is folded away
const timestamp k_start = dewmargin::from_unix_ms(1'784'034'000'000);  // 2026-07-14T13:00:00Z

// Invented indoor conditions of an occupied office: 22-27 °C, 40-65 % RH.
double air_c(std::size_t i) { return 22.0 + 0.078 * static_cast<double>(i % k_ring); }
double rh_pct(std::size_t i) { return 40.0 + 0.39 * static_cast<double>((i * 7) % k_ring); }

// ---- dew point (Magnus) of one reading -------------------------------------------------
void dew_point(benchmark::State& state) {
  std::array<double, k_ring> t{};
  std::array<double, k_ring> rh{};
  for (std::size_t i = 0; i < k_ring; ++i) {
    t[i] = air_c(i);
    rh[i] = rh_pct(i);
  }
  std::size_t i = 0;
  for (auto _ : state) {
    double t_c = t[i];
    double rh_v = rh[i];
    benchmark::DoNotOptimize(t_c);  // the compiler must not know the inputs
    benchmark::DoNotOptimize(rh_v);
    auto dp = dewmargin::psychro::dew_point_c(t_c, rh_v);
    benchmark::DoNotOptimize(dp);
    i = (i + 1) % k_ring;
  }
  state.SetItemsProcessed(state.iterations());
}
BENCHMARK(dew_point);

// ---- one zone's margin and band, as the engine evaluates a zone per reading -------------
// The readings (air, one humidity, one surface, the loop's supply) are prepared outside the
// timed loop; timed are compute_zone_margin and step_band_and_alarm.
void zone_evaluation(benchmark::State& state) {
  std::vector<dewmargin::zone_readings> ring(k_ring);
  for (std::size_t i = 0; i < k_ring; ++i) {
    auto& r = ring[i];
    r.air_temp_c.value = air_c(i);
    r.air_temp_c.last_value = r.air_temp_c.value;
    dewmargin::margin_input h;
    h.value = rh_pct(i);
    h.last_value = h.value;
    r.humidity_pct.push_back(h);
    dewmargin::margin_input s;
    s.value = 17.0 + 0.02 * static_cast<double>(i);
    s.last_value = s.value;
    r.surfaces_c.push_back(s);
    r.supply_c.value = 16.0;
    r.supply_c.last_value = 16.0;
  }
  dewmargin::band_thresholds thresholds;
  dewmargin::zone_condition condition(thresholds);
  timestamp now = k_start;
  std::size_t i = 0;
  for (auto _ : state) {
    const dewmargin::zone_margin m = dewmargin::compute_zone_margin(ring[i]);
    const dewmargin::band_step step = dewmargin::step_band_and_alarm(condition, m, false, now);
    benchmark::DoNotOptimize(m.margin_k);
    benchmark::DoNotOptimize(step);
    i = (i + 1) % k_ring;
    now += std::chrono::seconds(1);
  }
  state.SetItemsProcessed(state.iterations());
}
BENCHMARK(zone_evaluation);

// ---- engine::on_message for one bare-number reading ------------------------------------

// Each zone's three inputs in turn, one reading per simulated millisecond, values that wander a
// little (a safe margin throughout, as most readings are). The once-a-second tick runs outside
// the timed part, so the figure is the reading's cost alone; the output is cleared after each
// reading, as the shell does once it has handed the output on.
void engine_reading(benchmark::State& state) {
  const int zones = static_cast<int>(state.range(0));
  dewmargin::engine core(dewmargin::bench::bench_site(zones));
  dewmargin::engine_output out;
  timestamp now = k_start;
  core.begin(now, {}, out);
  out.clear();
  const std::vector<std::string> topics = dewmargin::bench::bench_zone_topics(zones);
  const auto& payloads = dewmargin::bench::k_bench_payloads;
  // Every input reports once before timing, so that the zones are judged (not waiting).
  for (std::size_t t = 0; t < topics.size(); ++t) core.on_message(topics[t], payloads[t % 3][0], now, out);
  for (int l = 0; l < std::max(1, zones / 100); ++l) {
    core.on_message("plant/loop-" + std::to_string(l) + "/supply", "16.0", now, out);
  }
  out.clear();

  std::size_t t = 0;
  std::size_t round = 0;
  int ms = 0;
  std::size_t published = 0;
  for (auto _ : state) {
    core.on_message(topics[t], payloads[t % 3][round % 4], now, out);
    published += out.messages.size();
    out.clear();
    if (++t == topics.size()) {
      t = 0;
      ++round;
    }
    now += std::chrono::milliseconds(1);
    if (++ms == 1000) {
      ms = 0;
      state.PauseTiming();
      core.tick(now, out);
      out.clear();
      state.ResumeTiming();
    }
  }
  state.SetItemsProcessed(state.iterations());
  state.counters["published_per_reading"] =
      static_cast<double>(published) / static_cast<double>(std::max<benchmark::IterationCount>(1, state.iterations()));
}
BENCHMARK(engine_reading)->ArgName("zones")->Arg(10)->Arg(1000);

// ---- engine::tick at rest ------------------------------------------------------------------
// The once-a-second tick of a quiet site: every input reported a moment ago and nothing moves.
// The figure is per zone (items = zones), the cost every known zone adds to each second.
void engine_tick(benchmark::State& state) {
  const int zones = static_cast<int>(state.range(0));
  dewmargin::engine core(dewmargin::bench::bench_site(zones));
  dewmargin::engine_output out;
  timestamp now = k_start;
  core.begin(now, {}, out);
  const std::vector<std::string> topics = dewmargin::bench::bench_zone_topics(zones);
  const auto& payloads = dewmargin::bench::k_bench_payloads;
  const auto report_all = [&] {
    for (std::size_t t = 0; t < topics.size(); ++t) core.on_message(topics[t], payloads[t % 3][0], now, out);
    for (int l = 0; l < std::max(1, zones / 100); ++l) {
      core.on_message("plant/loop-" + std::to_string(l) + "/supply", "16.0", now, out);
    }
  };
  report_all();
  // Past the start-up permissive and the first publications, so the timed ticks are the quiet ones.
  for (int s = 0; s < 120; ++s) {
    now += std::chrono::seconds(1);
    core.tick(now, out);
  }
  out.clear();
  int seconds = 0;
  std::size_t published = 0;
  for (auto _ : state) {
    now += std::chrono::seconds(1);
    core.tick(now, out);
    published += out.messages.size();
    out.clear();
    // Inputs report every 30 s (well within stale_after_s), outside the timed part.
    if (++seconds == 30) {
      seconds = 0;
      state.PauseTiming();
      report_all();
      out.clear();
      state.ResumeTiming();
    }
  }
  state.SetItemsProcessed(state.iterations() * zones);
  state.counters["published_per_tick"] =
      static_cast<double>(published) / static_cast<double>(std::max<benchmark::IterationCount>(1, state.iterations()));
}
BENCHMARK(engine_tick)->ArgName("zones")->Arg(1000)->Arg(10000)->Unit(benchmark::kMicrosecond);

// ---- payload decoding -------------------------------------------------------------------
void decode_bare(benchmark::State& state) {
  const dewmargin::input_config cfg = dewmargin::bench::bench_input("b/z1/temp");
  std::array<std::string, k_ring> payloads;
  for (std::size_t i = 0; i < k_ring; ++i) {
    char buf[16];
    std::snprintf(buf, sizeof buf, "%.1f", air_c(i));
    payloads[i] = buf;  // "24.3" and the like
  }
  std::size_t i = 0;
  for (auto _ : state) {
    auto v = dewmargin::decode_number(payloads[i], cfg, dewmargin::input_kind::air_temp);
    benchmark::DoNotOptimize(v);
    i = (i + 1) % k_ring;
  }
  state.SetItemsProcessed(state.iterations());
}
BENCHMARK(decode_bare);

// A multi-sensor's JSON document, read at a JSON pointer (config `field`).
void decode_json(benchmark::State& state) {
  dewmargin::input_config cfg = dewmargin::bench::bench_input("b/z1/sensor");
  cfg.field = "/air/temp_c";
  std::array<std::string, k_ring> payloads;
  for (std::size_t i = 0; i < k_ring; ++i) {
    char buf[160];
    std::snprintf(buf, sizeof buf,
                  R"({"ts":"2026-07-14T13:00:%02zuZ","air":{"temp_c":%.1f,"rh_pct":%.1f},"battery_pct":87})", i % 60,
                  air_c(i), rh_pct(i));
    payloads[i] = buf;
  }
  std::size_t i = 0;
  for (auto _ : state) {
    auto v = dewmargin::decode_number(payloads[i], cfg, dewmargin::input_kind::air_temp);
    benchmark::DoNotOptimize(v);
    i = (i + 1) % k_ring;
  }
  state.SetItemsProcessed(state.iterations());
}
BENCHMARK(decode_json);

// ---- event and state JSON ----------------------------------------------------------------
// A band event with the fields the engine writes for a safe → tight change.
void band_event_json(benchmark::State& state) {
  const std::string site = "bench";
  const std::string zone = "level2-east";
  timestamp now = k_start;
  std::size_t i = 0;
  for (auto _ : state) {
    dewmargin::event_json e(site, now, dewmargin::subject_type::zone, zone, "band");
    e.text("from", "safe").text("to", "tight");
    e.number("margin_k", 1.84 + 0.01 * static_cast<double>(i)).number("dew_point_c", 16.21);
    e.number("surface_min_c", 18.05).number("supply_c", 17.2);
    e.text("margin_source", "surface");
    e.alarm(dewmargin::alarm_status{});
    std::string json = e.dump();
    benchmark::DoNotOptimize(json);
    i = (i + 1) % k_ring;
    now += std::chrono::seconds(1);
  }
  state.SetItemsProcessed(state.iterations());
}
BENCHMARK(band_event_json);

// A zone's retained state payload, all fields present.
void zone_state_json(benchmark::State& state) {
  dewmargin::zone_state_view v;
  v.site = "bench";
  v.zone = "level2-east";
  v.ts = k_start;
  v.band = "safe";
  v.air_temp_c = 24.1;
  v.rh_pct = 51.0;
  v.surface_min_c = 17.0;
  v.supply_c = 16.0;
  v.margin_source = "surface";
  v.valve = "open";
  v.minutes_to_condensation = 42.0;
  v.surface_rh_pct = 78.5;
  std::size_t i = 0;
  for (auto _ : state) {
    v.dew_point_c = 13.2 + 0.01 * static_cast<double>(i);
    v.margin_k = 17.0 - *v.dew_point_c;
    v.ts += std::chrono::seconds(1);
    std::string json = dewmargin::format_zone_state(v);
    benchmark::DoNotOptimize(json);
    i = (i + 1) % k_ring;
  }
  state.SetItemsProcessed(state.iterations());
}
BENCHMARK(zone_state_json);

// The console table as usual, and the medians (or the single runs) kept for RESULT lines.
class result_reporter : public benchmark::ConsoleReporter {
 public:
  result_reporter() : benchmark::ConsoleReporter(OO_Tabular) {}

  void ReportRuns(const std::vector<Run>& runs) override {
    benchmark::ConsoleReporter::ReportRuns(runs);
    for (const Run& r : runs) {
      if (r.error_occurred) continue;
      const bool single = r.run_type == Run::RT_Iteration && r.repetitions <= 1;
      const bool median = r.run_type == Run::RT_Aggregate && r.aggregate_name == "median";
      if (single || median) results_[result_name(r)] = to_ns(r.GetAdjustedCPUTime(), r.time_unit);
    }
  }

  void print_results() const {
    for (const auto& [name, ns] : results_) std::printf("RESULT %s_ns %.1f ns\n", name.c_str(), ns);
  }

 private:
  // "engine_reading" + "zones:1000" → "engine_reading_zones_1000"
  static std::string result_name(const Run& r) {
    std::string name = r.run_name.function_name;
    if (!r.run_name.args.empty()) name += "_" + r.run_name.args;
    for (char& c : name) {
      if (c == ':' || c == '/') c = '_';
    }
    return name;
  }
  static double to_ns(double value, benchmark::TimeUnit unit) {
    switch (unit) {
      case benchmark::kNanosecond:
        return value;
      case benchmark::kMicrosecond:
        return value * 1e3;
      case benchmark::kMillisecond:
        return value * 1e6;
      case benchmark::kSecond:
        return value * 1e9;
    }
    return value;
  }

  std::map<std::string, double> results_;
};

}  // namespace

int main(int argc, char** argv) {
  // Five repetitions and their aggregates by default; the command line may say otherwise.
  std::vector<char*> args(argv, argv + argc);
  bool repetitions_given = false;
  for (int i = 1; i < argc; ++i) {
    if (std::strncmp(argv[i], "--benchmark_repetitions", 23) == 0) repetitions_given = true;
  }
  std::string repetitions = "--benchmark_repetitions=5";
  std::string aggregates = "--benchmark_report_aggregates_only=true";
  if (!repetitions_given) {
    args.push_back(repetitions.data());
    args.push_back(aggregates.data());
  }
  int count = static_cast<int>(args.size());
  args.push_back(nullptr);
  benchmark::Initialize(&count, args.data());
  if (benchmark::ReportUnrecognizedArguments(count, args.data())) return 1;
  result_reporter reporter;
  const std::size_t ran = benchmark::RunSpecifiedBenchmarks(&reporter);
  benchmark::Shutdown();
  reporter.print_results();
  if (ran == 0) {
    std::fprintf(stderr, "micro_bench: no benchmark matched the filter\n");
    return 1;
  }
  return 0;
}
