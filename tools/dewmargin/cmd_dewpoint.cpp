// `dewmargin dewpoint`: one-off psychrometric calculation.
#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <nlohmann/json.hpp>
#include <ostream>

#include "commands.h"
#include "dewmargin/json_dump.h"
#include "dewmargin/psychro.h"
#include "dewmargin/units.h"

namespace dewmargin::cli {
namespace {

// Whole-string number parse: "24", "-3.5", "1e1"; rejects "abc", "24C", "", "nan".
bool parse_number(const std::string& text, double& out) {
  if (text.empty()) return false;
  errno = 0;
  char* end = nullptr;
  const double v = std::strtod(text.c_str(), &end);
  if (end != text.c_str() + text.size() || errno == ERANGE || !std::isfinite(v)) return false;
  out = v;
  return true;
}

}  // namespace

int run_dewpoint(const dewpoint_options& o, std::ostream& out, std::ostream& err) {
  double temp = 0.0;
  double rh = 0.0;
  if (!parse_number(o.temp_text, temp)) {
    err << "dewmargin dewpoint: --temp '" << o.temp_text << "' is not a number\n";
    return k_exit_usage;
  }
  if (!parse_number(o.rh_text, rh)) {
    err << "dewmargin dewpoint: --rh '" << o.rh_text << "' is not a number\n";
    return k_exit_usage;
  }
  const bool fahrenheit = o.unit == "F" || o.unit == "f";
  const double t_c = fahrenheit ? units::fahrenheit_to_celsius(temp) : temp;
  const auto& k = o.formula == "alduchov" ? psychro::k_alduchov_eskridge_1996 : psychro::k_sonntag_1990;

  const auto td = psychro::dew_point_c(t_c, rh, k);
  if (!td) {
    err << "dewmargin dewpoint: " << td.err().message << '\n';
    return k_exit_usage;
  }
  const auto w = psychro::humidity_ratio_kg_per_kg(t_c, rh, psychro::k_standard_pressure_kpa, k);
  if (!w) {
    err << "dewmargin dewpoint: " << w.err().message << '\n';
    return k_exit_usage;
  }
  const double rh_used = psychro::normalise_rh_pct(rh).value();
  const double w_g_per_kg = w.value() * 1000.0;

  if (o.json) {
    nlohmann::json j;
    j["air_temp_c"] = units::round_to_hundredths(t_c);
    j["rh_pct"] = units::round_to_hundredths(rh_used);
    j["dew_point_c"] = units::round_to_hundredths(td.value());
    if (fahrenheit) {
      j["air_temp_f"] = units::round_to_hundredths(temp);
      j["dew_point_f"] = units::round_to_hundredths(units::celsius_to_fahrenheit(td.value()));
    }
    j["humidity_ratio_g_per_kg"] = units::round_to_hundredths(w_g_per_kg);
    j["pressure_kpa"] = psychro::k_standard_pressure_kpa;
    j["formula"] = k.name;
    out << json_dump(j) << '\n';
    return k_exit_ok;
  }

  char line[160];
  if (fahrenheit) {
    std::snprintf(line, sizeof line, "air temperature    %.2f °F (%.2f °C)\n", temp, t_c);
    out << line;
  } else {
    std::snprintf(line, sizeof line, "air temperature    %.2f °C\n", t_c);
    out << line;
  }
  std::snprintf(line, sizeof line, "relative humidity  %.1f %%%s\n", rh_used, rh > 100.0 ? " (clamped from sensor overshoot)" : "");
  out << line;
  if (fahrenheit) {
    std::snprintf(line, sizeof line, "dew point          %.2f °F (%.2f °C)\n", units::celsius_to_fahrenheit(td.value()),
                  td.value());
  } else {
    std::snprintf(line, sizeof line, "dew point          %.2f °C\n", td.value());
  }
  out << line;
  std::snprintf(line, sizeof line, "humidity ratio     %.2f g/kg dry air at %.3f kPa\n", w_g_per_kg,
                psychro::k_standard_pressure_kpa);
  out << line;
  out << "formula            " << k.name << " (Magnus, over water)\n";
  return k_exit_ok;
}

}  // namespace dewmargin::cli
