#pragma once
// The kind of a bad reading. An input raises one `input` event per change of its state or
// of this kind, never one per bad message: 5,000 different out-of-range values are one
// fault (`out_of_range`), counted, with the first message's reason kept in the event.
#include <optional>

#include "dewmargin/result.h"

namespace dewmargin {

enum class input_fault {
  empty,          // nothing but blanks
  not_json,       // the input reads a JSON field and the payload is not JSON
  missing_field,  // JSON without the configured field
  wrong_type,     // the field holds an object, array or null
  not_a_number,   // text where a number belongs
  not_finite,     // NaN, infinity, or too large for a double
  unknown_word,   // a switch payload that is neither an active nor a known inactive word
  out_of_range,   // outside the plausible range of its kind
  out_of_order,   // older than the input's last reading
  too_large,      // over k_max_input_payload_bytes, not read
  undecodable,    // any other decoding failure
};

const char* input_fault_name(input_fault f);

// The fault behind an error of decode_number / decode_switch (input_decoder.h). The
// decoder reports an error_code and a message; the finer kinds are read from its
// wording, which tests/unit/test_input_fault.cpp pins against the real decoder.
input_fault classify_decode_error(const error& e);

}  // namespace dewmargin
