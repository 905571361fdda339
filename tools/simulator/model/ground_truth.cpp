#include "model/ground_truth.h"

namespace dewmargin::sim {

ground_truth::ground_truth(const building& b) {
  for (const auto& z : b.zones) {
    zone_truth t;
    t.zone = z.id;
    zones_.push_back(std::move(t));
  }
}

void ground_truth::record(double t_s, double dt_s, const std::vector<zone_state>& states, const scenario& s) {
  const auto active = s.active_at(t_s);
  for (std::size_t i = 0; i < states.size(); ++i) {
    const double margin_k = states[i].surface_c - states[i].dew_point_c;
    zone_truth& t = zones_[i];
    if (margin_k < t.min_margin_k) {
      t.min_margin_k = margin_k;
      t.min_margin_at_s = t_s;
    }
    if (i == 0 || margin_k < worst_margin_now_k_) {
      worst_now_ = i;
      worst_margin_now_k_ = margin_k;
    }
    if (margin_k >= 0.0) continue;
    t.condensing_s += dt_s;
    // Credit the incidents that concern this zone: its own, and the building-wide ones.
    bool credited = false;
    for (const incident* inc : active) {
      if (!inc->zone.empty() && inc->zone != t.zone) continue;
      by_incident_[incident_kind_name(inc->kind)] += dt_s / 60.0;
      credited = true;
    }
    if (!credited) by_incident_["no incident"] += dt_s / 60.0;
  }
}

double ground_truth::total_condensing_min() const {
  double s = 0.0;
  for (const auto& z : zones_) s += z.condensing_s;
  return s / 60.0;
}

}  // namespace dewmargin::sim
