#pragma once
// Turns one MQTT payload into a value in the core's units (°C, %, L/s) or a switch
// state, by the input's config: a bare number, or a JSON document read at a JSON
// pointer; °F/fraction/m3/h/gpm converted; switches matched against `active` and
// `inactive`. Error messages quote at most 40 bytes of the payload, made printable.
#include <string>
#include <string_view>
#include <vector>

#include "dewmargin/config.h"
#include "dewmargin/result.h"

namespace dewmargin {

enum class input_kind {
  air_temp,
  humidity,
  surface,
  supply_temp,
  return_temp,
  flow,
  condensation_switch,
  window_contact,
  unit_fault,        // a dehumidifier's fault switch
  supply_dew_point,  // a dehumidifier's measured supply-air dew point
};
const char* input_kind_name(input_kind k);
constexpr bool is_switch_kind(input_kind k) {
  return k == input_kind::condensation_switch || k == input_kind::window_contact || k == input_kind::unit_fault;
}

// Numeric reading in core units. The error message names what was wrong, not the topic
// (the caller adds the topic).
result<double> decode_number(std::string_view payload, const input_config& cfg, input_kind kind);

// Switch reading: true when the payload (or its field) matches one of `active`, false
// when it matches one of the inactive payloads, compared without regard to case or
// surrounding blanks, and numbers by value ("1.0" is "1"). Anything else is a bad
// reading: junk on a moisture switch must not read as "dry".
result<bool> decode_switch(std::string_view payload, const input_config& cfg);

// Does `payload` match one of `words`? Without regard to case or surrounding blanks;
// numbers by value, so that a JSON 1.0 (or a bare "1.0") counts as "1".
bool matches_switch_word(std::string_view payload, const std::vector<std::string>& words);

// The payloads that mean "inactive" when an input lists none of its own.
const std::vector<std::string>& default_inactive_payloads();
// The inactive payloads in force for `cfg`: its own `inactive` list, or the defaults
// without the words it lists as `active`.
std::vector<std::string> inactive_payloads(const input_config& cfg);

// Plausible range check for a decoded value of `kind`.
result<double> check_plausible(double value, input_kind kind, const plausibility_config& p);

}  // namespace dewmargin
