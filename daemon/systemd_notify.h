#pragma once
// sd_notify for Type=notify: READY once connected and subscribed, WATCHDOG keep-alives
// from the worker loop only (a stuck worker must be noticed), STOPPING and STATUS.
// Without systemd (no NOTIFY_SOCKET) every call does nothing.
#include <chrono>
#include <string>

namespace dewmargin::daemon {

class systemd_notifier {
 public:
  systemd_notifier();
  void ready(const std::string& status);
  void stopping();
  void reloading();
  void status(const std::string& status);
  // Sends WATCHDOG=1 when half the watchdog interval has passed since the last one.
  void keep_alive(std::chrono::steady_clock::time_point now);

 private:
  bool watchdog_ = false;
  std::chrono::microseconds interval_{0};
  std::chrono::steady_clock::time_point last_{};
};

}  // namespace dewmargin::daemon
