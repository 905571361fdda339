#pragma once
// What really happened, from the model's noiseless state: how long each chilled surface was
// colder than the dew point of its room air (water condenses on it), when that first
// happened, and its worst margin. The service never sees these numbers; they judge it.
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "model/plant_model.h"

namespace dewmargin::sim {

struct zone_truth {
  std::string zone;
  double condensing_s = 0.0;          // time with surface < dew point
  double min_margin_k = 1e9;          // lowest surface − dew point seen
  double min_margin_at_s = 0.0;       // time of day of that lowest margin
  std::optional<double> first_wet_s;  // first time of day the surface was seen wet (end of a step)
};

class ground_truth {
 public:
  explicit ground_truth(const building& b);

  // After a step from t_s − dt_s to t_s: credits dt_s to every surface below its dew point,
  // and to each incident active then that concerns its zone (its own, its loop's, its
  // dehumidifier's, a broker outage), or to "no incident".
  void record(double t_s, double dt_s, const std::vector<zone_state>& zones, const scenario& s);

  [[nodiscard]] const std::vector<zone_truth>& zones() const { return zones_; }
  [[nodiscard]] double total_condensing_min() const;
  // Zone-minutes of condensation while an incident of each kind concerned the zone (overlaps
  // count for each).
  [[nodiscard]] const std::map<std::string, double>& condensing_min_by_incident() const { return by_incident_; }
  // Lowest true margin of any zone at the last recorded step, and which zone.
  [[nodiscard]] std::size_t worst_zone_now() const { return worst_now_; }
  [[nodiscard]] double worst_margin_now_k() const { return worst_margin_now_k_; }

 private:
  std::vector<zone_truth> zones_;
  std::vector<zone_physics> layout_;  // ids, loops and dehumidifiers of the zones
  std::map<std::string, double> by_incident_;
  std::size_t worst_now_ = 0;
  double worst_margin_now_k_ = 0.0;
};

// Does the incident concern the zone (its own, its loop's, its dehumidifier's, a broker outage)?
bool concerns(const incident& i, const zone_physics& zone);

}  // namespace dewmargin::sim
