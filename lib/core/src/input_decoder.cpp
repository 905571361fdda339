#include "dewmargin/input_decoder.h"

#include <cctype>
#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <nlohmann/json.hpp>

#include "dewmargin/json_dump.h"
#include "dewmargin/psychro.h"
#include "dewmargin/safe_text.h"
#include "dewmargin/units.h"

namespace dewmargin {
namespace {

std::string_view trim(std::string_view s) {
  while (!s.empty() && std::isspace(static_cast<unsigned char>(s.front()))) s.remove_prefix(1);
  while (!s.empty() && std::isspace(static_cast<unsigned char>(s.back()))) s.remove_suffix(1);
  return s;
}

// Payloads are outside text: quoted only as a short, printable, valid UTF-8 excerpt.
std::string excerpt(std::string_view s) {
  constexpr std::size_t k_max_bytes = 40;
  return text_excerpt(s, k_max_bytes);
}

result<double> parse_bare_number(std::string_view text) {
  const std::string_view t = trim(text);
  if (t.empty()) return make_error(error_code::parse_error, "empty payload");
  const std::string buf(t);
  errno = 0;
  char* end = nullptr;
  const double v = std::strtod(buf.c_str(), &end);
  if (end != buf.c_str() + buf.size()) {
    return make_error(error_code::parse_error, "payload '" + excerpt(t) + "' is not a number");
  }
  if (errno == ERANGE || !std::isfinite(v)) {
    return make_error(error_code::not_finite, "payload '" + excerpt(t) + "' is not a finite number");
  }
  // strtod also reads hexadecimal ("0x15" = 21): no sensor means that, and JSON has no such numbers.
  if (t.find_first_not_of("0123456789+-.eE") != std::string_view::npos) {
    return make_error(error_code::parse_error, "payload '" + excerpt(t) + "' is not a number");
  }
  return v;
}

// Reads the value at `field` (a JSON pointer) of a JSON payload.
result<nlohmann::json> json_field(std::string_view payload, const std::string& field) {
  nlohmann::json doc = nlohmann::json::parse(payload.begin(), payload.end(), nullptr, false);
  if (doc.is_discarded()) return make_error(error_code::parse_error, "payload is not valid JSON");
  try {
    const nlohmann::json::json_pointer ptr(field);
    if (!doc.contains(ptr)) return make_error(error_code::parse_error, "JSON payload has no field " + field);
    return doc.at(ptr);
  } catch (const nlohmann::json::exception&) {
    return make_error(error_code::parse_error, "JSON payload has no field " + field);
  }
}

double to_core_units(double v, input_unit unit) {
  switch (unit) {
    case input_unit::fahrenheit:
      return units::fahrenheit_to_celsius(v);
    case input_unit::fraction:
      return v * 100.0;
    case input_unit::cubic_metres_per_hour:
      return units::cubic_metres_per_hour_to_litres_per_second(v);
    case input_unit::us_gallons_per_minute:
      return units::us_gpm_to_litres_per_second(v);
    case input_unit::none:
    case input_unit::celsius:
    case input_unit::percent:
    case input_unit::litres_per_second:
      return v;
  }
  return v;
}

std::string lower(std::string_view s) {
  std::string out(s);
  for (char& c : out) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return out;
}

std::string word_list(const std::vector<std::string>& words) {
  std::string out;
  for (const auto& w : words) out += (out.empty() ? "" : ", ") + excerpt(w);
  return out;
}

std::string format_range(const char* what, double v, const value_range& r, const char* unit) {
  char buf[160];
  std::snprintf(buf, sizeof buf, "%s %.2f %s is outside the plausible range %.1f to %.1f %s", what, v, unit, r.min,
                r.max, unit);
  return buf;
}

}  // namespace

bool matches_switch_word(std::string_view text, const std::vector<std::string>& words) {
  const std::string needle = lower(trim(text));
  const auto number = parse_bare_number(needle);
  for (const auto& w : words) {
    if (lower(trim(w)) == needle) return true;
    if (number) {
      const auto word_number = parse_bare_number(w);
      if (word_number && word_number.value() == number.value()) return true;
    }
  }
  return false;
}

const char* input_kind_name(input_kind k) {
  switch (k) {
    case input_kind::air_temp:
      return "air_temp";
    case input_kind::humidity:
      return "humidity";
    case input_kind::surface:
      return "surface";
    case input_kind::supply_temp:
      return "supply_temp";
    case input_kind::return_temp:
      return "return_temp";
    case input_kind::flow:
      return "flow";
    case input_kind::condensation_switch:
      return "condensation_switch";
    case input_kind::window_contact:
      return "window_contact";
    case input_kind::unit_fault:
      return "fault";
    case input_kind::supply_dew_point:
      return "supply_dew_point";
  }
  return "input";
}

result<double> decode_number(std::string_view payload, const input_config& cfg, input_kind /*kind*/) {
  double raw = 0.0;
  if (cfg.field.empty()) {
    auto v = parse_bare_number(payload);
    if (!v) return v.err();
    raw = v.value();
  } else {
    auto f = json_field(payload, cfg.field);
    if (!f) return f.err();
    const nlohmann::json& j = f.value();
    if (j.is_number()) {
      raw = j.get<double>();
    } else if (j.is_string()) {
      // Some gateways send numbers as strings: accept a string that is a number throughout.
      auto v = parse_bare_number(j.get_ref<const std::string&>());
      if (!v) return make_error(v.err().code, "field " + cfg.field + ": " + v.err().message);
      raw = v.value();
    } else {
      return make_error(error_code::parse_error, "field " + cfg.field + " is not a number");
    }
    if (!std::isfinite(raw)) return make_error(error_code::not_finite, "field " + cfg.field + " is not finite");
  }
  return to_core_units(raw, cfg.unit);
}

result<bool> decode_switch(std::string_view payload, const input_config& cfg) {
  std::string text;
  if (cfg.field.empty()) {
    text = std::string(trim(payload));
  } else {
    auto f = json_field(payload, cfg.field);
    if (!f) return f.err();
    const nlohmann::json& j = f.value();
    if (j.is_string()) {
      text = j.get<std::string>();
    } else if (j.is_boolean() || j.is_number()) {
      text = json_dump(j);
    } else {
      return make_error(error_code::parse_error, "field " + cfg.field + " is not a string, number or boolean");
    }
  }
  if (trim(text).empty()) return make_error(error_code::parse_error, "empty payload");
  if (matches_switch_word(text, cfg.active)) return true;
  const std::vector<std::string> inactive = inactive_payloads(cfg);
  if (matches_switch_word(text, inactive)) return false;
  return make_error(error_code::parse_error, "payload '" + excerpt(trim(text)) + "' is neither active (" +
                                                 word_list(cfg.active) + ") nor inactive (" + word_list(inactive) +
                                                 ")");
}

const std::vector<std::string>& default_inactive_payloads() {
  // Common practice, no source: the words and numbers devices send for "dry", "closed"
  // or "off". The simulator's "dry" and "closed" are among them.
  static const std::vector<std::string> k_words{"0", "false", "off", "no", "dry", "closed", "normal"};
  return k_words;
}

std::vector<std::string> inactive_payloads(const input_config& cfg) {
  if (!cfg.inactive.empty()) return cfg.inactive;
  std::vector<std::string> out;
  for (const auto& w : default_inactive_payloads()) {
    if (!matches_switch_word(w, cfg.active)) out.push_back(w);
  }
  return out;
}

result<double> check_plausible(double v, input_kind kind, const plausibility_config& p) {
  switch (kind) {
    case input_kind::air_temp:
      if (v < p.air_temp_c.min || v > p.air_temp_c.max) {
        return make_error(error_code::out_of_range, format_range("air temperature", v, p.air_temp_c, "°C"));
      }
      break;
    case input_kind::supply_dew_point:  // a dew point lies within the air temperatures
      if (v < p.air_temp_c.min || v > p.air_temp_c.max) {
        return make_error(error_code::out_of_range, format_range("supply-air dew point", v, p.air_temp_c, "°C"));
      }
      break;
    case input_kind::surface:
      if (v < p.surface_c.min || v > p.surface_c.max) {
        return make_error(error_code::out_of_range, format_range("surface temperature", v, p.surface_c, "°C"));
      }
      break;
    case input_kind::supply_temp:
    case input_kind::return_temp:
      if (v < p.water_c.min || v > p.water_c.max) {
        return make_error(error_code::out_of_range, format_range("water temperature", v, p.water_c, "°C"));
      }
      break;
    case input_kind::humidity: {
      if (v < p.humidity_pct.min || v > p.humidity_pct.max) {
        return make_error(error_code::out_of_range, format_range("relative humidity", v, p.humidity_pct, "%"));
      }
      auto rh = psychro::normalise_rh_pct(v);  // (0, 100], overshoot clamped
      if (!rh) return rh.err();
      return rh.value();
    }
    case input_kind::flow:
      if (v < p.flow_l_s.min || v > p.flow_l_s.max) {
        return make_error(error_code::out_of_range, format_range("flow", v, p.flow_l_s, "L/s"));
      }
      break;
    case input_kind::condensation_switch:
    case input_kind::window_contact:
    case input_kind::unit_fault:
      break;
  }
  return v;
}

}  // namespace dewmargin
