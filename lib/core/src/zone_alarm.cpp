#include "dewmargin/zone_alarm.h"

namespace dewmargin {

void zone_alarm::on_band(band b, bool unknown_counts) {
  const bool condition = is_alarm_band(b) && (b != band::unknown || unknown_counts);
  if (condition) {
    if (!status_.active || band_severity(b) > band_severity(alarm_band_)) status_.acknowledged = false;
    status_.active = true;
    alarm_band_ = b;
  } else if (status_.active) {
    // Return to normal: an unacknowledged alarm stays latched until acknowledged.
    status_.active = false;
    alarm_band_ = band::safe;
  }
}

std::string zone_alarm::acknowledge() {
  if (status_.acknowledged) return "nothing to acknowledge";
  status_.acknowledged = true;
  return {};
}

std::string zone_alarm::shelve(int minutes, timestamp now) {
  if (minutes < k_min_shelve_minutes || minutes > k_max_shelve_minutes) return "minutes must be 1 to 1440";
  status_.shelved_until = now + std::chrono::minutes(minutes);
  return {};
}

std::string zone_alarm::unshelve() {
  if (!status_.shelved_until) return "zone is not shelved";
  status_.shelved_until.reset();
  return {};
}

bool zone_alarm::expire_shelving(timestamp now) {
  if (status_.shelved_until && now >= *status_.shelved_until) {
    status_.shelved_until.reset();
    return true;
  }
  return false;
}

}  // namespace dewmargin
