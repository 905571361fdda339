#pragma once
// A day to play: its date and hours, the weather, the state of the building at the start, and
// the incidents. Read from a scenario file (docs/scenarios.md). Times are seconds since
// midnight UTC of `date` (the simulated buildings keep UTC, so log times read as local).
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "dewmargin/timestamp.h"
#include "model/time_series.h"

namespace dewmargin::sim {

enum class incident_kind {
  door_open,      // zone: an outside door stands open; outdoor air floods in, its contact reads open
  window_open,    // zone: a window stands open; less air than a door, its contact reads open
  crowd,          // zone: `value` people instead of its schedule
  coil_trip,      // dehumidifier: the coil stops, the fans pass outdoor air unchanged
  sensor_silent,  // zone or loop input: stops reporting
  sensor_stuck,   // zone or loop input: reports `value` whatever happens
  sensor_drift,   // zone or loop input: reads off by `value` per hour since the start of the incident
  switch_wet,     // zone: its condensation switch reads wet (the panels may well be dry)
  supply_high,    // loop: the service asks for warmer water than the plant can make; supply at most `value`
  broker_outage,  // the simulator publishes nothing and hears nothing
};
const char* incident_kind_name(incident_kind k);

// The inputs a sensor incident can hit.
enum class sensor_input { air_temp, humidity, surface, supply_temp, return_temp, flow };
const char* sensor_input_name(sensor_input s);

struct incident {
  incident_kind kind = incident_kind::crowd;
  std::string target;                 // zone, loop or dehumidifier id; empty for broker_outage
  std::optional<sensor_input> input;  // sensor_* only
  std::string topic;                  // sensor_* only: just this input of the target (empty: every one)
  double start_s = 0.0;
  double end_s = 0.0;
  double value = 0.0;       // people, m³/s of outdoor air, stuck value, drift per hour, or the supply limit (°C)
  std::string description;  // one line, for the status line and the summary

  [[nodiscard]] bool active_at(double t_s) const { return t_s >= start_s && t_s < end_s; }
};

struct initial_state {
  double air_c = 26.0;  // after a warm night without ventilation
  double dew_point_c = 18.0;
  double supply_water_c = 20.0;  // the chiller has just started
  double slab_c = 23.0;          // slabs keep the night's temperature
};

struct scenario {
  std::string name;
  std::string date = "2026-07-14";
  double start_s = 6.0 * 3600.0;
  double end_s = 20.0 * 3600.0;
  std::optional<std::uint64_t> seed;  // of the sensor noise; none: the simulator's default
  initial_state initial;
  time_series outdoor_c;
  time_series outdoor_dew_point_c;
  std::vector<incident> incidents;

  [[nodiscard]] timestamp at(double t_s) const;  // absolute instant of a time of day
  // The first incident of `kind` on `target` active at t_s, or nullptr.
  [[nodiscard]] const incident* active(incident_kind kind, const std::string& target, double t_s) const;
  [[nodiscard]] bool broker_down(double t_s) const { return active(incident_kind::broker_outage, "", t_s); }
  // Incidents active at t_s, in script order.
  [[nodiscard]] std::vector<const incident*> active_at(double t_s) const;
};

// "14:05" for a time of day in seconds.
std::string clock_text(double t_s);
// Seconds since midnight of "HH:MM" (or "H:MM") from 00:00 to 24:00; none for anything else.
std::optional<double> parse_clock_text(const std::string& text);

}  // namespace dewmargin::sim
