#include "dewmargin/dehumidifier_fault.h"

#include <cstdio>

namespace dewmargin {

bool dehumidifier_fault::update(const unit_fault_inputs& in, timestamp now) {
  const bool high = in.supply_dew_point_c && in.request_c && *in.supply_dew_point_c > *in.request_c + fault_k_;
  if (!high) {
    high_since_.reset();
  } else if (!high_since_) {
    high_since_ = now;
  }
  std::string reason;
  if (in.switch_active) {
    reason = "fault switch active";
  } else if (high && seconds_between(*high_since_, now) >= fault_after_s_) {
    char buf[128];
    std::snprintf(buf, sizeof buf, "supply dew point %.1f °C above the request %.1f °C + %.1f K for %.0f s",
                  *in.supply_dew_point_c, *in.request_c, fault_k_, fault_after_s_);
    reason = buf;
  }
  // Only the change of fault state matters to the caller; the numbers in the reason move.
  const bool changed = reason.empty() != reason_.empty();
  reason_ = std::move(reason);
  return changed;
}

}  // namespace dewmargin
