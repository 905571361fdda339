#pragma once
// Helpers shared by the link's integration tests: bounded polling, a report collector,
// and link options for a test broker.
#include <chrono>
#include <cstdio>
#include <memory>
#include <mutex>
#include <string>
#include <thread>
#include <vector>

#include "dewmargin/mqtt_link.h"

namespace dewmargin::test_support {

// Polls condition every 20 ms until it holds or timeout passes.
template <typename Condition>
bool eventually(Condition condition, std::chrono::milliseconds timeout) {
  const auto deadline = std::chrono::steady_clock::now() + timeout;
  while (!condition()) {
    if (std::chrono::steady_clock::now() >= deadline) return condition();
    std::this_thread::sleep_for(std::chrono::milliseconds(20));
  }
  return true;
}

// Collects what a link reports (and echoes it to stderr for failure diagnosis).
class report_log {
 public:
  void add(link_report_level level, const std::string& text) {
    std::fprintf(stderr, "[link %s] %s\n",
                 level == link_report_level::info      ? "info"
                 : level == link_report_level::warning ? "warn"
                                                       : "error",
                 text.c_str());
    std::lock_guard<std::mutex> lock(mutex_);
    lines_.push_back(text);
  }
  [[nodiscard]] std::vector<std::string> lines() const {
    std::lock_guard<std::mutex> lock(mutex_);
    return lines_;
  }
  [[nodiscard]] bool any_contains(const std::string& needle) const {
    std::lock_guard<std::mutex> lock(mutex_);
    for (const auto& l : lines_) {
      if (l.find(needle) != std::string::npos) return true;
    }
    return false;
  }

 private:
  mutable std::mutex mutex_;
  std::vector<std::string> lines_;
};

inline constexpr const char* k_status_topic = "svc/status";
inline constexpr const char* k_online = R"({"state":"online"})";
inline constexpr const char* k_offline = R"({"state":"offline"})";
inline constexpr const char* k_stopped = R"({"state":"stopped"})";

// Subscribes to in/# (commands under in/cmd/ are must-keep); publishes go under out/.
inline mqtt_link_options test_link_options(const std::string& uri, const std::string& client_id,
                                           const std::shared_ptr<report_log>& log) {
  mqtt_link_options o;
  o.broker.uri = uri;
  o.broker.client_id = client_id;
  o.broker.keepalive_s = 5;
  o.status_topic = k_status_topic;
  o.online_payload = k_online;
  o.offline_will_payload = k_offline;
  o.subscriptions = {"in/#"};
  o.must_keep_prefixes = {"in/cmd/"};
  o.inbound_capacity = 1000;
  o.outbox_capacity = 1000;
  o.reconnect_min = std::chrono::seconds(1);
  o.reconnect_max = std::chrono::seconds(2);
  o.connect_timeout = std::chrono::seconds(5);
  o.report = [log](link_report_level level, const std::string& text) { log->add(level, text); };
  return o;
}

inline outbound_message event_message(const std::string& topic, const std::string& payload) {
  return outbound_message{topic, payload, false, message_class::event};
}
inline outbound_message state_message(const std::string& topic, const std::string& payload) {
  return outbound_message{topic, payload, true, message_class::state};
}

}  // namespace dewmargin::test_support
