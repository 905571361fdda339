#include "model/pace.h"

#include <algorithm>

namespace dewmargin::sim {

double pacer::due_wall_s(double sim_s) const {
  if (speed_ <= 0.0) return 0.0;
  return (sim_s - sim_start_s_) / speed_ + shift_s_;
}

void pacer::arrived(double sim_s, double wall_s) {
  if (speed_ <= 0.0) return;
  const double late_s = wall_s - due_wall_s(sim_s);
  if (late_s > k_max_behind_s) shift_s_ += late_s;
}

void pacer::waited_for_broker(double wall_s) {
  totals_.broker_wait_s += wall_s;
  ++totals_.broker_stalls;
}

void pacer::waited_for_service(double wall_s) {
  totals_.service_wait_s += wall_s;
  ++totals_.service_stalls;
}

void pacer::service_lag(double sim_lag_s) {
  totals_.worst_service_lag_s = std::max(totals_.worst_service_lag_s, sim_lag_s);
}

pace_report pacer::report(double sim_now_s, double wall_s) const {
  pace_report r = totals_;
  r.asked_speed = speed_;
  r.sim_s = sim_now_s - sim_start_s_;
  r.wall_s = wall_s;
  r.achieved_speed = wall_s > 0.0 ? r.sim_s / wall_s : 0.0;
  r.slowed_s = speed_ > 0.0 ? shift_s_ : 0.0;
  return r;
}

}  // namespace dewmargin::sim
