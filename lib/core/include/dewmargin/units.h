#pragma once
// Unit conversions used at the edges: every value inside the core is SI-ish
// (°C, K, %, L/s, kPa).
namespace dewmargin::units {

constexpr double fahrenheit_to_celsius(double t_f) { return (t_f - 32.0) * 5.0 / 9.0; }
constexpr double celsius_to_fahrenheit(double t_c) { return t_c * 9.0 / 5.0 + 32.0; }
// Temperature differences: 1 K = 1.8 °F.
constexpr double kelvin_difference_to_fahrenheit(double dt_k) { return dt_k * 9.0 / 5.0; }
constexpr double fahrenheit_difference_to_kelvin(double dt_f) { return dt_f * 5.0 / 9.0; }

constexpr double k_litres_per_us_gallon = 3.785411784;  // exact by definition of the US gallon
constexpr double cubic_metres_per_hour_to_litres_per_second(double q_m3_h) { return q_m3_h * 1000.0 / 3600.0; }
constexpr double us_gpm_to_litres_per_second(double q_gpm) { return q_gpm * k_litres_per_us_gallon / 60.0; }

}  // namespace dewmargin::units

#include <cmath>

namespace dewmargin::units {
// Published numbers are rounded to 0.01 (design.md); -0.00 becomes 0.
inline double round_to_hundredths(double v) {
  const double r = std::round(v * 100.0) / 100.0;
  return r == 0.0 ? 0.0 : r;
}
}  // namespace dewmargin::units
