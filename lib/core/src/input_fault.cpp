#include "dewmargin/input_fault.h"

#include <string_view>

namespace dewmargin {
namespace {

bool contains(std::string_view text, std::string_view part) { return text.find(part) != std::string_view::npos; }

}  // namespace

const char* input_fault_name(input_fault f) {
  switch (f) {
    case input_fault::empty:
      return "empty";
    case input_fault::not_json:
      return "not_json";
    case input_fault::missing_field:
      return "missing_field";
    case input_fault::wrong_type:
      return "wrong_type";
    case input_fault::not_a_number:
      return "not_a_number";
    case input_fault::not_finite:
      return "not_finite";
    case input_fault::unknown_word:
      return "unknown_word";
    case input_fault::out_of_range:
      return "out_of_range";
    case input_fault::out_of_order:
      return "out_of_order";
    case input_fault::too_large:
      return "too_large";
    case input_fault::undecodable:
      return "undecodable";
  }
  return "undecodable";
}

input_fault classify_decode_error(const error& e) {
  switch (e.code) {
    case error_code::not_finite:
      return input_fault::not_finite;
    case error_code::out_of_range:
    case error_code::invalid_argument:
      return input_fault::out_of_range;
    case error_code::parse_error:
      break;
  }
  const std::string_view m = e.message;
  if (contains(m, "not valid JSON")) return input_fault::not_json;
  if (contains(m, "has no field")) return input_fault::missing_field;
  if (contains(m, "empty payload")) return input_fault::empty;
  if (contains(m, "is not a number")) return input_fault::not_a_number;
  if (contains(m, "is not a string, number or boolean")) return input_fault::wrong_type;
  if (contains(m, "active") || contains(m, "inactive")) return input_fault::unknown_word;
  return input_fault::undecodable;
}

}  // namespace dewmargin
