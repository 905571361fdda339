#pragma once
// The JSON objects the service publishes (design.md "Topics it publishes"), built
// without exposing the JSON library in headers. Numbers are rounded to 0.01; absent
// values are null; `ts` is ISO 8601 UTC.
#include <memory>
#include <optional>
#include <string>

#include "dewmargin/engine_output.h"
#include "dewmargin/timestamp.h"
#include "dewmargin/zone_alarm.h"

namespace dewmargin {

// Builds one event object: {"ts","site",<subject>: id,"kind","from","to", ...extras}.
class event_json {
 public:
  event_json(const std::string& site, timestamp ts, subject_type subject, const std::string& subject_id,
             const std::string& kind);
  ~event_json();
  event_json(const event_json&) = delete;
  event_json& operator=(const event_json&) = delete;

  event_json& text(const char* key, const std::string& value);
  event_json& text_or_null(const char* key, const std::string& value);  // "" → null
  event_json& number(const char* key, std::optional<double> value);     // rounded, null when empty
  event_json& integer(const char* key, long long value);
  event_json& null(const char* key);
  event_json& alarm(const alarm_status& a);

  [[nodiscard]] std::string dump() const;

 private:
  struct impl;
  std::unique_ptr<impl> impl_;
};

struct zone_state_view {
  std::string site;
  std::string zone;
  timestamp ts;
  const char* band;
  std::optional<double> dew_point_c;
  std::optional<double> air_temp_c;
  std::optional<double> rh_pct;
  std::optional<double> surface_min_c;
  std::optional<double> supply_c;
  std::optional<double> margin_k;
  const char* margin_source;  // "surface", "supply" or nullptr
  const char* valve;          // "open", "closed" or nullptr (no valve / not yet commanded)
  alarm_status alarm;
  std::optional<double> minutes_to_condensation;
  const char* valve_hold = nullptr;      // why the start-up permissive keeps the valve shut, or nullptr
  const char* suppressed_by = nullptr;   // the dehumidifier whose fault suppresses tight/alarm, or nullptr
  std::optional<double> surface_rh_pct;  // the room air's RH at the coldest surface (mould criterion)
};

struct dehumidifier_state_view {
  std::string site;
  std::string dehumidifier;
  timestamp ts;
  std::optional<double> request_c;
  std::optional<double> supply_dew_point_c;
  bool fault = false;
  std::string reason;  // why in fault, empty when not
  alarm_status alarm;
};
std::string format_dehumidifier_state(const dehumidifier_state_view& v);
std::string format_zone_state(const zone_state_view& v);

struct loop_state_view {
  std::string site;
  std::string loop;
  timestamp ts;
  double setpoint_c;
  std::optional<double> supply_c;
  std::optional<double> return_c;
  std::optional<double> flow_l_s;
  std::string reason;
  const char* limited;
  std::optional<double> cooling_kw;
};
std::string format_loop_state(const loop_state_view& v);

// A bare number as published to plant topics: rounded to 0.01, no exponent.
std::string format_bare_number(double v);

}  // namespace dewmargin
