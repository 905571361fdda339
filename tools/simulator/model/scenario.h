#pragma once
// A scripted day: the weather, when people are in, and the incidents. Times are seconds
// since midnight UTC of `date` (the demo building keeps UTC, so log times read as local).
#include <string>
#include <vector>

#include "dewmargin/timestamp.h"

namespace dewmargin::sim {

enum class incident_kind {
  door_propped,     // a zone's outside door stands open: outdoor air floods in, its contact reads open
  doas_coil_trip,   // the DOAS dehumidifying coil stops: the fans pass outdoor air unchanged
  humidity_silent,  // a zone's humidity sensor stops reporting
  switch_wet,       // a zone's condensation switch reads wet
  crowd,            // a zone holds `people` instead of its design occupancy
};
const char* incident_kind_name(incident_kind k);

struct incident {
  incident_kind kind;
  std::string zone;  // empty for the DOAS
  double start_s = 0.0;
  double end_s = 0.0;
  double people = 0.0;      // crowd only
  std::string description;  // one line, for the status line and the summary

  [[nodiscard]] bool active_at(double t_s) const { return t_s >= start_s && t_s < end_s; }
};

// A smooth daily cycle: mean + amplitude · cos(2π (h − peak_h) / 24).
struct daily_cycle {
  double mean = 0.0;
  double amplitude = 0.0;
  double peak_hour = 15.0;
  [[nodiscard]] double at(double t_s) const;
};

// Share of the design occupancy present: 0 before arrive_from, rising to 1 at arrive_to,
// lunch_share between lunch_from and lunch_to, falling from leave_from to 0 at leave_to.
struct occupancy_schedule {
  double arrive_from_h = 7.5;
  double arrive_to_h = 9.0;
  double lunch_from_h = 12.0;
  double lunch_to_h = 13.5;
  double lunch_share = 0.6;
  double leave_from_h = 17.0;
  double leave_to_h = 18.5;
  [[nodiscard]] double share_at(double t_s) const;
  [[nodiscard]] bool lunch_at(double t_s) const;
};

struct scenario {
  std::string name;
  std::string date = "2026-07-14";
  double start_s = 6.0 * 3600.0;
  double end_s = 20.0 * 3600.0;
  // The building at start-up, after a night without ventilation in humid air.
  double initial_air_c = 26.5;
  double initial_dew_point_c = 18.5;
  daily_cycle outdoor_temp_c;
  daily_cycle outdoor_dew_point_c;
  occupancy_schedule occupancy;
  std::vector<incident> incidents;

  [[nodiscard]] timestamp at(double t_s) const;  // absolute instant of a time of day
  [[nodiscard]] bool coil_tripped(double t_s) const;
  [[nodiscard]] const incident* active(incident_kind kind, const std::string& zone, double t_s) const;
  // Incidents active at t_s, in script order.
  [[nodiscard]] std::vector<const incident*> active_at(double t_s) const;
};

// 06:00–20:00 of a humid coastal summer day with four incidents (see scenario.cpp).
scenario humid_summer_day();
// The same building and incidents squeezed into 06:00–08:30, for the end-to-end test.
scenario short_day();
// By name: "day" or "short"; throws std::invalid_argument otherwise.
scenario scenario_named(const std::string& name);

// "14:05" for a time of day in seconds.
std::string clock_text(double t_s);

}  // namespace dewmargin::sim
