#pragma once
// Turns one MQTT payload into a value in the core's units (°C, %, L/s) or a switch
// state, by the input's config: a bare number, or a JSON document read at a JSON
// pointer; °F/fraction/m3/h/gpm converted; switches matched against `active`.
#include <string>
#include <string_view>

#include "dewmargin/config.h"
#include "dewmargin/result.h"

namespace dewmargin {

enum class input_kind { air_temp, humidity, surface, supply_temp, return_temp, flow, condensation_switch, window_contact };
const char* input_kind_name(input_kind k);
constexpr bool is_switch_kind(input_kind k) {
  return k == input_kind::condensation_switch || k == input_kind::window_contact;
}

// Numeric reading in core units. The error message names what was wrong, not the topic
// (the caller adds the topic).
result<double> decode_number(std::string_view payload, const input_config& cfg, input_kind kind);

// Switch reading: true when the payload (or its field) matches one of `active`,
// compared without regard to case or surrounding blanks.
result<bool> decode_switch(std::string_view payload, const input_config& cfg);

// Plausible range check for a decoded value of `kind`.
result<double> check_plausible(double value, input_kind kind, const plausibility_config& p);

}  // namespace dewmargin
