#pragma once
// Cooling output of a water loop from its flow and its supply and return temperatures.
#include "dewmargin/result.h"

namespace dewmargin {

// Q = ρ · V̇ · c_p · (T_return − T_supply)  [kW], with ρ and c_p of water at the mean of the two
// temperatures (dewmargin/water_properties.h). The sign is kept: positive when the loop takes heat
// out of the room (return warmer than supply, cooling), negative when the return is colder
// (the loop is heating). Zero flow gives 0 kW.
// Errors: not_finite for a NaN or infinite input; invalid_argument for a negative flow;
// out_of_range when the supply or return temperature is outside 0 … 60 °C (liquid water only).
result<double> loop_cooling_kw(double supply_c, double return_c, double flow_l_s);

}  // namespace dewmargin
