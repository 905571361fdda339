#pragma once
// The readers of the config sections and what they leave behind for the checks that
// span sections (references, duplicate ids, topics that collide or feed back).
#include <optional>
#include <string>
#include <vector>

#include "dewmargin/config.h"
#include "yaml_reader.h"

namespace dewmargin::config_detail {

struct input_record {
  std::string topic;
  std::string field;  // empty: bare payload
  std::string owner;  // "zone 'level2-east' air_temp"
  source_mark topic_at;
};

struct output_record {
  std::string topic;
  std::string owner;  // "loop 'loop-a' setpoint"
  source_mark topic_at;
};

struct id_record {
  std::string id;
  source_mark at;
};

// A name that must match an id elsewhere (a zone's loop, a dehumidifier's zones).
struct reference_record {
  std::string owner;  // "zone 'level2-east'"
  std::string target;
  source_mark at;
};

// Where the margin thresholds of one map were written, for the warn/alarm check.
struct threshold_marks {
  std::optional<source_mark> warn_at;
  std::optional<source_mark> alarm_at;
  bool valid = true;  // false when a threshold value itself was bad (already reported)
};

struct config_index {
  std::vector<input_record> inputs;
  std::vector<output_record> outputs;
  std::vector<id_record> loop_ids;
  std::vector<id_record> zone_ids;
  std::vector<id_record> dehumidifier_ids;
  std::vector<reference_record> zone_loops;
  std::vector<reference_record> dehumidifier_zones;
  std::optional<std::string> prefix;  // set only when the prefix itself is valid
  threshold_marks defaults;
};

// Everything a reader writes to.
struct reading {
  site_config& config;
  config_index& index;
  diagnostics& diag;
};

enum class input_kind { temperature, humidity, flow, binary };

// `{topic, field?, unit?, stale_after_s?}` (binary inputs: `active` instead of `unit`).
// `owner` names the input in messages ("zone 'level2-east' air_temp").
[[nodiscard]] std::optional<input_config> read_input(const yaml_node& node, source_mark at, const std::string& name,
                                                     const std::string& owner, input_kind kind, reading& r);

// An output topic at `key` of `m`: checked like an input topic and recorded.
[[nodiscard]] std::optional<std::string> read_output_topic(const map_reader& m, const std::string& owner, reading& r);

[[nodiscard]] std::optional<valve_config> read_valve(const yaml_node& node, source_mark at, const std::string& owner,
                                                     reading& r);

// Topic rules common to inputs and outputs; reports and returns false when broken.
bool check_topic(const located<std::string>& topic, bool is_input, diagnostics& diag);
// A JSON pointer (RFC 6901) that names a field: starts with '/'.
bool check_json_pointer(const located<std::string>& field, diagnostics& diag);

// Ids become topic levels (`<prefix>/zone/<id>/state`).
bool check_id(const located<std::string>& id, const char* what, diagnostics& diag);

// The band thresholds keys of `defaults:` and of each zone, read over `t`.
[[nodiscard]] threshold_marks read_thresholds(const map_reader& m, band_thresholds& t);
[[nodiscard]] const std::vector<std::string>& threshold_keys();

// margin_alarm_k must stay below margin_warn_k; reported at `defaults:`.
void check_defaults_margins(const band_thresholds& t, const threshold_marks& marks, diagnostics& diag);

void read_loops(const yaml_node& node, source_mark at, reading& r);
void read_zones(const yaml_node& node, source_mark at, reading& r);
void read_dehumidifiers(const yaml_node& node, source_mark at, reading& r);

// The `http:` section (read_http.cpp).
void read_http(const yaml_node& node, reading& r);

// The whole document: sections, then the checks across them.
void read_site(const yaml_node& root, reading& r);
void check_across_sections(reading& r);

}  // namespace dewmargin::config_detail
