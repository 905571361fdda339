#include "systemd_notify.h"

#include <systemd/sd-daemon.h>

#include <cstdint>

namespace dewmargin::daemon {

systemd_notifier::systemd_notifier() {
  std::uint64_t usec = 0;
  if (sd_watchdog_enabled(0, &usec) > 0 && usec > 0) {
    watchdog_ = true;
    interval_ = std::chrono::microseconds(usec / 2);
  }
}

void systemd_notifier::ready(const std::string& status) {
  sd_notifyf(0, "READY=1\nSTATUS=%s", status.c_str());
}
void systemd_notifier::stopping() { sd_notify(0, "STOPPING=1"); }
void systemd_notifier::reloading() { sd_notify(0, "RELOADING=1"); }
void systemd_notifier::status(const std::string& status) { sd_notifyf(0, "STATUS=%s", status.c_str()); }

void systemd_notifier::keep_alive(std::chrono::steady_clock::time_point now) {
  if (!watchdog_ || now - last_ < interval_) return;
  sd_notify(0, "WATCHDOG=1");
  last_ = now;
}

}  // namespace dewmargin::daemon
