#include "dewmargin/zone_valve.h"

#include <cstdio>

namespace dewmargin {

const char* valve_position_name(valve_position p) {
  switch (p) {
    case valve_position::open: return "open";
    case valve_position::closed: return "closed";
    case valve_position::unset: return "";
  }
  return "";
}

std::optional<valve_decision> zone_valve::update(const valve_conditions& c, timestamp now) {
  const char* close_reason = nullptr;
  if (c.zone_band == band::condensing) {
    close_reason = "zone condensing";
  } else if (c.window_open) {
    close_reason = "window open";
  } else if (c.zone_band == band::unknown && c.unknown_is_fault) {
    close_reason = "zone inputs unknown";
  }

  if (close_reason) {
    fine_since_.reset();
    if (position_ == valve_position::closed) return std::nullopt;
    valve_decision d{position_, valve_position::closed, close_reason};
    position_ = valve_position::closed;
    return d;
  }

  const bool fine = c.zone_band == band::safe || c.zone_band == band::tight;
  if (fine) {
    if (!fine_since_) fine_since_ = now;
  } else {
    fine_since_.reset();
  }

  if (position_ == valve_position::unset) {
    // First command after start: a zone with known readings and no reason to close opens.
    if (c.zone_band == band::unknown) return std::nullopt;
    position_ = valve_position::open;
    return valve_decision{valve_position::unset, valve_position::open, "zone readings known, no reason to close"};
  }
  if (position_ == valve_position::closed && fine_since_ &&
      seconds_between(*fine_since_, now) >= reopen_after_s_) {
    position_ = valve_position::open;
    char buf[96];
    std::snprintf(buf, sizeof buf, c.has_window ? "zone %s, window closed for %.0f s" : "zone %s for %.0f s",
                  band_name(c.zone_band), reopen_after_s_);
    return valve_decision{valve_position::closed, valve_position::open, buf};
  }
  return std::nullopt;
}

}  // namespace dewmargin
