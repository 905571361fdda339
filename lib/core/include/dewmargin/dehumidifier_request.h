#pragma once
// Rule: a dehumidifier is asked for a supply-air dew point of the coldest reference among
// its zones (each zone's coldest fresh surface, else its loop's supply temperature) minus
// offset_k, within min_c..max_c; with no reference known it asks for min_c (the driest
// air). The request is republished (retained) when it moves by k_dehumidify_step_k.
#include <optional>
#include <string>
#include <vector>

#include "dewmargin/config.h"

namespace dewmargin {

inline constexpr double k_dehumidify_step_k = 0.1;

struct zone_reference {
  const std::string* zone = nullptr;  // its id
  std::optional<double> surface_min_c;
  std::optional<double> supply_c;
};

struct dehumidifier_request {
  double request_c = 0.0;
  std::string reason;
};

dehumidifier_request compute_dehumidifier_request(const std::vector<zone_reference>& zones,
                                                  const dew_point_request_config& cfg);

// True when `request_c` differs enough from what the plant was last told to tell it again.
bool dehumidifier_request_moved(std::optional<double> published_c, double request_c);

}  // namespace dewmargin
