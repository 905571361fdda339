#include "model/moist_air.h"

#include <stdexcept>
#include <string>

#include "dewmargin/psychro.h"

namespace dewmargin::sim {
namespace {

double checked(const result<double>& r, const char* what) {
  if (!r) throw std::logic_error(std::string("simulator: ") + what + ": " + r.err().message);
  return r.value();
}

}  // namespace

double humidity_ratio_from_dew_point(double dew_point_c) {
  const double e_kpa = checked(psychro::saturation_vapour_pressure_hpa(dew_point_c), "dew point") / 10.0;
  return k_water_air_molar_mass_ratio * e_kpa / (psychro::k_standard_pressure_kpa - e_kpa);
}

double dew_point_from_humidity_ratio(double w_kg_kg) {
  if (!(w_kg_kg > 0.0)) throw std::logic_error("simulator: humidity ratio must be above 0");
  const double e_kpa = psychro::k_standard_pressure_kpa * w_kg_kg / (k_water_air_molar_mass_ratio + w_kg_kg);
  return checked(psychro::dew_point_from_vapour_pressure_c(e_kpa * 10.0), "humidity ratio");
}

double relative_humidity_pct(double t_c, double dew_point_c) {
  if (dew_point_c >= t_c) return 100.0;
  return checked(psychro::relative_humidity_pct(t_c, dew_point_c), "relative humidity");
}

}  // namespace dewmargin::sim
