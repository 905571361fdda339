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
                         "  dewmargin check /etc/dewmargin/dewmargin.yaml\n\n") +
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

  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    return parse_failure(e, app);
  }
  return exit_code;
}
