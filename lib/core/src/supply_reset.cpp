#include "dewmargin/supply_reset.h"

#include <algorithm>
#include <cstdio>

namespace dewmargin {
namespace {

std::string format_reason(const char* fmt, const std::string& zone, double a, double b) {
  char buf[200];
  std::snprintf(buf, sizeof buf, fmt, zone.c_str(), a, b);
  return buf;
}

}  // namespace

const char* setpoint_limit_name(setpoint_limit l) {
  switch (l) {
    case setpoint_limit::none:
      return "none";
    case setpoint_limit::min:
      return "min";
    case setpoint_limit::max:
      return "max";
    case setpoint_limit::rate:
      return "rate";
  }
  return "none";
}

reset_target compute_reset_target(const reset_demand& d, const setpoint_config& cfg) {
  if (d.dew_point_unknown) {
    return {cfg.max_c, setpoint_limit::max, "dew point of " + d.governing_zone + " unknown: fail safe at max"};
  }
  if (d.no_counted_zone || !d.max_dew_point_c) {
    return {cfg.min_c, setpoint_limit::min, "no zone open on this loop"};
  }
  const double raw = *d.max_dew_point_c + cfg.reset_margin_k;
  const std::string reason =
      format_reason("%s dew point %.2f °C + %.2f K", d.governing_zone, *d.max_dew_point_c, cfg.reset_margin_k);
  if (raw > cfg.max_c) return {cfg.max_c, setpoint_limit::max, reason + ", held at max"};
  if (raw < cfg.min_c) return {cfg.min_c, setpoint_limit::min, reason + ", held at min"};
  return {raw, setpoint_limit::none, reason};
}

bool supply_reset::update(const reset_demand& demand, timestamp now) {
  const reset_target t = compute_reset_target(demand, cfg_);
  const double before_c = setpoint_c_;
  const setpoint_limit before_limit = limited_;
  const double elapsed_s = last_update_ ? std::max(0.0, seconds_between(*last_update_, now)) : 0.0;
  last_update_ = now;
  governing_zone_ = demand.no_counted_zone ? std::string() : demand.governing_zone;

  if (t.target_c >= setpoint_c_) {
    setpoint_c_ = t.target_c;
    limited_ = t.limited;
    reason_ = t.reason;
  } else {
    const double step_k = cfg_.fall_k_per_min * elapsed_s / 60.0;
    if (setpoint_c_ - step_k <= t.target_c) {
      setpoint_c_ = t.target_c;
      limited_ = t.limited;
      reason_ = t.reason;
    } else {
      setpoint_c_ -= step_k;
      limited_ = setpoint_limit::rate;
      char buf[64];
      std::snprintf(buf, sizeof buf, "falling at %.2f K/min towards %.2f °C: ", cfg_.fall_k_per_min, t.target_c);
      reason_ = buf + t.reason;
    }
  }
  return setpoint_c_ != before_c || limited_ != before_limit;
}

bool supply_reset::raise_for(double dew_point_c, const std::string& zone, timestamp now) {
  // Called for every zone on every evaluation: the usual answer (no raise) is found without
  // formatting the reason (compute_reset_target's target, clamped the same way).
  const double target_c = std::min(std::max(dew_point_c + cfg_.reset_margin_k, cfg_.min_c), cfg_.max_c);
  if (target_c <= setpoint_c_) return false;
  reset_demand d;
  d.max_dew_point_c = dew_point_c;
  d.governing_zone = zone;
  const reset_target t = compute_reset_target(d, cfg_);
  if (t.target_c <= setpoint_c_) return false;
  setpoint_c_ = t.target_c;
  limited_ = t.limited;
  reason_ = t.reason;
  governing_zone_ = zone;
  last_update_ = now;
  return true;
}

bool supply_reset::raise_to_max(const std::string& zone, timestamp now) {
  reset_demand d;
  d.dew_point_unknown = true;
  d.governing_zone = zone;
  const reset_target t = compute_reset_target(d, cfg_);
  if (setpoint_c_ >= t.target_c && limited_ == setpoint_limit::max) {
    reason_ = t.reason;  // an unknown dew point outranks a high one as the reason
    governing_zone_ = zone;
    return false;
  }
  setpoint_c_ = t.target_c;
  limited_ = t.limited;
  reason_ = t.reason;
  governing_zone_ = zone;
  last_update_ = now;
  return true;
}

}  // namespace dewmargin
