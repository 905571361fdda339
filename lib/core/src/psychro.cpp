#include "dewmargin/psychro.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <string>

namespace dewmargin::psychro {
namespace {

std::string format_value(const char* what, double v) {
  char buf[96];
  std::snprintf(buf, sizeof buf, "%s %g", what, v);
  return buf;
}

// The validity checks are split in a cheap predicate and the error it explains, so that the hot
// path (a valid reading: dew point per humidity reading, surface RH per zone evaluation) builds
// no result object for the check and calls nothing out of line.
bool air_temp_valid(double t_c) { return std::isfinite(t_c) && t_c >= k_min_air_temp_c && t_c <= k_max_air_temp_c; }

error air_temp_error(double t_c) {
  if (!std::isfinite(t_c)) return {error_code::not_finite, "air temperature is not a finite number"};
  return {error_code::out_of_range,
          format_value("air temperature", t_c) + " °C is outside the valid range -45 to 60 °C"};
}

result<double> check_air_temp(double t_c) {
  if (!air_temp_valid(t_c)) return air_temp_error(t_c);
  return t_c;
}

bool rh_valid(double rh_pct) { return std::isfinite(rh_pct) && rh_pct > 0.0 && rh_pct <= k_max_overshoot_rh_pct; }

error rh_error(double rh_pct) {
  if (!std::isfinite(rh_pct)) return {error_code::not_finite, "relative humidity is not a finite number"};
  return {error_code::out_of_range, format_value("relative humidity", rh_pct) + " % is outside (0, 100]"};
}

// Overshoot up to k_max_overshoot_rh_pct reads as saturation.
double clamp_rh(double rh_pct) { return rh_pct > 100.0 ? 100.0 : rh_pct; }

// e_s(T) by Magnus, for a temperature already checked.
double magnus_es_hpa(double t_c, const magnus_coefficients& k) { return k.c_hpa * std::exp(k.a * t_c / (k.b_c + t_c)); }

// ln(e/c) for the inverse; shared by the two dew-point functions.
double magnus_inverse_c(double ln_ratio, const magnus_coefficients& k) { return k.b_c * ln_ratio / (k.a - ln_ratio); }

}  // namespace

result<double> normalise_rh_pct(double rh_pct) {
  if (!rh_valid(rh_pct)) return rh_error(rh_pct);
  return clamp_rh(rh_pct);
}

result<double> saturation_vapour_pressure_hpa(double t_c, const magnus_coefficients& k) {
  if (!air_temp_valid(t_c)) return air_temp_error(t_c);
  return magnus_es_hpa(t_c, k);
}

result<double> dew_point_c(double t_c, double rh_pct, const magnus_coefficients& k) {
  if (!air_temp_valid(t_c)) return air_temp_error(t_c);
  if (!rh_valid(rh_pct)) return rh_error(rh_pct);
  // ln(e/c) = ln(RH/100) + a·T/(b+T): avoids computing e_s and dividing it out again.
  const double ln_ratio = std::log(clamp_rh(rh_pct) / 100.0) + k.a * t_c / (k.b_c + t_c);
  // At 100 % the inverse can land one rounding step above T, which relative_humidity_pct (and
  // any margin built on it) would treat as supersaturation: the dew point never exceeds T.
  return std::min(magnus_inverse_c(ln_ratio, k), t_c);
}

result<double> relative_humidity_pct(double t_c, double dew_point_c, const magnus_coefficients& k) {
  auto t = check_air_temp(t_c);
  if (!t) return t.err();
  if (!std::isfinite(dew_point_c)) return make_error(error_code::not_finite, "dew point is not a finite number");
  if (dew_point_c > t_c) {
    return make_error(error_code::invalid_argument, format_value("dew point", dew_point_c) +
                                                        format_value(" °C is above the air temperature", t_c) + " °C");
  }
  // Below the validity range the formula is not trusted; report rather than extrapolate.
  if (dew_point_c < k_min_air_temp_c) {
    return make_error(error_code::out_of_range,
                      format_value("dew point", dew_point_c) + " °C is below the valid range (-45 °C)");
  }
  const double rh = 100.0 * std::exp(k.a * dew_point_c / (k.b_c + dew_point_c) - k.a * t_c / (k.b_c + t_c));
  return rh;
}

result<double> dew_point_from_vapour_pressure_c(double e_hpa, const magnus_coefficients& k) {
  if (!std::isfinite(e_hpa)) return make_error(error_code::not_finite, "vapour pressure is not a finite number");
  if (e_hpa <= 0.0) {
    return make_error(error_code::invalid_argument, format_value("vapour pressure", e_hpa) + " hPa must be above 0");
  }
  const double td = magnus_inverse_c(std::log(e_hpa / k.c_hpa), k);
  if (!std::isfinite(td) || td < k_min_air_temp_c || td > k_max_air_temp_c) {
    return make_error(error_code::out_of_range,
                      format_value("vapour pressure", e_hpa) + " hPa gives a dew point outside -45 to 60 °C");
  }
  return td;
}

result<double> humidity_ratio_kg_per_kg(double t_c, double rh_pct, double pressure_kpa, const magnus_coefficients& k) {
  if (!std::isfinite(pressure_kpa)) return make_error(error_code::not_finite, "pressure is not a finite number");
  if (pressure_kpa <= 0.0) {
    return make_error(error_code::invalid_argument, format_value("pressure", pressure_kpa) + " kPa must be above 0");
  }
  auto es = saturation_vapour_pressure_hpa(t_c, k);
  if (!es) return es.err();
  auto rh = normalise_rh_pct(rh_pct);
  if (!rh) return rh.err();
  const double e_kpa = es.value() * rh.value() / 100.0 / 10.0;  // hPa → kPa
  if (e_kpa >= pressure_kpa) {
    return make_error(error_code::invalid_argument, "vapour pressure is not below the total pressure");
  }
  return 0.621945 * e_kpa / (pressure_kpa - e_kpa);
}

result<double> surface_rh_pct(double air_temp_c, double rh_pct, double surface_c, const magnus_coefficients& k) {
  if (!rh_valid(rh_pct)) return rh_error(rh_pct);
  if (!air_temp_valid(air_temp_c)) return air_temp_error(air_temp_c);
  if (!std::isfinite(surface_c))
    return make_error(error_code::not_finite, "surface temperature is not a finite number");
  if (surface_c < k_min_air_temp_c || surface_c > k_max_air_temp_c) {
    return make_error(error_code::out_of_range,
                      format_value("surface temperature", surface_c) + " °C is outside the valid range -45 to 60 °C");
  }
  const double es_surface = magnus_es_hpa(surface_c, k);
  return std::min(100.0, 100.0 * (clamp_rh(rh_pct) / 100.0 * magnus_es_hpa(air_temp_c, k)) / es_surface);
}

}  // namespace dewmargin::psychro
