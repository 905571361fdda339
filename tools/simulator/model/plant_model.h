#pragma once
// The building's physics, integrated at a fixed step: per zone the moisture balance of the
// room air (humidity ratio) and its heat balance, the chilled surface following its loop's
// water, per loop the supply water following its setpoint, and per dehumidifier the supply
// air following its dew-point request. Pure and deterministic: no clock, no I/O, no randomness.
#include <cstddef>
#include <vector>

#include "model/building.h"
#include "model/scenario.h"

namespace dewmargin::sim {

struct zone_state {
  double air_c = 0.0;
  double humidity_ratio = 0.0;  // kg water / kg dry air
  double surface_c = 0.0;       // the chilled surface (coldest point, where its sensor sits)
  bool valve_open = true;
  double people = 0.0;
  double surface_cooling_w = 0.0;  // heat the surface takes from the room (negative: heating)
  double dew_point_c = 0.0;        // derived from humidity_ratio after each step
};

struct loop_state {
  double setpoint_c = 0.0;  // last command (design value until one comes)
  double supply_c = 0.0;
  double return_c = 0.0;
  double cooling_w = 0.0;  // sum over the zones with open valves
};

struct dehumidifier_state {
  double request_c = 0.0;  // requested supply dew point (design value until one comes)
  double supply_dew_point_c = 0.0;
  double supply_air_c = 0.0;
  bool tripped = false;
};

struct outdoor_state {
  double air_c = 0.0;
  double dew_point_c = 0.0;
};

class plant_model {
 public:
  // The state at s.start_s: the building after a warm, humid night, the plant just started.
  // Throws std::invalid_argument when a zone names a loop or dehumidifier the building lacks.
  plant_model(building b, const scenario& s);

  // Advances from t_s to t_s + dt_s with the conditions (weather, people, incidents) of t_s.
  void step(double t_s, double dt_s);

  void set_setpoint_c(std::size_t loop, double setpoint_c);
  void set_valve_open(std::size_t zone, bool open);
  void set_dew_point_request_c(std::size_t dehumidifier, double dew_point_c);

  [[nodiscard]] const building& layout() const { return building_; }
  [[nodiscard]] const std::vector<zone_state>& zones() const { return zones_; }
  [[nodiscard]] const std::vector<loop_state>& loops() const { return loops_; }
  [[nodiscard]] const std::vector<dehumidifier_state>& dehumidifiers() const { return units_; }
  [[nodiscard]] outdoor_state outdoor() const { return outdoor_; }
  [[nodiscard]] std::size_t loop_of(std::size_t zone) const { return zone_loop_[zone]; }
  // The dehumidifier serving a zone, or npos for untreated outdoor air.
  [[nodiscard]] std::size_t dehumidifier_of(std::size_t zone) const { return zone_unit_[zone]; }
  static constexpr std::size_t npos = static_cast<std::size_t>(-1);

 private:
  void step_dehumidifier(std::size_t u, double t_s, double dt_s);
  void step_zone(std::size_t i, double t_s, double dt_s);
  void step_loop(std::size_t l, double t_s, double dt_s);

  building building_;
  scenario scenario_;
  std::vector<zone_state> zones_;
  std::vector<loop_state> loops_;
  std::vector<dehumidifier_state> units_;
  std::vector<std::size_t> zone_loop_;
  std::vector<std::size_t> zone_unit_;
  std::vector<double> unit_air_kg_s_;  // air each dehumidifier delivers (sum over its zones)
  outdoor_state outdoor_;
};

// First-order lag over one step, exact for a constant target: x → target with time constant tau.
double follow(double x, double target, double tau_s, double dt_s);

}  // namespace dewmargin::sim
