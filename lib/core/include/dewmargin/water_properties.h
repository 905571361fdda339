#pragma once
// Properties of liquid water near atmospheric pressure (about 0.1 MPa), 0 … 60 °C: the range a
// chilled-water or radiant cooling loop runs in. Outside it, or for a non-finite temperature,
// the functions return an error rather than extrapolate.
#include "dewmargin/result.h"

namespace dewmargin::water {

inline constexpr double k_min_water_temp_c = 0.0;
inline constexpr double k_max_water_temp_c = 60.0;

// Density [kg/m³] at 101.325 kPa by Kell (1975), J. Chem. Eng. Data 20(1), 97-105: the
// fifth-order rational polynomial for air-free water at one standard atmosphere.
result<double> density_kg_m3(double t_c);

// Isobaric specific heat capacity c_p [kJ/(kg·K)] at 0.1 MPa: IAPWS-95 values in 5 K steps,
// linearly interpolated.
result<double> specific_heat_kj_kg_k(double t_c);

}  // namespace dewmargin::water
