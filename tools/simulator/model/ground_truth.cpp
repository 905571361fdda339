#include "model/ground_truth.h"

namespace dewmargin::sim {

ground_truth::ground_truth(const building& b) {
  for (const auto& z : b.zones) zones_.push_back({z.id});
}

void ground_truth::record(double t_s, double dt_s, const plant_model& plant, const scenario& s) {
  const auto& states = plant.zones();
  double wet_zones = 0.0;
  for (std::size_t i = 0; i < states.size(); ++i) {
    const double margin_k = states[i].surface_c - states[i].dew_point_c;
    zone_truth& t = zones_[i];
    if (margin_k < 0.0) {
      t.condensing_s += dt_s;
      wet_zones += 1.0;
    }
    if (margin_k < t.min_margin_k) {
      t.min_margin_k = margin_k;
      t.min_margin_at_s = t_s;
    }
    if (i == 0 || margin_k < worst_margin_now_k_) {
      worst_now_ = i;
      worst_margin_now_k_ = margin_k;
    }
  }
  if (wet_zones <= 0.0) return;
  const auto active = s.active_at(t_s);
  if (active.empty()) by_incident_["no incident"] += wet_zones * dt_s / 60.0;
  for (const incident* i : active) by_incident_[incident_kind_name(i->kind)] += wet_zones * dt_s / 60.0;
}

double ground_truth::total_condensing_min() const {
  double s = 0.0;
  for (const auto& z : zones_) s += z.condensing_s;
  return s / 60.0;
}

}  // namespace dewmargin::sim
