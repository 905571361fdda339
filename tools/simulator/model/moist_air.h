#pragma once
// Simulator-only psychrometric helpers: humidity ratio <-> dew point at standard pressure,
// built on the project's Magnus functions (dewmargin/psychro.h). The room model balances
// moisture as a humidity ratio (a conserved mass ratio); the sensors and the ground truth
// need dew point and RH. Out-of-range values are model bugs, so these throw.
namespace dewmargin::sim {

// W = 0.621945 · e / (p − e), ASHRAE Handbook—Fundamentals 2017, ch. 1, eq. 20 (as in psychro.h).
inline constexpr double k_water_air_molar_mass_ratio = 0.621945;

// Humidity ratio [kg/kg dry air] of air whose dew point is dew_point_c, at 101.325 kPa.
double humidity_ratio_from_dew_point(double dew_point_c);

// Dew point [°C] of air with humidity ratio w_kg_kg, at 101.325 kPa.
double dew_point_from_humidity_ratio(double w_kg_kg);

// Relative humidity [%] of air at t_c with dew point dew_point_c; 100 when the dew point is at
// or above the air temperature (the model does not track fog).
double relative_humidity_pct(double t_c, double dew_point_c);

}  // namespace dewmargin::sim
