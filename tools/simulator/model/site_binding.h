#pragma once
// Ties the shared config (the one the service reads) to the simulated building: every zone,
// loop and dehumidifier of the building must appear in the config under the same id, and the
// other way round, so that the simulator publishes and listens on exactly the service's topics.
// (The scenario reader already reports mismatches at their place in the file; this is the
// check for buildings made in code.)
#include <optional>
#include <string>
#include <string_view>
#include <unordered_map>
#include <vector>

#include "dewmargin/config.h"
#include "dewmargin/result.h"
#include "model/building.h"

namespace dewmargin::sim {

enum class command_target { setpoint, valve, dew_point_request };

struct plant_command {
  command_target target = command_target::setpoint;
  std::size_t index = 0;  // loop (setpoint), zone (valve) or dehumidifier (request) of the building
  double value_c = 0.0;   // setpoint or dew-point request
  bool open = false;      // valve
};

class site_binding {
 public:
  // Checks that config and building describe the same plant; the error names every mismatch.
  static result<site_binding> bind(const site_config& cfg, const building& b);

  // Index into cfg.zones / cfg.loops for each building zone / loop.
  [[nodiscard]] const zone_config& zone(std::size_t building_zone) const { return *zones_[building_zone]; }
  [[nodiscard]] const loop_config& loop(std::size_t building_loop) const { return *loops_[building_loop]; }
  [[nodiscard]] const dehumidifier_config& dehumidifier(std::size_t building_unit) const {
    return *units_[building_unit];
  }

  // Topics the service writes plant commands to.
  [[nodiscard]] std::vector<std::string> command_topics() const;
  [[nodiscard]] bool is_command_topic(const std::string& topic) const { return commands_.count(topic) > 0; }
  // Decodes a command for the plant; an error names the topic and the payload.
  [[nodiscard]] result<plant_command> decode(const std::string& topic, std::string_view payload) const;

 private:
  std::vector<const zone_config*> zones_;
  std::vector<const loop_config*> loops_;
  std::vector<const dehumidifier_config*> units_;
  std::unordered_map<std::string, plant_command> commands_;  // value filled in by decode
};

}  // namespace dewmargin::sim
