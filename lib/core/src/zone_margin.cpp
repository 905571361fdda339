#include "dewmargin/zone_margin.h"

#include "dewmargin/psychro.h"

namespace dewmargin {
namespace {

// The highest dew point over the humidity inputs; `error` keeps the last failure.
void highest_dew_point(const zone_readings& r, zone_margin& m, std::string& error, bool& all_faulted) {
  all_faulted = true;
  for (const margin_input& h : r.humidity_pct) {
    if (!h.faulted) all_faulted = false;
    if (!h.value || !m.air_temp_c) continue;
    const auto dp = psychro::dew_point_c(*m.air_temp_c, *h.value);
    if (!dp) {
      error = dp.err().message;
      continue;
    }
    if (!m.dew_point_c || dp.value() > *m.dew_point_c) {
      m.dew_point_c = dp.value();
      m.rh_pct = h.value;
    }
  }
  if (!m.rh_pct && !r.humidity_pct.empty()) m.rh_pct = r.humidity_pct.front().value;
}

std::string unknown_reason(const zone_readings& r, const zone_margin& m, const std::string& dew_point_error) {
  if (m.margin_k) return {};
  if (r.waiting) return "waiting for the first readings";
  if (!m.air_temp_c) return std::string("air temperature ") + r.air_temp_c.status;
  if (!m.dew_point_c) return dew_point_error.empty() ? "no fresh humidity reading" : dew_point_error;
  return "no fresh surface or supply temperature";
}

}  // namespace

zone_margin compute_zone_margin(const zone_readings& r) {
  zone_margin m;
  m.air_temp_c = r.air_temp_c.value;
  std::string dew_point_error;
  bool humidity_faulted = true;
  highest_dew_point(r, m, dew_point_error, humidity_faulted);

  for (const margin_input& s : r.surfaces_c) {
    if (s.value && (!m.surface_min_c || *s.value < *m.surface_min_c)) m.surface_min_c = s.value;
  }
  m.supply_c = r.supply_c.value;
  const std::optional<double> fallback_c = r.supply_allowed ? m.supply_c : std::nullopt;
  const std::optional<double> reference_c = m.surface_min_c ? m.surface_min_c : fallback_c;
  m.margin_source = m.surface_min_c ? "surface" : (fallback_c ? "supply" : nullptr);
  if (reference_c && m.dew_point_c && !r.waiting) m.margin_k = *reference_c - *m.dew_point_c;

  // Unknown because of a fault, or only because the first readings have not come yet?
  const bool reference_faulted = !reference_c && (!r.supply_allowed || !r.supply_awaiting);
  m.unknown_is_fault =
      !r.waiting && !m.margin_k &&
      (r.air_temp_c.faulted || (humidity_faulted && !m.dew_point_c) || reference_faulted || !dew_point_error.empty());
  m.unknown_reason = unknown_reason(r, m, dew_point_error);
  return m;
}

}  // namespace dewmargin
