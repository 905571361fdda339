#pragma once
// The building's sensors as the service sees them: each reports on its own topic at its own
// interval (30–60 s in the rooms, 5–30 s in the plant room), with a phase of its own and
// Gaussian noise from its own seeded stream. Switches and contacts report on change and
// every 5 min. Payloads follow the shared config: JSON `{"<field>": value, "<ts>": "ISO 8601"}`
// when the config's clock takes time from the readings, a bare number otherwise. Sensor
// incidents of the scenario (silent, stuck, drifting) act here, on what is reported.
//
// | sensor                 | interval | noise (1 σ) | source |
// |------------------------|----------|-------------|--------|
// | air temperature        | 60 s     | 0.1 K       | common practice, no source |
// | relative humidity      | 30 s     | 1.0 %RH     | common practice, no source (capacitive sensors, ±2 %RH class) |
// | surface temperature    | 30 s     | 0.1 K       | common practice, no source |
// | supply water           | 5 s      | 0.05 K      | common practice, no source (also keeps event time moving) |
// | return water           | 10 s     | 0.05 K      | common practice, no source |
// | loop flow              | 30 s     | 1 % of value| common practice, no source |
// | dehumidifier supply dew point | 30 s | 0.2 K  | common practice, no source (chilled-mirror or capacitive probe in
// the duct) | | switch, contact, unit fault | on change, every 300 s | none | common practice, no source |
#include <cstdint>
#include <string>
#include <vector>

#include "dewmargin/config.h"
#include "dewmargin/timestamp.h"
#include "model/plant_model.h"
#include "model/random_stream.h"
#include "model/site_binding.h"

namespace dewmargin::sim {

struct outbound {
  std::string topic;
  std::string payload;
  bool retained = false;
  int qos = 0;
};

enum class quantity {
  air_temp,
  humidity,
  surface,
  supply,
  return_water,
  flow,
  condensation_switch,
  door_contact,
  unit_fault,
  unit_supply_dew_point,
};

class sensor_feed {
 public:
  // Throws std::invalid_argument when the config asks for a payload the simulator cannot make
  // (two inputs on one topic, no `field` with clock source readings, a switch word clash).
  // The building (its dehumidifiers' extra sensors) must outlive the feed.
  sensor_feed(const site_config& cfg, const site_binding& binding, const building& b, const scenario& s,
              std::uint64_t seed, double step_s);

  // Readings due at time of day t_s (a multiple of the step), appended to `out`.
  void sample(double t_s, timestamp ts, const plant_model& plant, const scenario& s, std::vector<outbound>& out);

  [[nodiscard]] std::size_t sensor_count() const { return streams_.size(); }

 private:
  struct stream {
    quantity what;
    std::size_t index;  // zone, loop or dehumidifier of the building
    const input_config* input;
    double interval_s;
    double phase_s;
    double sigma;
    int decimals;
    random_stream noise;
    int last_state = -1;  // switches: -1 never sent
    std::string inactive_word;
    std::vector<const incident*> incidents;  // sensor incidents that hit this stream
  };
  void add(quantity what, std::size_t index, const input_config& in, double interval_s, double sigma, int decimals);
  [[nodiscard]] std::string payload(const stream& s, double value, timestamp ts) const;
  [[nodiscard]] std::string payload(const stream& s, const std::string& word, timestamp ts) const;
  [[nodiscard]] bool state_active(const stream& s, double t_s, const plant_model& plant, const scenario& sc) const;

  clock_config clock_;
  std::uint64_t seed_;
  double step_s_;
  std::vector<stream> streams_;
};

}  // namespace dewmargin::sim
