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

bool zone_requests_drier_air(const zone_reference& z) {
  if (z.held) return true;
  switch (z.zone_band) {
    case band::tight:
    case band::alarm:
    case band::condensing:
      return true;
    case band::unknown:
      return z.unknown_is_fault;
    case band::safe:
      return false;
  }
  return false;
}

namespace {

// Worse band first, then the lower margin; a held zone ranks as `tight`.
int severity(const zone_reference& z) {
  if (z.zone_band == band::safe || z.zone_band == band::unknown) return z.held ? 1 : 0;
  return static_cast<int>(z.zone_band);
}

const zone_reference* governing_request(const std::vector<zone_reference>& zones) {
  const zone_reference* worst = nullptr;
  for (const zone_reference& z : zones) {
    if (!zone_requests_drier_air(z)) continue;
    if (!worst || severity(z) > severity(*worst) ||
        (severity(z) == severity(*worst) && z.margin_k && (!worst->margin_k || *z.margin_k < *worst->margin_k))) {
      worst = &z;
    }
  }
  return worst;
}

}  // namespace

dehumidifier_request dehumidifier_trim::update(const std::vector<zone_reference>& zones,
                                               const dew_point_request_config& cfg, timestamp now) {
  const dehumidifier_request feed_forward = compute_dehumidifier_request(zones, cfg);
  if (!request_c_) {
    request_c_ = feed_forward.request_c;
    last_step_ = now;
    reason_ = "feed-forward: " + feed_forward.reason;
    return {*request_c_, reason_};
  }
  double trimmed_c = *request_c_;
  bool stepped = false;
  if (seconds_between(*last_step_, now) >= cfg.step_s) {
    last_step_ = now;
    stepped = true;
    const long requests = std::count_if(zones.begin(), zones.end(), zone_requests_drier_air);
    char buf[200];
    if (requests > 0) {
      const double down_k = std::min(cfg.respond_k * static_cast<double>(requests), cfg.max_step_k);
      trimmed_c -= down_k;
      const zone_reference* worst = governing_request(zones);
      std::snprintf(buf, sizeof buf, "trim-and-respond: %ld request%s, worst %s (%s): -%.2f K", requests,
                    requests == 1 ? "" : "s", worst->zone->c_str(),
                    worst->held ? "held by the permissive" : band_name(worst->zone_band), down_k);
    } else {
      trimmed_c += cfg.trim_k;
      std::snprintf(buf, sizeof buf, "trim-and-respond: no requests: +%.2f K", cfg.trim_k);
    }
    reason_ = buf;
  }
  // The feed-forward bounds it from above at once, also between steps (never wetter air than
  // the coldest surface allows); the range bounds both ways.
  if (trimmed_c > feed_forward.request_c) {
    trimmed_c = feed_forward.request_c;
    if (stepped || *request_c_ > feed_forward.request_c) reason_ = "feed-forward bound: " + feed_forward.reason;
  }
  const double clamped_c = std::clamp(trimmed_c, cfg.min_c, cfg.max_c);
  if (clamped_c != trimmed_c && stepped) reason_ += clamped_c == cfg.min_c ? ", held at min" : ", held at max";
  request_c_ = clamped_c;
  return {*request_c_, reason_};
}

bool dehumidifier_request_moved(std::optional<double> published_c, double request_c) {
  constexpr double k_epsilon = 1e-9;
  return !published_c || std::fabs(request_c - *published_c) >= k_dehumidify_step_k - k_epsilon;
}

}  // namespace dewmargin
