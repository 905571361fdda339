#include "dewmargin/water_properties.h"

#include <array>
#include <cmath>
#include <cstddef>
#include <cstdio>
#include <string>

namespace dewmargin::water {
namespace {

result<double> check_water_temp(double t_c) {
  if (!std::isfinite(t_c)) return make_error(error_code::not_finite, "water temperature is not a finite number");
  if (t_c < k_min_water_temp_c || t_c > k_max_water_temp_c) {
    char buf[128];
    std::snprintf(buf, sizeof buf, "water temperature %g °C is outside the valid range 0 to 60 °C", t_c);
    return make_error(error_code::out_of_range, buf);
  }
  return t_c;
}

// c_p of liquid water at 0.1 MPa, 0, 5, … 60 °C [kJ/(kg·K)]: the IAPWS-95 formulation (IAPWS R6-95)
// evaluated with the iapws package 1.5.2 (Debian python3-iapws, class IAPWS95), rounded to 4 decimals.
// Linear interpolation between these points stays within 0.02 % of IAPWS-95 (the worst bend is
// near 0 °C); tests/unit/test_water_properties.cpp measures it at the midpoints.
constexpr double k_cp_step_k = 5.0;
constexpr std::array<double, 13> k_cp_kj_kg_k{4.2195, 4.2050, 4.1952, 4.1885, 4.1841, 4.1813, 4.1798,
                                              4.1793, 4.1794, 4.1801, 4.1813, 4.1830, 4.1850};
static_assert((k_max_water_temp_c - k_min_water_temp_c) / k_cp_step_k + 1.0 == k_cp_kj_kg_k.size(),
              "c_p table must cover 0 to 60 °C in 5 K steps");

}  // namespace

result<double> density_kg_m3(double t_c) {
  auto t = check_water_temp(t_c);
  if (!t) return t.err();
  // Kell (1975), the 0-150 °C equation at 1 atm; coefficients written from memory and held to
  // IAPWS-95 by tests/unit/test_water_properties.cpp (measured within 4 ppm). Kell used IPTS-68;
  // its difference from ITS-90 is under 0.01 K here (from memory), far below what matters.
  const double numerator =
      999.83952 +
      t_c * (16.945176 + t_c * (-7.9870401e-3 + t_c * (-46.170461e-6 + t_c * (105.56302e-9 + t_c * -280.54253e-12))));
  return numerator / (1.0 + 16.879850e-3 * t_c);
}

result<double> specific_heat_kj_kg_k(double t_c) {
  auto t = check_water_temp(t_c);
  if (!t) return t.err();
  const double position = (t_c - k_min_water_temp_c) / k_cp_step_k;
  const auto lower = static_cast<std::size_t>(std::floor(position));
  if (lower + 1 >= k_cp_kj_kg_k.size()) return k_cp_kj_kg_k.back();  // exactly 60 °C
  const double fraction = position - static_cast<double>(lower);
  return k_cp_kj_kg_k[lower] + fraction * (k_cp_kj_kg_k[lower + 1] - k_cp_kj_kg_k[lower]);
}

}  // namespace dewmargin::water
