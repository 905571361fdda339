#pragma once
// One dewmargind under test: its own temporary directory, a config pointing at the test's
// broker, started and stopped by PID, its log kept for failure messages.
#include <chrono>
#include <filesystem>
#include <nlohmann/json.hpp>
#include <optional>
#include <string>

#include "child_process.h"
#include "mosquitto_fixture.h"
#include "mqtt_test_client.h"

namespace dewmargin::test_support {

// A two-zone site: room-a (surface, window, valve), room-b (JSON sensor, no surface), one loop.
std::string service_test_config(const std::string& broker_uri, const std::filesystem::path& db_path,
                                const std::string& extra_top_level = "");

class service_under_test {
 public:
  service_under_test(const std::string& broker_uri, const std::filesystem::path& dir,
                     const std::string& extra_top_level = "");

  void start();
  int stop(std::chrono::milliseconds grace = std::chrono::seconds(5));  // SIGTERM; exit code
  int kill_now();
  bool running() { return process_.running(); }
  [[nodiscard]] pid_t pid() const { return process_.pid(); }
  bool send_signal(int s) { return process_.send_signal(s); }
  void rewrite_config(const std::string& text) const;

  [[nodiscard]] std::string log_text() const { return read_text_file(log_file_); }
  [[nodiscard]] const std::filesystem::path& db_path() const { return db_path_; }
  [[nodiscard]] const std::filesystem::path& config_path() const { return config_path_; }

 private:
  std::filesystem::path dir_;
  std::filesystem::path config_path_;
  std::filesystem::path db_path_;
  std::filesystem::path log_file_;
  child_process process_;
};

// Parses a payload as JSON; null when it is not JSON.
nlohmann::json as_json(const received_message& m);

// Waits for an event on dm/events of `kind` (and zone, if given) received at index >= from.
std::optional<nlohmann::json> wait_event(mqtt_test_client& c, const std::string& kind, const std::string& zone,
                                         std::chrono::milliseconds timeout, std::size_t from = 0);

// Runs the dewmargin command line; returns exit code and stdout.
struct command_result {
  int exit_code;
  std::string out;
};
command_result run_dewmargin(const std::vector<std::string>& args, const std::filesystem::path& work_dir);

}  // namespace dewmargin::test_support
