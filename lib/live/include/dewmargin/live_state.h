#pragma once
// The retained state payloads of docs/interface.md (zone, loop, dehumidifier, status) as
// plain values for the live views. Parsing is lenient about what it does not know (fields
// added by later versions are ignored) and strict about what it shows: a field of the
// wrong type is an error that names the field, never a silent zero.
#include <optional>
#include <string>
#include <string_view>

#include "dewmargin/result.h"
#include "dewmargin/timestamp.h"

namespace dewmargin::live {

// Bands by severity, worst last, as docs/interface.md orders them. A band name this
// version does not know ranks with `unknown`: shown, and never taken for safe.
int band_severity(std::string_view band);
inline constexpr int k_band_count = 5;
// The known bands, best first: safe, tight, alarm, condensing, unknown.
const char* band_name(int severity);

// ISA-18.2 states of one alarm as an operator reads them.
enum class alarm_display {
  none,          // no alarm condition, nothing to acknowledge
  active,        // condition present, unacknowledged
  acknowledged,  // condition present, acknowledged
  latched,       // condition gone, still unacknowledged
  shelved,       // hidden by an operator until shelved_until
  suppressed,    // hidden by design (suppressed_by names the cause)
};
const char* alarm_display_name(alarm_display a);

struct alarm_view {
  bool active = false;
  bool acknowledged = true;
  std::optional<std::string> shelved_until;  // ISO 8601, as published
  std::optional<std::string> suppressed_by;  // when the state carries it
};
alarm_display display_of(const alarm_view& a);

struct zone_view {
  std::string site;
  std::string zone;
  std::optional<timestamp> ts;
  std::string band;
  std::optional<double> margin_k;
  std::optional<double> dew_point_c;
  std::optional<double> air_temp_c;
  std::optional<double> rh_pct;
  std::optional<double> surface_min_c;
  std::optional<double> surface_rh_pct;  // when the state carries it
  std::optional<double> supply_c;
  std::optional<double> minutes_to_condensation;
  std::string margin_source;  // surface, supply or empty
  std::string valve;          // open, closed or empty (no valve, not yet commanded)
  std::string valve_hold;     // why the valve is held, when the state says
  alarm_view alarm;
};

struct loop_view {
  std::string site;
  std::string loop;
  std::optional<timestamp> ts;
  std::optional<double> setpoint_c;
  std::optional<double> supply_c;
  std::optional<double> return_c;
  std::optional<double> flow_l_s;
  std::optional<double> cooling_kw;
  std::string limited;
  std::string reason;
};

struct dehumidifier_view {
  std::string site;
  std::string dehumidifier;
  std::optional<timestamp> ts;
  std::optional<double> request_c;           // the requested supply-air dew point
  std::optional<double> supply_dew_point_c;  // the unit's measured supply-air dew point
  bool fault = false;                        // the unit's alarm condition (fault switch or no delivery)
  alarm_view alarm;
};

struct status_view {
  std::string state;  // online, offline
  std::string site;
  std::string version;
  std::optional<timestamp> ts;
  std::string reason;
};

// Each returns a one-line error naming the field when the payload is not the object the
// topic promises (not JSON, not an object, the id missing, a field of the wrong type).
[[nodiscard]] result<zone_view> parse_zone_state(std::string_view payload);
[[nodiscard]] result<loop_view> parse_loop_state(std::string_view payload);
[[nodiscard]] result<dehumidifier_view> parse_dehumidifier_state(std::string_view payload);
[[nodiscard]] result<status_view> parse_status(std::string_view payload);

// An event of <prefix>/events in one line for an operator: "ack room-a by JK",
// "rejected: unknown zone 'x' (cmd/ack)". Empty when the payload is not an event.
struct event_summary {
  std::string kind;
  std::string zone;  // subject zone, when there is one
  std::string text;
};
[[nodiscard]] std::optional<event_summary> summarize_event(std::string_view payload);

}  // namespace dewmargin::live
