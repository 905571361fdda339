#pragma once
// Reads a scenario file (docs/scenarios.md): the building keyed by the ids of the service
// config it runs against, the weather, the occupancy, the incidents and the day's hours.
// Every mistake is reported in one pass as FILE:LINE:COL: message, like the service config.
#include <filesystem>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "dewmargin/config.h"
#include "dewmargin/config_loader.h"
#include "model/building.h"
#include "model/scenario.h"

namespace dewmargin::sim {

struct scenario_load_result {
  std::optional<building> house;  // both set only when `errors` is empty
  std::optional<scenario> day;
  std::vector<config_diagnostic> errors;  // the scenario file's first, then a building file's
  [[nodiscard]] bool ok() const { return house && day && errors.empty(); }
};

// `cfg` is the service config the scenario runs against, `config_label` its name in messages.
// Never throws.
scenario_load_result load_scenario_file(const std::filesystem::path& file, const site_config& cfg,
                                        const std::string& config_label);

// The same for text in memory; a building file it names is looked up in `base_dir`.
scenario_load_result load_scenario_text(std::string_view yaml_text, const std::string& file_label,
                                        const std::filesystem::path& base_dir, const site_config& cfg,
                                        const std::string& config_label);

}  // namespace dewmargin::sim
