// dewmargin-sim: a closed-loop building simulator for demos and end-to-end tests. It plays a
// scripted day of an invented office, publishes every sensor on the topics of the shared
// config, takes the service's setpoints, valve and dehumidifier commands back into its
// physics, and reports the ground truth: how long each chilled surface was really wet.
#include <CLI/CLI.hpp>
#include <fstream>
#include <iostream>

#include "dewmargin/config_loader.h"
#include "model/report.h"
#include "model/simulation.h"
#include "run_loop.h"

namespace {

constexpr int k_exit_usage = 2;

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
    return 1;
  }
  return 0;
}

}  // namespace

int main(int argc, char** argv) {
  CLI::App app{"dewmargin-sim: closed-loop simulator of an invented office building, for demos and tests"};
  std::string config_path;
  std::string broker;
  std::string scenario_name = "day";
  std::string json_path;
  bool no_service = false;
  bool quiet = false;
  double status_every_min = 30.0;
  double ack_after_min = 5.0;
  dewmargin::sim::run_options run;
  dewmargin::sim::simulation_options sim_options;
  app.add_option("--config", config_path, "The config the service reads (topics, site)")->required();
  app.add_option("--broker", broker, "Broker URI, overriding broker.uri of the config");
  app.add_option("--scenario", scenario_name, "day (06:00-20:00) or short (06:00-08:30)")
      ->check(CLI::IsMember({"day", "short"}));
  app.add_option("--speed", run.speed, "Simulated seconds per wall second (0: as fast as possible)")
      ->check(CLI::NonNegativeNumber);
  app.add_flag("--no-service", no_service,
               "Baseline: design setpoints, valves open, DOAS at its design dew point; no broker");
  app.add_option("--seed", sim_options.seed, "Seed of the sensor noise");
  app.add_option("--status-every-min", status_every_min, "Simulated minutes between status lines (0: none)")
      ->check(CLI::NonNegativeNumber);
  app.add_option("--ack-after-min", ack_after_min,
                 "The simulated operator acknowledges each alarm this many simulated minutes after it appears "
                 "(0: never)")
      ->check(CLI::NonNegativeNumber);
  app.add_option("--wait-service-s", run.wait_service_s, "Wall seconds to wait for the broker and the service")
      ->check(CLI::PositiveNumber);
  app.add_option("--json", json_path, "Also write the result as JSON to this file ('-': standard output)");
  std::string trace_path;
  app.add_option("--trace", trace_path, "Write the true state as CSV, one row per zone and simulated minute");
  app.add_flag("--quiet", quiet, "No status lines and no text summary");
  app.footer(
      "\nExamples:\n"
      "  dewmargin-sim --config config/demo.yaml --speed 450          # with dewmargind running\n"
      "  dewmargin-sim --config config/demo.yaml --no-service --json -  # the baseline\n\n"
      "Exit codes: 0 done, 1 broker or service unavailable, 2 bad usage or config.");
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
  run.broker_uri = broker.empty() ? loaded.config->broker.uri : broker;
  run.status_every_s = quiet ? 0.0 : status_every_min * 60.0;
  sim_options.with_service = !no_service;
  sim_options.ack_after_s = ack_after_min * 60.0;
  auto created = dewmargin::sim::simulation::create(std::move(*loaded.config), dewmargin::sim::quayside_four(),
                                                    dewmargin::sim::scenario_named(scenario_name), sim_options);
  if (!created) {
    std::cerr << config_path << ": " << created.err().message << '\n';
    return k_exit_usage;
  }
  dewmargin::sim::simulation& sim = *created.value();
  std::ofstream trace;
  if (!trace_path.empty()) {
    trace.open(trace_path, std::ios::binary | std::ios::trunc);
    if (!trace) {
      std::cerr << "dewmargin-sim: cannot write " << trace_path << "\n";
      return k_exit_usage;
    }
    run.trace = &trace;
  }
  const int rc = no_service ? dewmargin::sim::run_offline(sim, run, std::cout)
                            : dewmargin::sim::run_with_broker(sim, run, std::cout, std::cerr);
  if (rc != 0) return rc;
  if (!quiet) std::cout << dewmargin::sim::summary_text(sim) << std::flush;
  if (!json_path.empty()) return write_json(json_path, dewmargin::sim::summary_json(sim));
  return 0;
}
