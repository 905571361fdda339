#include "dewmargin/live_snapshot.h"

#include <optional>

#include "dewmargin/live_book.h"

namespace dewmargin {

live_snapshot::live_snapshot(std::string prefix, std::string site, std::string version)
    : prefix_(std::move(prefix)), site_(std::move(site)), version_(std::move(version)) {}

void live_snapshot::on_published(const std::string& topic, const std::string& payload) {
  if (topic.size() <= prefix_.size() || topic.compare(0, prefix_.size(), prefix_) != 0 ||
      topic[prefix_.size()] != '/') {
    return;
  }
  const std::string rest = topic.substr(prefix_.size() + 1);
  const auto ends_with_state = rest.size() > 6 && rest.compare(rest.size() - 6, 6, "/state") == 0;
  const bool zone = ends_with_state && rest.rfind("zone/", 0) == 0;
  const bool other_state = ends_with_state && (rest.rfind("loop/", 0) == 0 || rest.rfind("dehumidifier/", 0) == 0);
  if (!zone && !other_state) return;
  // Parsed outside the lock: the lock only guards map assignments.
  std::optional<live::zone_view> view;
  if (zone) {
    auto parsed = live::parse_zone_state(payload);
    if (parsed) view = std::move(parsed).value();
  }
  const std::lock_guard<std::mutex> lock(mutex_);
  if (payload.empty()) {
    states_.erase(topic);
    return;
  }
  states_[topic] = payload;
  if (view && view->ts) history_.add(view->zone, *view->ts, view->margin_k);
}

void live_snapshot::set_counters(const service_counters& counters) {
  const std::lock_guard<std::mutex> lock(mutex_);
  counters_ = counters;
}

live_snapshot::copy live_snapshot::take(bool with_history) const {
  copy c;
  c.prefix = prefix_;
  c.site = site_;
  c.version = version_;
  std::optional<live::margin_history> history;
  {
    // Only copies under the lock: the worker waits for a copy at most, never for a client.
    const std::lock_guard<std::mutex> lock(mutex_);
    c.states = states_;
    c.counters = counters_;
    if (with_history) history = history_;
  }
  if (history) {
    for (const auto& key : history->keys()) c.margins.emplace(key, history->series(key));
  }
  return c;
}

}  // namespace dewmargin
