#include "dewmargin/zone_margin.h"

#include <algorithm>

#include "dewmargin/psychro.h"

namespace dewmargin {
namespace {

// The highest dew point over the humidity inputs; `error` keeps the last failure.
void highest_dew_point(const zone_readings& r, zone_margin& m, std::string& error, bool& all_faulted) {
  all_faulted = true;
  bool any_fresh = false;
  for (const margin_input& h : r.humidity_pct) {
    if (!h.faulted) all_faulted = false;
    if (h.value) any_fresh = true;
  }
  for (const margin_input& h : r.humidity_pct) {
    // A faulted input's last value still counts while another reports: losing the more humid
    // sensor must not lower the zone's dew point (and the loop's setpoint with it).
    const std::optional<double> rh = h.value ? h.value : (any_fresh && h.faulted ? h.last_value : std::nullopt);
    if (!rh || !m.air_temp_c) continue;
    const auto dp = psychro::dew_point_c(*m.air_temp_c, *rh);
    if (!dp) {
      error = dp.err().message;
      continue;
    }
    if (!m.dew_point_c || dp.value() > *m.dew_point_c) {
      m.dew_point_c = dp.value();
      m.rh_pct = rh;
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
  const bool supply_usable = r.supply_allowed && m.supply_c.has_value();
  const double supply_c = m.supply_c.value_or(0.0);
  bool have_reference = true;
  double reference_c = 0.0;
  if (m.surface_min_c) {
    reference_c = *m.surface_min_c;
    m.margin_source = "surface";
  } else if (supply_usable) {
    reference_c = supply_c;
    m.margin_source = "supply";
  } else {
    have_reference = false;
    m.margin_source = nullptr;
  }
  // One of several surfaces failed: the coldest may be the one no longer measured, so the
  // supply water (which no chilled surface is colder than) bounds the reference.
  const bool a_surface_faulted =
      std::any_of(r.surfaces_c.begin(), r.surfaces_c.end(), [](const margin_input& s) { return s.faulted; });
  if (have_reference && a_surface_faulted && supply_usable && supply_c < reference_c) {
    reference_c = supply_c;
    m.margin_source = "supply";
  }
  if (have_reference && m.dew_point_c && !r.waiting) m.margin_k = reference_c - *m.dew_point_c;

  // Unknown because of a fault, or only because the first readings have not come yet?
  const bool reference_faulted = !have_reference && (!r.supply_allowed || !r.supply_awaiting);
  m.unknown_is_fault =
      !r.waiting && !m.margin_k &&
      (r.air_temp_c.faulted || (humidity_faulted && !m.dew_point_c) || reference_faulted || !dew_point_error.empty());
  m.unknown_reason = unknown_reason(r, m, dew_point_error);
  return m;
}

}  // namespace dewmargin
