#include "model/scenario.h"

#include <cmath>
#include <cstdio>
#include <stdexcept>

namespace dewmargin::sim {

const char* incident_kind_name(incident_kind k) {
  switch (k) {
    case incident_kind::door_open:
      return "door_open";
    case incident_kind::window_open:
      return "window_open";
    case incident_kind::crowd:
      return "crowd";
    case incident_kind::coil_trip:
      return "coil_trip";
    case incident_kind::sensor_silent:
      return "sensor_silent";
    case incident_kind::sensor_stuck:
      return "sensor_stuck";
    case incident_kind::sensor_drift:
      return "sensor_drift";
    case incident_kind::switch_wet:
      return "switch_wet";
    case incident_kind::supply_high:
      return "supply_high";
    case incident_kind::broker_outage:
      return "broker_outage";
  }
  return "incident";
}

const char* sensor_input_name(sensor_input s) {
  switch (s) {
    case sensor_input::air_temp:
      return "air_temp";
    case sensor_input::humidity:
      return "humidity";
    case sensor_input::surface:
      return "surface";
    case sensor_input::supply_temp:
      return "supply_temp";
    case sensor_input::return_temp:
      return "return_temp";
    case sensor_input::flow:
      return "flow";
  }
  return "input";
}

timestamp scenario::at(double t_s) const {
  const auto midnight = parse_iso8601(date);
  if (!midnight) throw std::invalid_argument("scenario date '" + date + "': " + midnight.err().message);
  return midnight.value() + std::chrono::milliseconds(static_cast<std::int64_t>(std::llround(t_s * 1000.0)));
}

const incident* scenario::active(incident_kind kind, const std::string& target, double t_s) const {
  for (const auto& i : incidents) {
    if (i.kind == kind && i.target == target && i.active_at(t_s)) return &i;
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

std::string clock_text(double t_s) {
  const long total_min = std::lround(std::floor(t_s / 60.0));
  char buf[16];
  std::snprintf(buf, sizeof buf, "%02ld:%02ld", (total_min / 60) % 100, total_min % 60);
  return buf;
}

std::optional<double> parse_clock_text(const std::string& text) {
  const std::size_t colon = text.find(':');
  if (colon == std::string::npos || colon == 0 || colon > 2 || text.size() != colon + 3) return std::nullopt;
  int hours = 0;
  for (std::size_t i = 0; i < colon; ++i) {
    if (text[i] < '0' || text[i] > '9') return std::nullopt;
    hours = hours * 10 + (text[i] - '0');
  }
  if (text[colon + 1] < '0' || text[colon + 1] > '5' || text[colon + 2] < '0' || text[colon + 2] > '9') {
    return std::nullopt;
  }
  const int minutes = (text[colon + 1] - '0') * 10 + (text[colon + 2] - '0');
  if (hours > 24 || (hours == 24 && minutes != 0)) return std::nullopt;
  return hours * 3600.0 + minutes * 60.0;
}

}  // namespace dewmargin::sim
