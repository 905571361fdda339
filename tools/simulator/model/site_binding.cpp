#include "model/site_binding.h"

#include <algorithm>
#include <cerrno>
#include <cmath>
#include <cstdlib>

namespace dewmargin::sim {
namespace {

template <typename T>
const T* find_id(const std::vector<T>& items, const std::string& id) {
  const auto it = std::find_if(items.begin(), items.end(), [&](const T& x) { return x.id == id; });
  return it == items.end() ? nullptr : &*it;
}

std::string trimmed(std::string_view s) {
  while (!s.empty() && (s.front() == ' ' || s.front() == '\n' || s.front() == '\t')) s.remove_prefix(1);
  while (!s.empty() && (s.back() == ' ' || s.back() == '\n' || s.back() == '\t' || s.back() == '\r'))
    s.remove_suffix(1);
  return std::string(s);
}

}  // namespace

result<site_binding> site_binding::bind(const site_config& cfg, const building& b) {
  site_binding out;
  std::vector<std::string> problems;
  for (const auto& l : b.loops) {
    const loop_config* lc = find_id(cfg.loops, l.id);
    if (!lc) problems.push_back("loop " + l.id + " of building " + b.name + " is not in the config");
    out.loops_.push_back(lc);
  }
  for (const auto& z : b.zones) {
    const zone_config* zc = find_id(cfg.zones, z.id);
    if (!zc) {
      problems.push_back("zone " + z.id + " of building " + b.name + " is not in the config");
    } else if (zc->loop != z.loop) {
      problems.push_back("zone " + z.id + " is on loop " + zc->loop + " in the config but on " + z.loop +
                         " in the building");
    }
    out.zones_.push_back(zc);
  }
  for (const auto& zc : cfg.zones) {
    if (!find_id(b.zones, zc.id)) problems.push_back("config zone " + zc.id + " is not in building " + b.name);
  }
  for (const auto& lc : cfg.loops) {
    if (!find_id(b.loops, lc.id)) problems.push_back("config loop " + lc.id + " is not in building " + b.name);
  }
  for (const auto& d : b.dehumidifiers) {
    const dehumidifier_config* dc = find_id(cfg.dehumidifiers, d.id);
    if (!dc) problems.push_back("dehumidifier " + d.id + " of building " + b.name + " is not in the config");
    out.units_.push_back(dc);
  }
  for (const auto& dc : cfg.dehumidifiers) {
    if (!find_id(b.dehumidifiers, dc.id)) {
      problems.push_back("config dehumidifier " + dc.id + " is not in building " + b.name);
    }
  }
  if (!problems.empty()) {
    std::string text = problems.front();
    for (std::size_t i = 1; i < problems.size(); ++i) text += "; " + problems[i];
    return make_error(error_code::invalid_argument, text);
  }
  for (std::size_t i = 0; i < out.loops_.size(); ++i) {
    out.commands_[out.loops_[i]->setpoint.topic] = {command_target::setpoint, i, 0.0, false};
  }
  for (std::size_t i = 0; i < out.zones_.size(); ++i) {
    if (out.zones_[i]->valve) out.commands_[out.zones_[i]->valve->topic] = {command_target::valve, i, 0.0, false};
  }
  for (std::size_t i = 0; i < out.units_.size(); ++i) {
    out.commands_[out.units_[i]->dew_point_request.topic] = {command_target::dew_point_request, i, 0.0, false};
  }
  return out;
}

std::vector<std::string> site_binding::command_topics() const {
  std::vector<std::string> topics;
  for (const auto& kv : commands_) topics.push_back(kv.first);
  std::sort(topics.begin(), topics.end());
  return topics;
}

result<plant_command> site_binding::decode(const std::string& topic, std::string_view payload) const {
  const auto it = commands_.find(topic);
  if (it == commands_.end()) return make_error(error_code::invalid_argument, topic + ": not a plant command topic");
  plant_command c = it->second;
  const std::string text = trimmed(payload);
  if (c.target == command_target::valve) {
    const valve_config& v = *zones_[c.index]->valve;
    if (text == v.open_payload) {
      c.open = true;
    } else if (text == v.closed_payload) {
      c.open = false;
    } else {
      return make_error(error_code::parse_error, topic + ": valve command '" + text + "' is neither '" +
                                                     v.open_payload + "' nor '" + v.closed_payload + "'");
    }
    return c;
  }
  errno = 0;
  char* end = nullptr;
  const double v = std::strtod(text.c_str(), &end);
  if (text.empty() || end != text.c_str() + text.size() || errno == ERANGE || !std::isfinite(v)) {
    return make_error(error_code::parse_error, topic + ": '" + text + "' is not a temperature");
  }
  c.value_c = v;
  return c;
}

}  // namespace dewmargin::sim
