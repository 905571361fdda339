#include "live_test_support.h"

#include <sys/wait.h>

#include <array>
#include <cstdio>
#include <thread>

namespace dewmargin::test_support {

std::string shell_quote(const std::string& s) {
  std::string out = "'";
  for (char c : s) {
    if (c == '\'')
      out += "'\\''";
    else
      out += c;
  }
  return out + "'";
}

shell_result run_shell(const std::string& command, std::chrono::seconds timeout) {
  const std::string bounded =
      "timeout -k 2 " + std::to_string(timeout.count()) + " sh -c " + shell_quote(command) + " 2>&1";
  shell_result r;
  FILE* p = ::popen(bounded.c_str(), "r");
  if (p == nullptr) return r;
  std::array<char, 4096> buf{};
  std::size_t n = 0;
  while ((n = std::fread(buf.data(), 1, buf.size(), p)) > 0) r.out.append(buf.data(), n);
  const int status = ::pclose(p);
  r.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  return r;
}

bool eventually(const std::function<bool()>& check, std::chrono::milliseconds timeout) {
  const auto until = std::chrono::steady_clock::now() + timeout;
  for (;;) {
    if (check()) return true;
    if (std::chrono::steady_clock::now() >= until) return false;
    std::this_thread::sleep_for(std::chrono::milliseconds(50));
  }
}

tmux_session::tmux_session(const std::filesystem::path& dir, const std::string& command, int columns, int rows)
    : tmux_("tmux -S " + shell_quote((dir / "tmux.sock").string())) {
  run_shell(tmux_ + " new-session -d -s live -x " + std::to_string(columns) + " -y " + std::to_string(rows) + " " +
            shell_quote(command));
}

tmux_session::~tmux_session() { run_shell(tmux_ + " kill-server"); }

std::string tmux_session::screen() const { return run_shell(tmux_ + " capture-pane -p -t live").out; }

void tmux_session::keys(const std::string& literal) const {
  run_shell(tmux_ + " send-keys -t live -l " + shell_quote(literal));
}

void tmux_session::key(const std::string& name) const { run_shell(tmux_ + " send-keys -t live " + name); }

bool tmux_session::alive() const { return run_shell(tmux_ + " has-session -t live").exit_code == 0; }

void publish_readings(mqtt_test_client& plant, bool room_a_wet, bool room_b_wet) {
  // Dew points from the Magnus formula (WMO-No. 8 coefficients), rounded: 25 °C at 60 %
  // is 16.7 °C, 24 °C at 50 % is 12.9 °C, 25 °C at 62 % is 17.2 °C, 24 °C at 40 % is 9.6 °C.
  plant.publish("plant/l1/supply", "16.0");
  plant.publish("r/a/temp", room_a_wet ? "25.0" : "24.0");
  plant.publish("r/a/rh", room_a_wet ? "60" : "50");
  plant.publish("r/a/surface", room_a_wet ? "16.5" : "18.0");
  plant.publish("r/b/env", room_b_wet ? R"({"t":25.0,"rh":62})" : R"({"t":24.0,"rh":40})");
}

}  // namespace dewmargin::test_support
