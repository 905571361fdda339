#include "dewmargin/zone_valve.h"

#include <cstdio>

namespace dewmargin {

const char* valve_position_name(valve_position p) {
  switch (p) {
    case valve_position::open:
      return "open";
    case valve_position::closed:
      return "closed";
    case valve_position::unset:
      return "";
  }
  return "";
}

std::string zone_valve::close_reason(const valve_conditions& c) const {
  if (c.zone_band == band::condensing) return "zone condensing";
  if (c.window_open) return "window open";
  if (c.zone_band == band::unknown && c.unknown_is_fault) return "zone inputs unknown";
  if (c.margin_k && *c.margin_k < rules_.margin_alarm_k && c.minutes_to_condensation &&
      *c.minutes_to_condensation <= rules_.close_ahead_min) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "condensation expected in %.1f min", *c.minutes_to_condensation);
    return buf;
  }
  if (c.zone_band == band::alarm && c.reset_at_limit) return "supply reset at its limit";
  return {};
}

// Empty when the air is dry enough for the water (or the supply is only awaited at start).
std::string zone_valve::permissive_hold(const valve_conditions& c) const {
  if (!c.supply_c) return c.supply_awaiting ? std::string() : "supply temperature unknown";
  if (!c.dew_point_c) return "dew point unknown";
  if (*c.dew_point_c <= *c.supply_c - rules_.open_margin_k) return {};
  char buf[96];
  std::snprintf(buf, sizeof buf, "dew point %.1f °C above supply %.1f °C - %.1f K", *c.dew_point_c, *c.supply_c,
                rules_.open_margin_k);
  return buf;
}

std::optional<valve_decision> zone_valve::update(const valve_conditions& c, timestamp now) {
  const std::string closing = close_reason(c);
  if (!closing.empty()) {
    fine_since_.reset();
    hold_reason_.clear();
    delay_reopen_ = true;
    if (position_ == valve_position::closed) return std::nullopt;
    valve_decision d{position_, valve_position::closed, closing};
    position_ = valve_position::closed;
    return d;
  }

  const bool fine = c.zone_band == band::safe || c.zone_band == band::tight;
  if (fine) {
    if (!fine_since_) fine_since_ = now;
  } else {
    fine_since_.reset();
  }
  if (position_ == valve_position::open) {
    hold_reason_.clear();
    return std::nullopt;
  }
  // While the zone only waits for its first readings nothing is commanded.
  if (c.zone_band == band::unknown) return std::nullopt;
  // The supply is awaited at start: a never-commanded valve waits for it too.
  if (position_ == valve_position::unset && !c.supply_c && c.supply_awaiting) return std::nullopt;

  hold_reason_ = permissive_hold(c);
  if (held()) {
    if (position_ == valve_position::closed) return std::nullopt;
    // Never commanded: shut it rather than leave it as the plant has it (safety first).
    position_ = valve_position::closed;
    delay_reopen_ = false;  // it never carried water for us: no reopen delay
    return valve_decision{valve_position::unset, valve_position::closed, "start-up permissive: " + hold_reason_};
  }

  if (position_ == valve_position::unset) {
    position_ = valve_position::open;
    return valve_decision{valve_position::unset, valve_position::open, "zone readings known, no reason to close"};
  }
  if (!delay_reopen_) {
    position_ = valve_position::open;
    delay_reopen_ = true;
    return valve_decision{valve_position::closed, valve_position::open, "start-up permissive met"};
  }
  if (fine_since_ && seconds_between(*fine_since_, now) >= rules_.reopen_after_s) {
    position_ = valve_position::open;
    char buf[96];
    std::snprintf(buf, sizeof buf, c.has_window ? "zone %s, window closed for %.0f s" : "zone %s for %.0f s",
                  band_name(c.zone_band), rules_.reopen_after_s);
    return valve_decision{valve_position::closed, valve_position::open, buf};
  }
  return std::nullopt;
}

}  // namespace dewmargin
