#pragma once
// The parts of the scenario reader, private to it.
#include <optional>
#include <string>
#include <vector>

#include "dewmargin/config.h"
#include "model/building.h"
#include "model/scenario.h"
#include "scenario_file/yaml_fields.h"

namespace dewmargin::sim::scenario_detail {

// Outdoor air for a zone without its own `ventilation_l_s`: per design person, a European
// office design value (from memory).
inline constexpr double k_ventilation_l_s_per_person = 10.0;

// What the reader needs to know of the service config.
struct config_view {
  const site_config& cfg;
  std::string label;  // "config/demo.yaml"
  [[nodiscard]] const zone_config* zone(const std::string& id) const;
  [[nodiscard]] const loop_config* loop(const std::string& id) const;
  [[nodiscard]] const dehumidifier_config* dehumidifier(const std::string& id) const;
  [[nodiscard]] std::vector<std::string> zone_ids() const;
  [[nodiscard]] std::vector<std::string> loop_ids() const;
  [[nodiscard]] std::vector<std::string> dehumidifier_ids() const;
};

// "zone 'x' is not in the config FILE; did you mean 'y'?"
std::string unknown_id(const std::string& what, const std::string& id, const std::vector<std::string>& known,
                       const config_view& config);

// A name written in a file, to look up once everything is read.
struct name_ref {
  std::string name;
  place at;
  std::string file;
};

// A zone as written: the people and moisture need the day's schedules to be resolved.
struct zone_draft {
  zone_physics physics;                      // defaults already filled in, except the ones below
  std::optional<double> people;              // a number of people, scaled by `schedule`
  std::optional<time_series> people_series;  // or people over the day
  std::optional<name_ref> schedule;
  bool ventilation_given = false;
  double moisture_g_h = 0.0;                   // scaled by `moisture_schedule`
  std::optional<time_series> moisture_series;  // or moisture over the day
  std::optional<name_ref> moisture_schedule;
};

struct building_draft {
  std::string name;
  std::vector<zone_draft> zones;
  std::vector<loop_physics> loops;
  std::vector<dehumidifier_physics> dehumidifiers;
};

// A building map (inline in the scenario or the whole of a building file).
std::optional<building_draft> read_building(const YAML::Node& node, const source& src, const config_view& config);

// The `incidents` list; supply_high without max_c gets NaN, to be filled in with the loop's design.
std::vector<incident> read_incidents(const fields& top, const config_view& config, double day_start_s,
                                     double day_end_s);

}  // namespace dewmargin::sim::scenario_detail
