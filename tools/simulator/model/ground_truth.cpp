#include "model/ground_truth.h"

namespace dewmargin::sim {

bool concerns(const incident& i, const zone_physics& zone) {
  switch (i.kind) {
    case incident_kind::broker_outage:
      return true;
    case incident_kind::coil_trip:
      return !zone.dehumidifier.empty() && zone.dehumidifier == i.target;
    case incident_kind::supply_high:
      return zone.loop == i.target;
    case incident_kind::sensor_silent:
    case incident_kind::sensor_stuck:
    case incident_kind::sensor_drift:
      return i.target == zone.id || i.target == zone.loop;
    case incident_kind::door_open:
    case incident_kind::window_open:
    case incident_kind::crowd:
    case incident_kind::switch_wet:
      return i.target == zone.id;
  }
  return false;
}

ground_truth::ground_truth(const building& b) : layout_(b.zones) {
  for (const auto& z : b.zones) {
    zone_truth t;
    t.zone = z.id;
    zones_.push_back(std::move(t));
  }
}

void ground_truth::record(double t_s, double dt_s, const std::vector<zone_state>& states, const scenario& s) {
  const auto active = s.active_at(t_s - dt_s);
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
    if (!t.first_wet_s) t.first_wet_s = t_s;
    bool credited = false;
    for (const incident* inc : active) {
      if (!concerns(*inc, layout_[i])) continue;
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
