// dewmargin-sim: a closed-loop building simulator for demos, end-to-end tests and what-if
// days. It plays a day read from a scenario file (the building, the weather, the incidents),
// publishes every sensor on the topics of the service's config, takes the service's
// setpoints, valve and dehumidifier commands back into its physics, and reports the ground
// truth: how long each chilled surface was really wet, and how much warning the service gave.
#include <CLI/CLI.hpp>
#include <cstdio>
#include <fstream>
#include <iostream>
#include <nlohmann/json.hpp>

#include "dewmargin/caution.h"
#include "dewmargin/config_loader.h"
#include "model/report.h"
#include "model/simulation.h"
#include "model/verdict.h"
#include "run_loop.h"
#include "scenario_file/scenario_loader.h"

namespace {

constexpr int k_exit_usage = 2;
constexpr int k_exit_failed = 1;

int write_json(const std::string& path, const std::string& json) {
  if (path == "-") {
    std::cout << json << std::endl;
    return 0;
  }
  std::ofstream f(path, std::ios::binary | std::ios::trunc);
  f << json << '\n';
  f.close();
  if (!f) {
    std::cerr << "dewmargin-sim: cannot write " << path << "\n";
    return k_exit_failed;
  }
  return 0;
}

}  // namespace

int main(int argc, char** argv) {
  namespace sim = dewmargin::sim;
  CLI::App app{"dewmargin-sim: plays a day of a building, read from a scenario file, against dewmargind"};
  std::string config_path;
  std::string scenario_path;
  std::string broker;
  std::string json_path;
  std::string trace_path;
  bool no_service = false;
  bool compare = false;
  bool quiet = false;
  double status_every_min = 30.0;
  double ack_after_min = 5.0;
  std::optional<double> max_wet_zone_min;
  std::optional<std::uint64_t> seed;
  sim::run_options run;
  sim::simulation_options sim_options;
  app.add_option("--config", config_path, "The config the service reads (topics, ids, clock)")->required();
  app.add_option("--scenario", scenario_path, "The day to play: a scenario file (docs/scenarios.md)")->required();
  app.add_option("--broker", broker, "Broker URI, overriding broker.uri of the config");
  app.add_option("--speed", run.speed, "Simulated seconds per wall second (0: as fast as possible)")
      ->check(CLI::NonNegativeNumber);
  auto* no_service_flag = app.add_flag("--no-service", no_service,
                                       "Baseline: design setpoints, valves open, dehumidifiers at design; no broker");
  auto* compare_flag = app.add_flag("--compare", compare,
                                    "Play the day without the service, then with it (through the broker), and "
                                    "compare them zone by zone");
  compare_flag->excludes(no_service_flag);
  app.add_option("--max-wet-zone-min", max_wet_zone_min,
                 "With --compare: exit 1 when the run with the service has more wet zone-minutes than this")
      ->check(CLI::NonNegativeNumber)
      ->needs(compare_flag);
  app.add_option("--seed", seed, "Seed of the sensor noise (default: the scenario's, else 20260714)");
  app.add_option("--status-every-min", status_every_min, "Simulated minutes between status lines (0: none)")
      ->check(CLI::NonNegativeNumber);
  app.add_option("--ack-after-min", ack_after_min,
                 "The simulated operator acknowledges each alarm this many simulated minutes after it appears "
                 "(0: never)")
      ->check(CLI::NonNegativeNumber);
  app.add_option("--wait-service-s", run.wait_service_s, "Wall seconds to wait for the broker and the service")
      ->check(CLI::PositiveNumber);
  app.add_option("--max-service-lag-s", run.max_service_lag_s,
                 "Hold the simulated clock while the service trails the readings by more than this many simulated "
                 "seconds (event-time configs; 0: never)")
      ->check(CLI::NonNegativeNumber);
  app.add_option("--json", json_path, "Also write the result as JSON to this file ('-': standard output)");
  app.add_option("--trace", trace_path, "Write the true state as CSV, one row per zone and simulated minute");
  app.add_flag("--quiet", quiet, "No status lines and no text summary");
  app.footer(
      std::string("\nExamples:\n"
                  "  dewmargin-sim --config config/demo.yaml --scenario config/scenarios/day.yaml --speed 480\n"
                  "  dewmargin-sim --config config/demo.yaml --scenario config/scenarios/day.yaml --no-service\n"
                  "  dewmargin-sim --config site.yaml --scenario humid-trip.yaml --compare --max-wet-zone-min 10\n"
                  "\nThe runs with the service need dewmargind running on the config, and its broker.\n"
                  "Exit codes: 0 done (and, with --compare, within the bound), 1 over the bound, broker or\n"
                  "service unavailable, 2 bad usage, config or scenario.\n\n") +
      dewmargin::k_caution);
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    if (e.get_exit_code() == 0) return app.exit(e);
    std::cerr << "dewmargin-sim: " << e.what() << " (see --help)\n";
    return k_exit_usage;
  }

  auto loaded = dewmargin::load_config_file(config_path);
  if (!loaded.ok()) {
    for (const auto& d : loaded.errors) std::cerr << d.to_string() << '\n';
    return k_exit_usage;
  }
  const auto day = sim::load_scenario_file(scenario_path, *loaded.config, config_path);
  if (!day.ok()) {
    for (const auto& d : day.errors) std::cerr << d.to_string() << '\n';
    return k_exit_usage;
  }
  run.broker_uri = broker.empty() ? loaded.config->broker.uri : broker;
  run.status_every_s = quiet ? 0.0 : status_every_min * 60.0;
  sim_options.ack_after_s = ack_after_min * 60.0;
  if (seed) {
    sim_options.seed = *seed;
  } else if (day.day->seed) {
    sim_options.seed = *day.day->seed;
  }
  const auto make = [&](bool with_service) -> std::unique_ptr<sim::simulation> {
    sim::simulation_options o = sim_options;
    o.with_service = with_service;
    auto created = sim::simulation::create(*loaded.config, *day.house, *day.day, o);
    if (!created) {
      std::cerr << scenario_path << ": " << created.err().message << '\n';
      return nullptr;
    }
    return std::move(created.value());
  };

  std::ofstream trace;
  if (!trace_path.empty()) {
    trace.open(trace_path, std::ios::binary | std::ios::trunc);
    if (!trace) {
      std::cerr << "dewmargin-sim: cannot write " << trace_path << "\n";
      return k_exit_usage;
    }
    run.trace = &trace;
  }

  if (no_service) {
    auto baseline = make(false);
    if (!baseline) return k_exit_usage;
    sim::run_offline(*baseline, run, std::cout);
    if (!quiet) std::cout << sim::summary_text(*baseline) << std::flush;
    return json_path.empty() ? 0 : write_json(json_path, sim::summary_json(*baseline));
  }

  std::unique_ptr<sim::simulation> baseline;
  if (compare) {
    baseline = make(false);
    if (!baseline) return k_exit_usage;
    sim::run_options offline = run;
    offline.status_every_s = 0.0;
    offline.trace = nullptr;  // the trace is the supervised run's
    sim::run_offline(*baseline, offline, std::cout);
    if (!quiet) {
      char line[128];
      std::snprintf(line, sizeof line,
                    "dewmargin-sim: without the service: %.1f wet zone-minutes; now with the service",
                    baseline->truth().total_condensing_min());
      std::cout << line << std::endl;
    }
  }
  auto supervised = make(true);
  if (!supervised) return k_exit_usage;
  sim::pace_report pace;
  const int rc = sim::run_with_broker(*supervised, run, std::cout, std::cerr, pace);
  if (rc != 0) return rc;
  if (!compare) {
    if (!quiet) std::cout << sim::summary_text(*supervised) << std::flush;
    return json_path.empty() ? 0 : write_json(json_path, sim::summary_json(*supervised, &pace));
  }
  if (!quiet) std::cout << sim::compare_text(*baseline, *supervised) << std::flush;
  if (!json_path.empty()) {
    const int w = write_json(json_path, sim::compare_json(*baseline, *supervised, &pace, max_wet_zone_min));
    if (w != 0) return w;
  }
  if (!max_wet_zone_min) return 0;
  const auto outcome = sim::judge(sim::verdict_of(*baseline), sim::verdict_of(*supervised), *max_wet_zone_min);
  std::cout << "dewmargin-sim: " << outcome.line << std::endl;
  return outcome.pass ? 0 : k_exit_failed;
}
