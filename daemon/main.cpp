// dewmargind: the supervision service. Parsing and logging set-up only; see service.cpp.
#include <CLI/CLI.hpp>
#include <iostream>

#include "dewmargin/caution.h"
#include "dewmargin/config_loader.h"
#include "dewmargin/version.h"
#include "logging.h"
#include "service.h"

int main(int argc, char** argv) {
  CLI::App app{"dewmargind: keeps chilled radiant surfaces above the dew point (MQTT service)"};
  std::string config_path;
  bool check_only = false;
  bool journal = false;
  std::string log_level;
  app.add_option("--config", config_path, "Config file (YAML)")->required();
  app.add_flag("--check", check_only, "Validate the config and exit (0 valid, 2 invalid)");
  app.add_flag("--journal", journal, "Log for the systemd journal (no timestamps, priority prefixes); "
                                     "detected automatically when stderr is the journal");
  app.add_option("--log-level", log_level, "trace, debug, info, warn, error, critical or off (overrides the config)");
  app.set_version_flag("--version", std::string("dewmargind ") + dewmargin::k_version);
  app.footer(std::string("\nExample:\n  dewmargind --config /etc/dewmargin/dewmargin.yaml\n\n"
                         "Exit codes: 0 clean stop, 1 runtime failure, 2 bad usage or config.\n"
                         "SIGTERM/SIGINT stop, SIGHUP reloads the config.\n\n") +
             dewmargin::k_caution);
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    if (e.get_exit_code() == 0) return app.exit(e);
    std::cerr << "dewmargind: " << e.what() << " (see --help)\n";
    return 2;
  }

  if (check_only) {
    const auto loaded = dewmargin::load_config_file(config_path);
    if (!loaded.ok()) {
      for (const auto& d : loaded.errors) std::cerr << d.to_string() << '\n';
      return 2;
    }
    std::cout << config_path << ": valid (" << loaded.config->zones.size() << " zones, "
              << loaded.config->loops.size() << " loops)\n";
    return 0;
  }

  auto log = dewmargin::daemon::make_logger(journal || dewmargin::daemon::stderr_is_journal());
  dewmargin::daemon::service_options options;
  options.config_path = config_path;
  if (!log_level.empty()) options.log_level = log_level;
  try {
    return dewmargin::daemon::run_service(options, log);
  } catch (const std::exception& e) {
    // An internal fault (tick, publishing, storing, out of memory, a broken invariant):
    // stop loudly, systemd restarts the service. Faults of one message are contained
    // before they get here (message_containment.h).
    log->critical("stopping on an unexpected error: {}", e.what());
    return 1;
  } catch (...) {
    log->critical("stopping on an unexpected error of unknown type");
    return 1;
  }
}
