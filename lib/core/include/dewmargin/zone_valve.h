#pragma once
// Rule: a zone's valve reopens only after the zone has stayed `safe` or `tight`, with its
// window closed, for reopen_after_s since the service closed it. It closes at once while
// the zone is condensing, while its window is open and while its inputs are unknown (a
// fault, not the wait for first readings); the `alarm` band neither closes nor reopens it.
// The first command after start opens a zone that is known and has no reason to be closed.
#include <optional>
#include <string>

#include "dewmargin/band.h"
#include "dewmargin/timestamp.h"

namespace dewmargin {

enum class valve_position { unset, open, closed };
const char* valve_position_name(valve_position p);  // "open", "closed", "" for unset

struct valve_conditions {
  band zone_band = band::unknown;
  bool unknown_is_fault = false;  // false while waiting for the first readings after start
  bool window_open = false;
  bool has_window = true;         // the zone has a window contact (only words the reason)
};

struct valve_decision {
  valve_position from;
  valve_position to;
  std::string reason;
};

class zone_valve {
 public:
  explicit zone_valve(double reopen_after_s) : reopen_after_s_(reopen_after_s) {}

  // A decision when the valve must move, else nothing.
  std::optional<valve_decision> update(const valve_conditions& c, timestamp now);

  [[nodiscard]] valve_position position() const { return position_; }
  [[nodiscard]] bool counts_as_open() const { return position_ != valve_position::closed; }
  void restore(valve_position p) { position_ = p; }
  // A reload: the position and the running reopen timer go on; the delay is the new config's.
  void carry_over(const zone_valve& previous) {
    position_ = previous.position_;
    fine_since_ = previous.fine_since_;
  }

 private:
  double reopen_after_s_;
  valve_position position_ = valve_position::unset;
  std::optional<timestamp> fine_since_;  // safe or tight, window closed, since
};

}  // namespace dewmargin
