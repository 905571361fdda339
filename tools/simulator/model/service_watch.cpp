#include "model/service_watch.h"

#include <nlohmann/json.hpp>

#include "dewmargin/event_kind.h"
#include "dewmargin/json_dump.h"

namespace dewmargin::sim {
namespace {

constexpr double k_clock_tolerance_s = 1.0;

std::optional<double> number_at(const nlohmann::json& j, const char* key) {
  const auto it = j.find(key);
  if (it == j.end() || !it->is_number()) return std::nullopt;
  return it->get<double>();
}

bool flag_at(const nlohmann::json& j, const char* key, bool fallback) {
  const auto it = j.find(key);
  if (it == j.end()) return fallback;
  const auto* flag = it->get_ptr<const nlohmann::json::boolean_t*>();
  return flag ? *flag : fallback;
}

std::string text_at(const nlohmann::json& j, const char* key) {
  const auto it = j.find(key);
  if (it == j.end() || !it->is_string()) return {};
  return it->get<std::string>();
}

}  // namespace

service_watch::service_watch(const site_config& cfg, double ack_after_s, std::string operator_name, timestamp midnight)
    : prefix_(cfg.publish.prefix),
      ack_after_s_(ack_after_s),
      operator_name_(std::move(operator_name)),
      midnight_(midnight) {
  for (const auto& z : cfg.zones) {
    watched_zone w;
    w.id = z.id;
    zones_.push_back(std::move(w));
  }
}

std::vector<std::string> service_watch::topics() const {
  return {prefix_ + "/status", prefix_ + "/events", prefix_ + "/zone/+/state", prefix_ + "/loop/+/state"};
}

watched_zone* service_watch::find(const std::string& id) {
  for (auto& z : zones_) {
    if (z.id == id) return &z;
  }
  return nullptr;
}

std::optional<double> service_watch::take_time(const std::string& ts, double now_s) {
  if (ts.empty()) return std::nullopt;
  const auto t = parse_iso8601(ts);
  if (!t) return std::nullopt;
  const double s = seconds_between(midnight_, t.value());
  // A `ts` ahead of the simulator is a retained state of an earlier run, not the service's clock.
  if (s <= now_s + k_clock_tolerance_s && (!service_time_s_ || s > *service_time_s_)) service_time_s_ = s;
  return s;
}

void service_watch::take_alarm(watched_zone& z, bool active, bool acknowledged, double now_s,
                               std::optional<double> ts_s) {
  if (active && !z.alarm_active) {
    ++tally_.alarms_raised;
    ++tally_.alarms_by_zone[z.id];
    z.alarm_onsets_s.push_back(ts_s.value_or(now_s));
  }
  z.alarm_active = active;
  if (acknowledged) {
    z.ack_due_s.reset();
    z.ack_sent = false;
  } else if (z.acknowledged && ack_after_s_ > 0.0) {
    z.ack_due_s = now_s + ack_after_s_;  // newly unacknowledged (raised or re-armed)
    z.ack_sent = false;
  }
  z.acknowledged = acknowledged;
}

bool service_watch::on_message(const std::string& topic, std::string_view payload, double now_s) {
  if (topic.compare(0, prefix_.size() + 1, prefix_ + "/") != 0) return false;
  const std::string rest = topic.substr(prefix_.size() + 1);
  if (rest == "status") {
    const auto j = nlohmann::json::parse(payload.begin(), payload.end(), nullptr, false);
    tally_.online = !j.is_discarded() && j.is_object() && text_at(j, "state") == "online";
    return true;
  }
  if (rest == "events") {
    on_event(payload, now_s);
    return true;
  }
  if (rest.compare(0, 5, "zone/") == 0 && rest.size() > 11 && rest.compare(rest.size() - 6, 6, "/state") == 0) {
    on_zone_state(payload, now_s);
    return true;
  }
  // Another of the service's topics (loop states): only its clock matters here.
  const auto j = nlohmann::json::parse(payload.begin(), payload.end(), nullptr, false);
  if (!j.is_discarded() && j.is_object()) take_time(text_at(j, "ts"), now_s);
  return true;
}

void service_watch::on_zone_state(std::string_view payload, double now_s) {
  const auto j = nlohmann::json::parse(payload.begin(), payload.end(), nullptr, false);
  if (j.is_discarded() || !j.is_object()) return;
  const auto ts_s = take_time(text_at(j, "ts"), now_s);
  watched_zone* z = find(text_at(j, "zone"));
  if (!z) return;
  z->band = text_at(j, "band");
  z->margin_k = number_at(j, "margin_k");
  const auto a = j.find("alarm");
  if (a != j.end() && a->is_object()) {
    take_alarm(*z, flag_at(*a, "active", false), flag_at(*a, "acknowledged", true), now_s, ts_s);
  }
}

void service_watch::on_event(std::string_view payload, double now_s) {
  const auto j = nlohmann::json::parse(payload.begin(), payload.end(), nullptr, false);
  if (j.is_discarded() || !j.is_object()) return;
  const auto ts_s = take_time(text_at(j, "ts"), now_s);
  const std::optional<event_kind> kind = parse_event_kind(text_at(j, "kind"));
  const std::string to = text_at(j, "to");
  if (kind) {
    switch (*kind) {
      case event_kind::band:
        ++tally_.band_events;
        if (!text_at(j, "dehumidifier").empty()) {
          // The unit's own alarm (its fault): one root-cause alarm, counted apart from the zones'.
          if (to == "fault") tally_.unit_alarm_onsets_s.push_back(ts_s.value_or(now_s));
          break;
        }
        ++tally_.bands_entered[to];
        break;
      case event_kind::ack:
        ++tally_.acknowledged;
        break;
      case event_kind::valve:
        if (to == "closed") ++tally_.valves_closed;
        if (to == "open") ++tally_.valves_opened;
        break;
      case event_kind::setpoint:
        ++tally_.setpoint_events;
        break;
      case event_kind::dehumidify:
        ++tally_.dehumidify_events;
        break;
      case event_kind::input:
        ++tally_.input_events;
        break;
      case event_kind::rejected:
        ++tally_.rejected;
        break;
      case event_kind::shelve:
      case event_kind::unshelve:
      case event_kind::service:
        break;
    }
  }
  watched_zone* z = find(text_at(j, "zone"));
  const auto a = j.find("alarm");
  if (z && a != j.end() && a->is_object()) {
    if (kind == event_kind::band) z->band = to;
    take_alarm(*z, flag_at(*a, "active", false), flag_at(*a, "acknowledged", true), now_s, ts_s);
  }
}

void service_watch::operator_actions(double now_s, std::vector<outbound>& out) {
  for (auto& z : zones_) {
    if (z.acknowledged || z.ack_sent || !z.ack_due_s || now_s < *z.ack_due_s) continue;
    nlohmann::json cmd;
    cmd["zone"] = z.id;
    cmd["by"] = operator_name_;
    cmd["note"] = "acknowledged by the simulated operator";
    out.push_back({prefix_ + "/cmd/ack", json_dump(cmd), false, 1});
    z.ack_sent = true;
    ++tally_.acks_sent;
  }
}

const watched_zone* service_watch::worst_zone() const {
  const watched_zone* worst = nullptr;
  for (const auto& z : zones_) {
    if (z.margin_k && (!worst || *z.margin_k < *worst->margin_k)) worst = &z;
  }
  return worst;
}

int service_watch::unknown_zones() const {
  int n = 0;
  for (const auto& z : zones_) n += z.band == "unknown" ? 1 : 0;
  return n;
}

}  // namespace dewmargin::sim
