#include "model/scenario.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <stdexcept>

namespace dewmargin::sim {
namespace {

constexpr double k_two_pi = 6.283185307179586;
constexpr double h(double hours) { return hours * 3600.0; }

double ramp(double x, double from, double to) { return std::clamp((x - from) / (to - from), 0.0, 1.0); }

// Invented weather, typical of a humid coastal summer day (from memory): 24–31 °C, the dew
// point 22–24 °C all day, so the outdoor air stays near 90 % RH at dawn and 65 % in the afternoon.
void humid_coastal_weather(scenario& s) {
  s.outdoor_temp_c = {27.5, 3.5, 15.0};
  s.outdoor_dew_point_c = {23.0, 0.8, 16.0};
}

}  // namespace

const char* incident_kind_name(incident_kind k) {
  switch (k) {
    case incident_kind::door_propped:
      return "door_propped";
    case incident_kind::doas_coil_trip:
      return "doas_coil_trip";
    case incident_kind::humidity_silent:
      return "humidity_silent";
    case incident_kind::switch_wet:
      return "switch_wet";
    case incident_kind::crowd:
      return "crowd";
  }
  return "incident";
}

double daily_cycle::at(double t_s) const {
  return mean + amplitude * std::cos(k_two_pi * (t_s / 3600.0 - peak_hour) / 24.0);
}

double occupancy_schedule::share_at(double t_s) const {
  const double hour = t_s / 3600.0;
  double share = ramp(hour, arrive_from_h, arrive_to_h) * (1.0 - ramp(hour, leave_from_h, leave_to_h));
  if (lunch_at(t_s)) share *= lunch_share;
  return share;
}

bool occupancy_schedule::lunch_at(double t_s) const {
  const double hour = t_s / 3600.0;
  return hour >= lunch_from_h && hour < lunch_to_h;
}

timestamp scenario::at(double t_s) const {
  const auto midnight = parse_iso8601(date);
  if (!midnight) throw std::invalid_argument("scenario date '" + date + "': " + midnight.err().message);
  return midnight.value() + std::chrono::milliseconds(static_cast<std::int64_t>(std::llround(t_s * 1000.0)));
}

bool scenario::coil_tripped(double t_s) const { return active(incident_kind::doas_coil_trip, "", t_s) != nullptr; }

const incident* scenario::active(incident_kind kind, const std::string& zone, double t_s) const {
  for (const auto& i : incidents) {
    if (i.kind == kind && i.zone == zone && i.active_at(t_s)) return &i;
  }
  return nullptr;
}

std::vector<const incident*> scenario::active_at(double t_s) const {
  std::vector<const incident*> out;
  for (const auto& i : incidents) {
    if (i.active_at(t_s)) out.push_back(&i);
  }
  return out;
}

scenario humid_summer_day() {
  scenario s;
  s.name = "day";
  humid_coastal_weather(s);
  s.incidents = {
      {incident_kind::humidity_silent, "l3-north-open", h(9.5), h(10.25), 0.0,
       "humidity sensor in l3-north-open silent (flat battery)"},
      {incident_kind::doas_coil_trip, "", h(11.0), h(12.0), 0.0, "DOAS dehumidifying coil tripped"},
      {incident_kind::crowd, "l2-south-meeting", h(14.0), h(16.0), 16.0,
       "packed meeting in l2-south-meeting (16 people)"},
      {incident_kind::door_propped, "g-lobby", h(14.5), h(15.75), 0.0, "lobby entrance door propped open"},
      {incident_kind::switch_wet, "l1-south-open", h(16.5), h(16.85), 0.0,
       "condensation switch in l1-south-open wet (dripping pipe fitting)"},
  };
  return s;
}

scenario short_day() {
  scenario s;
  s.name = "short";
  humid_coastal_weather(s);
  s.end_s = h(8.5);
  s.occupancy = {6.25, 6.75, 7.5, 7.75, 0.6, 8.25, 8.5};
  s.incidents = {
      {incident_kind::humidity_silent, "l3-north-open", h(6.5), h(6.75), 0.0,
       "humidity sensor in l3-north-open silent (flat battery)"},
      {incident_kind::doas_coil_trip, "", h(7.0), h(7.75), 0.0, "DOAS dehumidifying coil tripped"},
      {incident_kind::crowd, "l2-south-meeting", h(7.0), h(8.0), 16.0,
       "packed meeting in l2-south-meeting (16 people)"},
      {incident_kind::door_propped, "g-lobby", h(7.25), h(8.0), 0.0, "lobby entrance door propped open"},
      {incident_kind::switch_wet, "l1-south-open", h(8.0), h(8.2), 0.0,
       "condensation switch in l1-south-open wet (dripping pipe fitting)"},
  };
  return s;
}

scenario scenario_named(const std::string& name) {
  if (name == "day") return humid_summer_day();
  if (name == "short") return short_day();
  throw std::invalid_argument("unknown scenario '" + name + "' (day or short)");
}

std::string clock_text(double t_s) {
  const long total_min = std::lround(std::floor(t_s / 60.0));
  char buf[16];
  std::snprintf(buf, sizeof buf, "%02ld:%02ld", (total_min / 60) % 100, total_min % 60);
  return buf;
}

}  // namespace dewmargin::sim
