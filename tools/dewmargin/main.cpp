// dewmargin: the operator command line. Parsing only; each subcommand lives in its own file.
#include <CLI/CLI.hpp>
#include <iostream>
#include <string>

#include "caution.h"
#include "commands.h"

namespace {

using namespace dewmargin::cli;  // NOLINT(google-build-using-namespace): file-local, in a .cpp

int parse_failure(const CLI::Error& e, CLI::App& app) {
  if (e.get_exit_code() == 0) return app.exit(e);  // --help, --version
  std::cerr << "dewmargin: " << e.what() << " (see --help)\n";
  return k_exit_usage;
}

}  // namespace

int main(int argc, char** argv) {
  CLI::App app{"dewmargin: dew-point supervision of chilled radiant surfaces (operator command line)"};
  app.footer(std::string("\nExamples:\n"
                         "  dewmargin dewpoint --temp 24 --rh 50\n"
                         "  dewmargin check /etc/dewmargin/dewmargin.yaml\n"
                         "  dewmargin replay --config site.yaml --readings readings.csv\n\n") +
             k_caution);
  app.require_subcommand(1);
  app.set_version_flag("--version", "dewmargin 0.1.0");

  int exit_code = k_exit_ok;

  dewpoint_options dp;
  auto* dewpoint = app.add_subcommand("dewpoint", "Dew point and humidity ratio of one air state");
  dewpoint->add_option("--temp", dp.temp_text, "Air temperature (in --unit)")->required();
  dewpoint->add_option("--rh", dp.rh_text, "Relative humidity, % (0 < RH <= 100; up to 103 is clamped)")->required();
  dewpoint->add_option("--unit", dp.unit, "Temperature unit of --temp and the output: C or F")
      ->check(CLI::IsMember({"C", "F", "c", "f"}));
  dewpoint->add_option("--formula", dp.formula,
                       "Magnus coefficients: sonntag (WMO-No. 8, default) or alduchov (Alduchov & Eskridge 1996)")
      ->check(CLI::IsMember({"sonntag", "alduchov"}));
  dewpoint->add_flag("--json", dp.json, "Print one JSON object");
  dewpoint->footer(std::string("\nExample:\n  dewmargin dewpoint --temp 24 --rh 50 --json\n\n") + k_caution);
  dewpoint->callback([&] { exit_code = run_dewpoint(dp, std::cout, std::cerr); });

  std::string check_file;
  auto* check = app.add_subcommand("check", "Validate a config file and summarise zones, loops and inputs");
  check->add_option("FILE", check_file, "Config file (YAML)")->required();
  check->footer(std::string("\nExample:\n  dewmargin check config/example.yaml\n\n") + k_caution);
  check->callback([&] { exit_code = run_check(check_file, std::cout, std::cerr); });

  replay_options rp;
  auto* replay = app.add_subcommand(
      "replay", "Run recorded readings through the rules on simulated time and print what would be published");
  replay->add_option("--config", rp.config_file, "Config file (YAML)")->required();
  replay->add_option("--readings", rp.readings_file, "CSV file with columns ts,topic,payload")->required();
  replay->add_flag("--states", rp.states, "Also print every zone and loop state");
  replay->add_option("--start", rp.start, "Origin of ts given as seconds (ISO 8601; default 1970-01-01T00:00:00Z)");
  replay->add_option("--tail-s", rp.tail_s, "Simulated seconds to keep ticking after the last reading")
      ->check(CLI::Range(0.0, 86400.0 * 31));
  replay->footer(std::string("\nExample:\n  dewmargin replay --config config/example.yaml --readings day.csv --states\n\n"
                             "ts is ISO 8601 or seconds from --start; payload is quoted per RFC 4180 when it\n"
                             "holds commas or quotes. Lines starting with # are comments.\n\n") +
                 k_caution);
  replay->callback([&] { exit_code = run_replay(rp, std::cout, std::cerr); });

  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    return parse_failure(e, app);
  }
  return exit_code;
}
