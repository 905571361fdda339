#include "dewmargin/cooling_output.h"

#include <cmath>
#include <cstdio>
#include <string>

#include "dewmargin/water_properties.h"

namespace dewmargin {
namespace {

std::string describe(const char* what, double v, const char* unit) {
  char buf[128];
  std::snprintf(buf, sizeof buf, "%s %g %s", what, v, unit);
  return buf;
}

// Each temperature is checked on its own: a mean inside the range can hide an end outside it.
result<double> check_water_end(const char* what, double t_c) {
  if (!std::isfinite(t_c)) return make_error(error_code::not_finite, std::string(what) + " is not a finite number");
  if (t_c < water::k_min_water_temp_c || t_c > water::k_max_water_temp_c) {
    return make_error(error_code::out_of_range, describe(what, t_c, "°C is outside the valid range 0 to 60 °C"));
  }
  return t_c;
}

}  // namespace

result<double> loop_cooling_kw(double supply_c, double return_c, double flow_l_s) {
  if (auto s = check_water_end("supply temperature", supply_c); !s) return s.err();
  if (auto r = check_water_end("return temperature", return_c); !r) return r.err();
  if (!std::isfinite(flow_l_s)) return make_error(error_code::not_finite, "flow is not a finite number");
  if (flow_l_s < 0.0) return make_error(error_code::invalid_argument, describe("flow", flow_l_s, "L/s is negative"));
  if (flow_l_s == 0.0) return 0.0;  // no flow, no output (and no −0 from a negative ΔT)

  const double mean_c = 0.5 * (supply_c + return_c);
  auto rho = water::density_kg_m3(mean_c);
  if (!rho) return rho.err();
  auto cp = water::specific_heat_kj_kg_k(mean_c);
  if (!cp) return cp.err();
  const double mass_flow_kg_s = rho.value() * flow_l_s / 1000.0;  // L → m³
  return mass_flow_kg_s * cp.value() * (return_c - supply_c);     // kg/s · kJ/(kg·K) · K = kW
}

}  // namespace dewmargin
