#pragma once
// Rule: a zone's valve closes at once while the zone is condensing, while its window is
// open, while its inputs are unknown (a fault, not the wait for first readings), and ahead
// of condensation: when the margin is below margin_alarm_k and its trend reaches zero within
// close_ahead_min, or when the zone is in `alarm` while its loop's reset is already at max_c
// (the water can get no warmer). Otherwise the `alarm` band neither closes nor reopens it.
// A closed or never-opened valve opens only when the zone's dew point is at least
// open_margin_k below the loop's measured supply temperature (start-up permissive: a closed
// valve warms its surface, so only the supply says what the surface will approach once the
// water flows) and, after the service closed it for a reason above, once the zone has stayed
// `safe` or `tight`, window closed, for reopen_after_s. While only the permissive keeps it
// shut the valve is "held" (hold_reason()); a held zone wants drier air.
#include <optional>
#include <string>

#include "dewmargin/band.h"
#include "dewmargin/timestamp.h"

namespace dewmargin {

enum class valve_position { unset, open, closed };
const char* valve_position_name(valve_position p);  // "open", "closed", "" for unset

// The valve's configured rules (valve_config and the zone's thresholds).
struct valve_rules {
  double reopen_after_s = 600.0;
  double close_ahead_min = 5.0;
  double open_margin_k = 1.0;  // default: the zone's margin_alarm_k
  double margin_alarm_k = 1.0;
};

struct valve_conditions {
  band zone_band = band::unknown;
  bool unknown_is_fault = false;  // false while waiting for the first readings after start
  bool window_open = false;
  bool has_window = true;  // the zone has a window contact (only words the reason)
  // Close ahead: the margin now, the minutes its trend gives to zero, the loop's reset at max_c.
  std::optional<double> margin_k{};
  std::optional<double> minutes_to_condensation{};
  bool reset_at_limit = false;
  // The start-up permissive: the zone's dew point and its loop's measured supply temperature.
  std::optional<double> dew_point_c{};
  std::optional<double> supply_c{};
  bool supply_awaiting = false;  // the supply has not reported since start (no fault yet)
};

struct valve_decision {
  valve_position from;
  valve_position to;
  std::string reason;
};

class zone_valve {
 public:
  explicit zone_valve(const valve_rules& rules) : rules_(rules) {}

  // A decision when the valve must move, else nothing.
  std::optional<valve_decision> update(const valve_conditions& c, timestamp now);

  [[nodiscard]] valve_position position() const { return position_; }
  [[nodiscard]] bool counts_as_open() const { return position_ != valve_position::closed; }
  // Why the start-up permissive keeps the valve shut; empty when it does not.
  [[nodiscard]] const std::string& hold_reason() const { return hold_reason_; }
  [[nodiscard]] bool held() const { return !hold_reason_.empty(); }
  void restore(valve_position p) { position_ = p; }
  // A reload: the position and the running reopen timer go on; the rules are the new config's.
  void carry_over(const zone_valve& previous) {
    position_ = previous.position_;
    fine_since_ = previous.fine_since_;
    delay_reopen_ = previous.delay_reopen_;
    hold_reason_ = previous.hold_reason_;
  }

 private:
  [[nodiscard]] std::string close_reason(const valve_conditions& c) const;
  [[nodiscard]] std::string permissive_hold(const valve_conditions& c) const;

  valve_rules rules_;
  valve_position position_ = valve_position::unset;
  std::optional<timestamp> fine_since_;  // safe or tight, window closed, since
  bool delay_reopen_ = true;             // closed for a reason (not only by the permissive): reopen waits
  std::string hold_reason_;
};

}  // namespace dewmargin
