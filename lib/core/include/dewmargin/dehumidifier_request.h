#pragma once
// Rule: a dehumidifier is asked for a supply-air dew point by two parts.
//  - Feed-forward, the upper bound: the coldest reference among its zones (each zone's
//    coldest fresh surface, else its loop's supply temperature) minus offset_k, within
//    min_c..max_c; with no reference known, min_c (the driest air).
//  - Trim-and-respond (the reset method of ASHRAE Guideline 36): every step_s each of its
//    zones that is `tight` or worse (`unknown` only as a fault) or held by the valve's
//    start-up permissive is a request; with requests the dew point is lowered by respond_k
//    per request, at most max_step_k per step; with none it is raised by trim_k. The result
//    stays within min_c..max_c and never above the feed-forward.
// The request is republished (retained) when it moves by k_dehumidify_step_k.
#include <optional>
#include <string>
#include <vector>

#include "dewmargin/band.h"
#include "dewmargin/config.h"
#include "dewmargin/timestamp.h"

namespace dewmargin {

inline constexpr double k_dehumidify_step_k = 0.1;

struct zone_reference {
  const std::string* zone = nullptr;  // its id
  std::optional<double> surface_min_c;
  std::optional<double> supply_c{};
  // For trim-and-respond: the zone's band, margin, whether unknown is a fault, and whether the
  // valve's start-up permissive holds it.
  band zone_band = band::safe;
  std::optional<double> margin_k{};
  bool unknown_is_fault = false;
  bool held = false;
};

struct dehumidifier_request {
  double request_c = 0.0;
  std::string reason;
};

// The feed-forward alone.
dehumidifier_request compute_dehumidifier_request(const std::vector<zone_reference>& zones,
                                                  const dew_point_request_config& cfg);

// True when the zone asks for drier air (a trim-and-respond request).
bool zone_requests_drier_air(const zone_reference& z);

class dehumidifier_trim {
 public:
  // The request at `now`: the first call starts at the feed-forward; a trim-and-respond step
  // is taken when step_s has passed since the last; between steps the feed-forward still
  // bounds it from above at once.
  dehumidifier_request update(const std::vector<zone_reference>& zones, const dew_point_request_config& cfg,
                              timestamp now);

  [[nodiscard]] std::optional<double> request_c() const { return request_c_; }

 private:
  std::optional<double> request_c_;
  std::optional<timestamp> last_step_;
  std::string reason_;
};

// True when `request_c` differs enough from what the plant was last told to tell it again.
bool dehumidifier_request_moved(std::optional<double> published_c, double request_c);

}  // namespace dewmargin
