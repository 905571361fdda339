#pragma once
// Helpers of the live-view tests: shell commands with their output, tmux sessions on a
// private socket, readings that give each zone of the service test site a known band.
#include <chrono>
#include <filesystem>
#include <functional>
#include <optional>
#include <string>

#include "mqtt_test_client.h"

namespace dewmargin::test_support {

struct shell_result {
  int exit_code = -1;
  std::string out;  // stdout and stderr
};
// Runs `command` with sh -c, bounded by `timeout` (the command is killed after it).
shell_result run_shell(const std::string& command, std::chrono::seconds timeout = std::chrono::seconds(20));

std::string shell_quote(const std::string& s);

// Polls `check` every 50 ms until it is true or the timeout passes.
bool eventually(const std::function<bool()>& check, std::chrono::milliseconds timeout);

// A tmux server on its own socket in `dir`, killed by the destructor.
class tmux_session {
 public:
  tmux_session(const std::filesystem::path& dir, const std::string& command, int columns, int rows);
  tmux_session(const tmux_session&) = delete;
  tmux_session& operator=(const tmux_session&) = delete;
  ~tmux_session();
  [[nodiscard]] std::string screen() const;     // capture-pane text
  void keys(const std::string& literal) const;  // typed as text
  void key(const std::string& name) const;      // Enter, C-c, ...
  [[nodiscard]] bool alive() const;

 private:
  std::string tmux_;  // "tmux -S SOCKET"
};

// Readings on the service test site (tests/service/service_fixture.cpp): room-a gets
// condensing (surface below the dew point) or safe, room-b (supply stands in) condensing or safe.
void publish_readings(mqtt_test_client& plant, bool room_a_wet, bool room_b_wet);

}  // namespace dewmargin::test_support
