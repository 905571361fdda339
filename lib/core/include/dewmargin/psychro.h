#pragma once
// Psychrometrics of moist air over liquid water, by the Magnus formula.
//   e_s(T) = c · exp(a·T / (b + T))      [hPa, T in °C]
// Default coefficients: Sonntag (1990) as given in WMO-No. 8 (2018), Annex 4.B.
// Validity range used here: air temperature −45 … 60 °C (the WMO range for the formula over water).
#include "dewmargin/result.h"

namespace dewmargin::psychro {

struct magnus_coefficients {
  double c_hpa;  // saturation vapour pressure at 0 °C
  double a;      // dimensionless
  double b_c;    // °C
  const char* name;
};

// WMO-No. 8, Annex 4.B: e_w(t) = 6.112 exp(17.62 t / (243.12 + t)), over water.
inline constexpr magnus_coefficients k_sonntag_1990{6.112, 17.62, 243.12, "magnus-sonntag-1990"};
// Alduchov & Eskridge (1996), J. Appl. Meteor. 35, 601-609 ("AERK" over water).
inline constexpr magnus_coefficients k_alduchov_eskridge_1996{6.1094, 17.625, 243.04, "magnus-alduchov-eskridge-1996"};

inline constexpr double k_min_air_temp_c = -45.0;
inline constexpr double k_max_air_temp_c = 60.0;
inline constexpr double k_standard_pressure_kpa = 101.325;
// RH up to this value is sensor overshoot and is clamped to 100 % (common practice, no source).
inline constexpr double k_max_overshoot_rh_pct = 103.0;

// RH must lie in (0, 100]; 100 < RH <= 103 clamps to 100; anything else is an error.
result<double> normalise_rh_pct(double rh_pct);

// Saturation vapour pressure over water [hPa] at air temperature t_c.
result<double> saturation_vapour_pressure_hpa(double t_c, const magnus_coefficients& k = k_sonntag_1990);

// Dew point [°C] from air temperature [°C] and relative humidity [%]; never above t_c.
result<double> dew_point_c(double t_c, double rh_pct, const magnus_coefficients& k = k_sonntag_1990);

// Relative humidity [%] from air temperature and dew point. A dew point above the
// air temperature is an error (supersaturation is not a sensor state we accept).
result<double> relative_humidity_pct(double t_c, double dew_point_c,
                                     const magnus_coefficients& k = k_sonntag_1990);

// Dew point [°C] from the partial pressure of water vapour [hPa] (the inverse of Magnus).
result<double> dew_point_from_vapour_pressure_c(double e_hpa, const magnus_coefficients& k = k_sonntag_1990);

// Humidity ratio W [kg water / kg dry air] at total pressure p_kpa:
// W = 0.621945 · e / (p − e)  (ASHRAE Handbook—Fundamentals 2017, ch. 1, eq. 20).
result<double> humidity_ratio_kg_per_kg(double t_c, double rh_pct, double pressure_kpa = k_standard_pressure_kpa,
                                        const magnus_coefficients& k = k_sonntag_1990);

// Relative humidity [%] of the room air at a surface of temperature surface_c: the air's vapour
// pressure over the saturation pressure at the surface, RH_s = 100 · e(air) / e_s(surface) —
// the quantity of the mould criterion of EN ISO 13788 (as summarised in BS 5250, Annex D).
// A surface at or below the dew point gives 100 % (the air cannot hold more than saturation there).
// Errors: air or surface temperature outside −45 … 60 °C, RH outside (0, 103].
result<double> surface_rh_pct(double air_temp_c, double rh_pct, double surface_c,
                              const magnus_coefficients& k = k_sonntag_1990);

}  // namespace dewmargin::psychro
