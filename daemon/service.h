#pragma once
// The service's wiring: config, decision core, MQTT link, history store, clock and
// signals. One worker thread (the caller's) owns the core.
#include <filesystem>
#include <memory>
#include <optional>
#include <spdlog/logger.h>

namespace dewmargin::daemon {

struct service_options {
  std::filesystem::path config_path;
  std::optional<std::string> log_level;  // overrides logging.level of the config
};

// Runs until SIGTERM/SIGINT. Returns the process exit code (0 after a clean stop,
// 1 runtime failure, 2 bad config).
int run_service(const service_options& options, const std::shared_ptr<spdlog::logger>& log);

}  // namespace dewmargin::daemon
