#pragma once
// The whole configuration as plain structs: what the YAML loader produces and the
// core consumes. Defaults here are the documented defaults of design.md; the loader
// has already merged `defaults:` into every zone, so the core never looks them up.
#include <optional>
#include <string>
#include <vector>

#include "dewmargin/heap_optional.h"

namespace dewmargin {

enum class input_unit {
  none,  // switches and contacts
  celsius,
  fahrenheit,
  percent,
  fraction,  // humidity as 0..1
  litres_per_second,
  cubic_metres_per_hour,
  us_gallons_per_minute,
};

// One subscribed value. `field` is a JSON pointer ("/temperature"); empty means the
// payload is a bare number (or, for a switch, a bare word).
struct input_config {
  std::string topic;
  std::string field;
  input_unit unit = input_unit::none;
  std::vector<std::string> active;      // switch/contact payloads meaning "active"
  std::vector<std::string> inactive;    // ... meaning "inactive"; empty: the defaults
                                        // (inactive_payloads() in input_decoder.h)
  std::optional<double> stale_after_s;  // overrides the zone's; 0 means never stale
};

struct band_thresholds {
  double margin_warn_k = 2.0;     // margin below this: "tight"
  double margin_alarm_k = 1.0;    // margin below this: "alarm"
  double hysteresis_k = 0.3;      // leaving a worse band needs threshold + this
  double confirm_s = 30.0;        // tight/alarm must hold this long
  double stale_after_s = 180.0;   // an input silent this long is stale
  double trend_window_s = 600.0;  // least-squares window for minutes_to_condensation
};

struct valve_config {
  std::string topic;
  std::string open_payload = "open";
  std::string closed_payload = "closed";
  double reopen_after_s = 600.0;
  double close_ahead_min = 5.0;           // close when condensation is expected this soon
  std::optional<double> open_margin_k{};  // start-up permissive; empty: the zone's margin_alarm_k
};

struct zone_config {
  std::string id;
  std::string loop;
  input_config air_temp;
  std::vector<input_config> humidity;               // at least one; highest dew point wins
  std::vector<input_config> surfaces;               // optional, any number; coldest wins
  heap_optional<input_config> condensation_switch;  // on the heap: most zones have none
  heap_optional<input_config> window_contact;
  std::optional<valve_config> valve;
  band_thresholds thresholds;  // defaults merged with per-zone overrides
};

struct setpoint_config {
  std::string topic;
  double min_c = 15.0;
  double max_c = 20.0;
  double reset_margin_k = 2.0;
  double fall_k_per_min = 0.2;
};

struct loop_config {
  std::string id;
  input_config supply_temp;
  std::optional<input_config> return_temp;
  std::optional<input_config> flow;
  setpoint_config setpoint;
  double stale_after_s = 180.0;  // from defaults; loops have no thresholds of their own
};

struct dew_point_request_config {
  std::string topic;
  double min_c = 8.0;
  double max_c = 14.0;
  double offset_k = 3.0;
  // Trim-and-respond (ASHRAE Guideline 36's reset method) below the feed-forward.
  double step_s = 120.0;    // one step this often
  double respond_k = 0.3;   // lower by this per requesting zone
  double max_step_k = 1.0;  // but at most this per step
  double trim_k = 0.1;      // raise by this in a step without requests
};

struct dehumidifier_config {
  std::string id;
  std::vector<std::string> zones;
  dew_point_request_config dew_point_request;
  // The unit's own alarm (suppression by design of its zones' tight/alarm annunciation):
  std::optional<input_config> fault;             // switch: active while the unit reports a fault
  std::optional<input_config> supply_dew_point;  // its measured supply-air dew point (°C)
  double fault_k = 2.0;                          // measured dew point this far above the request ...
  double fault_after_s = 600.0;                  // ... for this long is a fault
};

struct tls_config {
  std::string ca_file;
  std::string cert_file;
  std::string key_file;
};

struct broker_config {
  std::string uri = "tcp://127.0.0.1:1883";
  std::string client_id;
  std::string username;
  std::string password_file;
  std::optional<tls_config> tls;
  double keepalive_s = 30.0;
};

struct storage_config {
  std::string path = "/var/lib/dewmargin/history.db";
  double keep_events_days = 730.0;
  double keep_samples_days = 400.0;
  double keep_minute_samples_days = 35.0;  // older per-minute samples are rolled up into hours
};

struct publish_config {
  std::string prefix = "dewmargin";
  double min_interval_s = 5.0;
  double setpoint_event_k = 0.5;  // a `setpoint` event once the setpoint moved this far
};

// Readings outside these ranges are rejected as implausible (an `input` event) and
// the last good value stays in place.
struct value_range {
  double min;
  double max;
};
struct plausibility_config {
  value_range air_temp_c{-30.0, 60.0};
  value_range surface_c{-20.0, 80.0};    // radiant panels also heat in winter
  value_range water_c{0.0, 90.0};        // supply and return water
  value_range humidity_pct{0.0, 103.0};  // (0, 100] after the overshoot clamp
  value_range flow_l_s{0.0, 1000.0};
};

struct logging_config {
  std::string level = "info";  // trace, debug, info, warn, error, critical, off
};

// Where the service takes "now" from. `wall`: the system clock (the default, and right for
// live plants). `readings`: event time, the ISO 8601 time at `field` of each reading's JSON
// payload; the once-a-second tick follows that time (simulators, recorded feeds, sensors
// that timestamp their readings). Event time stands still while no reading arrives.
enum class clock_source { wall, readings };
struct clock_config {
  clock_source source = clock_source::wall;
  std::string field = "/ts";
};

// The service's local web server (live page, JSON states, Prometheus metrics); off unless
// the config has an `http:` section. Any address but loopback needs a bearer token.
struct http_config {
  std::string host = "127.0.0.1";  // from `listen: "HOST:PORT"`
  int port = 8088;
  std::string token_file;  // the bearer token (first line); read at start
};

struct site_config {
  std::string site;
  broker_config broker;
  storage_config storage;
  publish_config publish;
  band_thresholds defaults;
  plausibility_config plausibility;
  logging_config logging;
  clock_config clock;
  std::vector<loop_config> loops;
  std::vector<zone_config> zones;
  std::vector<dehumidifier_config> dehumidifiers;
  std::optional<http_config> http;
};

}  // namespace dewmargin
