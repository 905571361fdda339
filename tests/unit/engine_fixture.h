#pragma once
// A small site built in code, and a driver that feeds the engine readings on simulated
// time and keeps what it published — shared by the engine tests.
#include <cmath>
#include <cstdio>
#include <memory>
#include <nlohmann/json.hpp>
#include <string>
#include <utility>
#include <vector>

#include "dewmargin/config.h"
#include "dewmargin/engine.h"
#include "dewmargin/tick_driver.h"

namespace dewmargin::testing_support {

inline input_config topic_input(const std::string& topic) {
  input_config c;
  c.topic = topic;
  return c;
}

// One loop "loop-a" with supply/return/flow; zones "z1" (one surface, switch, window,
// valve) and "z2" (no surface: supply fallback, valve); dehumidifier "doas-1" on both.
inline site_config small_site() {
  site_config s;
  s.site = "test-site";
  s.broker.client_id = "test";
  s.publish.prefix = "dm";
  s.publish.min_interval_s = 5;
  loop_config l;
  l.id = "loop-a";
  l.supply_temp = topic_input("plant/a/supply");
  l.return_temp = topic_input("plant/a/return");
  l.flow = topic_input("plant/a/flow");
  l.setpoint.topic = "plant/a/sp";
  l.setpoint.min_c = 15.0;
  l.setpoint.max_c = 20.0;
  l.setpoint.reset_margin_k = 2.0;
  l.setpoint.fall_k_per_min = 0.2;
  s.loops.push_back(l);

  zone_config z1;
  z1.id = "z1";
  z1.loop = "loop-a";
  z1.air_temp = topic_input("b/z1/temp");
  z1.humidity.push_back(topic_input("b/z1/rh"));
  z1.surfaces.push_back(topic_input("b/z1/surface"));
  z1.condensation_switch = topic_input("b/z1/wet");
  z1.condensation_switch->active = {"1", "wet"};
  z1.window_contact = topic_input("b/z1/window");
  z1.window_contact->active = {"open"};
  z1.valve = valve_config{"b/z1/valve", "open", "closed", 600.0};
  s.zones.push_back(z1);

  zone_config z2;
  z2.id = "z2";
  z2.loop = "loop-a";
  z2.air_temp = topic_input("b/z2/temp");
  z2.humidity.push_back(topic_input("b/z2/rh"));
  z2.valve = valve_config{"b/z2/valve", "OPEN", "CLOSED", 600.0};
  s.zones.push_back(z2);

  dehumidifier_config d;
  d.id = "doas-1";
  d.zones = {"z1", "z2"};
  d.dew_point_request = {"plant/doas/dp", 8.0, 14.0, 3.0};
  s.dehumidifiers.push_back(d);
  return s;
}

// Relative humidity (%) of air at `air_c` whose dew point is `dew_point_c`: the Magnus
// formula with Sonntag's coefficients as given in WMO-No. 8 (17.62, 243.12 °C), inverted.
inline double rh_for(double air_c, double dew_point_c) {
  const double a = 17.62, b = 243.12;
  return 100.0 * std::exp(a * dew_point_c / (b + dew_point_c) - a * air_c / (b + air_c));
}

inline std::string bare(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.2f", std::round(v * 100.0) / 100.0);
  return buf;
}

struct published {
  std::string topic;
  std::string payload;
  bool retained;
  message_class cls;
  nlohmann::json json() const { return nlohmann::json::parse(payload, nullptr, false); }
};

class engine_driver {
 public:
  explicit engine_driver(site_config cfg, std::int64_t start_s = 1'800'000'000, const restored_state& restored = {})
      : engine_(std::make_unique<engine>(std::move(cfg))), now_(from_unix_ms(start_s * 1000)), ticks_(now_) {
    engine_->begin(now_, restored, out_);
    collect();
  }

  // A config reload, as the service does it: a new engine adopts the running one; time and
  // ticks go on.
  void reload(site_config cfg) {
    auto fresh = std::make_unique<engine>(std::move(cfg));
    fresh->adopt(*engine_, now_, out_);
    engine_ = std::move(fresh);
    collect();
  }

  // Advances simulated time by `seconds`, ticking by the core's rule (tick_driver.h), then delivers.
  void at(double seconds_from_now, const std::string& topic, const std::string& payload) {
    advance(seconds_from_now);
    engine_->on_message(topic, payload, now_, out_);
    collect();
  }
  void send(const std::string& topic, const std::string& payload) { at(0, topic, payload); }
  // What the service does after a reconnect (the broker may have lost its retained messages).
  void republish() {
    engine_->republish(now_, out_);
    collect();
  }
  void advance(double seconds) {
    const timestamp until = now_ + std::chrono::milliseconds(static_cast<std::int64_t>(seconds * 1000.0));
    ticks_.advance_to(until, [this](timestamp at) {
      engine_->tick(at, out_);
      collect();
    });
    now_ = until;
  }
  // Feeds a full set of readings for a zone-1/zone-2 site in one go.
  void readings(double z1_temp, double z1_rh, double z1_surface, double supply, double z2_temp = 24,
                double z2_rh = 40) {
    readings_without("", z1_temp, z1_rh, z1_surface, supply, z2_temp, z2_rh);
  }
  // The same set with one topic left silent (24 °C/50 %, surface 17, supply 16, z2 24 °C/40 %).
  void readings_without(const std::string& silent, double z1_temp = 24, double z1_rh = 50, double z1_surface = 17,
                        double supply = 16, double z2_temp = 24, double z2_rh = 40) {
    const std::pair<const char*, double> all[] = {{"plant/a/supply", supply}, {"b/z1/temp", z1_temp},
                                                  {"b/z1/rh", z1_rh},          {"b/z1/surface", z1_surface},
                                                  {"b/z2/temp", z2_temp},      {"b/z2/rh", z2_rh}};
    for (const auto& [topic, value] : all) {
      if (topic != silent) send(topic, std::to_string(value));
    }
  }

  std::vector<nlohmann::json> events(const std::string& kind = "") const {
    std::vector<nlohmann::json> r;
    for (const auto& p : log_) {
      if (p.topic != "dm/events") continue;
      auto j = p.json();
      if (kind.empty() || j["kind"] == kind) r.push_back(j);
    }
    return r;
  }
  // `input` events about one topic.
  std::vector<nlohmann::json> input_events(const std::string& topic) const {
    std::vector<nlohmann::json> r;
    for (const auto& e : events("input")) {
      if (e["topic"] == topic) r.push_back(e);
    }
    return r;
  }
  std::vector<published> on_topic(const std::string& topic) const {
    std::vector<published> r;
    for (const auto& p : log_) {
      if (p.topic == topic) r.push_back(p);
    }
    return r;
  }
  nlohmann::json last_json(const std::string& topic) const {
    const auto r = on_topic(topic);
    return r.empty() ? nlohmann::json() : r.back().json();
  }
  std::string last_payload(const std::string& topic) const {
    const auto r = on_topic(topic);
    return r.empty() ? std::string() : r.back().payload;
  }
  void clear_log() {
    log_.clear();
    stored_.clear();
  }
  const std::vector<published>& log() const { return log_; }
  const engine_output& stored() const { return stored_; }
  engine& core() { return *engine_; }
  timestamp now() const { return now_; }

 private:
  void collect() {
    for (auto& m : out_.messages) log_.push_back({m.topic, m.payload, m.retained, m.cls});
    for (auto& e : out_.events) stored_.events.push_back(e);
    for (auto& s : out_.samples) stored_.samples.push_back(s);
    for (auto& s : out_.zone_snapshots) stored_.zone_snapshots.push_back(s);
    for (auto& s : out_.loop_snapshots) stored_.loop_snapshots.push_back(s);
    out_.clear();
  }

  std::unique_ptr<engine> engine_;
  engine_output out_;
  engine_output stored_;
  std::vector<published> log_;
  timestamp now_;
  tick_driver ticks_;
};

}  // namespace dewmargin::testing_support
