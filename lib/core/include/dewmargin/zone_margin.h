#pragma once
// A zone's margin, computed from what its inputs say now (a pure function):
//   dew point  = the highest of the dew points from the air temperature and each humidity
//   reference  = the coldest fresh surface; without one, the loop's supply temperature
//                (unless the supply fallback is barred: a restored alarm, start-up grace)
// A failed sensor never improves the result: while one of several humidity inputs is faulted
// its last good value still counts for the highest dew point, and while one of several
// surfaces is faulted the supply temperature (colder than any chilled surface) bounds the
// reference. With all of them faulted there is no dew point (or surface) at all.
//   margin_k   = reference − dew point, empty while the zone waits for its first readings
// and, when there is no margin, whether that is a fault or only the wait, and why.
#include <optional>
#include <string>
#include <vector>

namespace dewmargin {

// One input as the margin sees it: its fresh value, if any, and whether its silence is a
// fault (stale, missing, bad) rather than the wait for a first reading.
struct margin_input {
  std::optional<double> value;
  std::optional<double> last_value;  // the last good value, fresh or not
  bool faulted = false;
  const char* status = "ok";  // input_status_name, for the reason text
};

struct zone_readings {
  margin_input air_temp_c;
  std::vector<margin_input> humidity_pct;  // at least one in a valid config
  std::vector<margin_input> surfaces_c;
  margin_input supply_c;
  bool supply_awaiting = false;  // the loop's supply has not reported since start
  bool supply_allowed = true;    // the supply may stand in for the surfaces
  bool waiting = false;          // some of the zone's own inputs have not reported yet
};

struct zone_margin {
  std::optional<double> air_temp_c;
  std::optional<double> rh_pct;  // of the humidity that gives the highest dew point
  std::optional<double> dew_point_c;
  std::optional<double> surface_min_c;
  std::optional<double> supply_c;
  std::optional<double> margin_k;
  const char* margin_source = nullptr;  // "surface", "supply" or nullptr
  bool unknown_is_fault = false;        // no margin, because of a fault (not the wait)
  std::string unknown_reason;           // why there is no margin
};

zone_margin compute_zone_margin(const zone_readings& r);

}  // namespace dewmargin
