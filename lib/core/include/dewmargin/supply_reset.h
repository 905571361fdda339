#pragma once
// Supply-water temperature reset of one loop:
//   target = clamp(highest dew point of the loop's open zones + reset_margin_k, min_c, max_c)
// The setpoint rises to a higher target at once and falls no faster than fall_k_per_min.
// Any counted zone whose dew point is unknown drives the target to max_c (fail safe).
#include <optional>
#include <string>

#include "dewmargin/config.h"
#include "dewmargin/timestamp.h"

namespace dewmargin {

enum class setpoint_limit { none, min, max, rate };
const char* setpoint_limit_name(setpoint_limit l);

// What the loop's counted zones demand right now.
struct reset_demand {
  std::optional<double> max_dew_point_c;  // highest known dew point among counted zones
  std::string governing_zone;             // the zone with that dew point, or the unknown one
  bool dew_point_unknown = false;         // a counted zone has no dew point
  bool no_counted_zone = false;           // every zone's valve is closed
};

struct reset_target {
  double target_c;
  setpoint_limit limited;
  std::string reason;
};

reset_target compute_reset_target(const reset_demand& demand, const setpoint_config& cfg);

class supply_reset {
 public:
  supply_reset(const setpoint_config& cfg, double initial_c) : cfg_(cfg), setpoint_c_(initial_c) {}

  // Moves the setpoint towards the demand's target at `now` and returns true when the
  // setpoint value or its limit changed.
  bool update(const reset_demand& demand, timestamp now);

  // Raises at once when a single zone's demand is above the setpoint (O(1) on the
  // reading path); falls are left to update().
  bool raise_for(double dew_point_c, const std::string& zone, timestamp now);
  bool raise_to_max(const std::string& unknown_zone, timestamp now);

  [[nodiscard]] double setpoint_c() const { return setpoint_c_; }
  [[nodiscard]] setpoint_limit limited() const { return limited_; }
  [[nodiscard]] const std::string& reason() const { return reason_; }
  // The zone whose dew point sets the target (or whose unknown dew point drives it to max_c);
  // empty with no counted zone.
  [[nodiscard]] const std::string& governing_zone() const { return governing_zone_; }
  void restore(double setpoint_c) { setpoint_c_ = setpoint_c; }

 private:
  setpoint_config cfg_;
  double setpoint_c_;
  setpoint_limit limited_ = setpoint_limit::max;
  std::string reason_ = "starting: no readings yet";
  std::string governing_zone_;
  std::optional<timestamp> last_update_;
};

}  // namespace dewmargin
