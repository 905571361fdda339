#pragma once
// One zone's alarm in the terms of ANSI/ISA-18.2:
//   normal          inactive, acknowledged
//   unacknowledged  active, not acknowledged
//   acknowledged    active, acknowledged
//   latched         returned to normal while unacknowledged (shown until acknowledged)
// plus shelving, which suppresses annunciation for a bounded time but keeps tracking.
// Entering a worse alarm band (alarm → condensing → unknown) re-arms an acknowledged alarm.
#include <optional>
#include <string>

#include "dewmargin/band.h"
#include "dewmargin/timestamp.h"

namespace dewmargin {

struct alarm_status {
  bool active = false;
  bool acknowledged = true;
  std::optional<timestamp> shelved_until;

  bool operator==(const alarm_status& o) const {
    return active == o.active && acknowledged == o.acknowledged && shelved_until == o.shelved_until;
  }
  bool operator!=(const alarm_status& o) const { return !(*this == o); }
};

inline constexpr int k_min_shelve_minutes = 1;
inline constexpr int k_max_shelve_minutes = 1440;

class zone_alarm {
 public:
  // The alarm condition for a zone in `b`; `unknown_counts` is false while a zone is
  // only waiting for its first readings after start (no fault yet).
  void on_band(band b, bool unknown_counts);

  // Each returns an empty string on success, else the reason for rejecting the command.
  std::string acknowledge();
  std::string shelve(int minutes, timestamp now);
  std::string unshelve();

  // Ends an expired shelving; true when it did.
  bool expire_shelving(timestamp now);

  [[nodiscard]] const alarm_status& status() const { return status_; }
  [[nodiscard]] bool shelved(timestamp now) const { return status_.shelved_until && now < *status_.shelved_until; }
  void restore(const alarm_status& s, band alarm_band) {
    status_ = s;
    alarm_band_ = alarm_band;
  }

 private:
  alarm_status status_;
  band alarm_band_ = band::safe;  // the band that raised the current alarm
};

}  // namespace dewmargin
