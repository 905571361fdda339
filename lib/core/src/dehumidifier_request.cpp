#include "dewmargin/dehumidifier_request.h"

#include <algorithm>
#include <cmath>
#include <cstdio>

namespace dewmargin {

dehumidifier_request compute_dehumidifier_request(const std::vector<zone_reference>& zones,
                                                  const dew_point_request_config& cfg) {
  std::optional<double> coldest_c;
  const std::string* governing = nullptr;
  const char* source = "";
  for (const zone_reference& z : zones) {
    const std::optional<double> ref = z.surface_min_c ? z.surface_min_c : z.supply_c;
    if (ref && (!coldest_c || *ref < *coldest_c)) {
      coldest_c = ref;
      governing = z.zone;
      source = z.surface_min_c ? "surface" : "supply";
    }
  }
  dehumidifier_request r;
  char reason[200];
  if (coldest_c) {
    r.request_c = std::clamp(*coldest_c - cfg.offset_k, cfg.min_c, cfg.max_c);
    std::snprintf(reason, sizeof reason, "coldest %s %.2f °C in %s - %.2f K", source, *coldest_c, governing->c_str(),
                  cfg.offset_k);
  } else {
    r.request_c = cfg.min_c;
    std::snprintf(reason, sizeof reason, "no surface or supply temperature known: driest request");
  }
  r.reason = reason;
  return r;
}

bool dehumidifier_request_moved(std::optional<double> published_c, double request_c) {
  constexpr double k_epsilon = 1e-9;
  return !published_c || std::fabs(request_c - *published_c) >= k_dehumidify_step_k - k_epsilon;
}

}  // namespace dewmargin
