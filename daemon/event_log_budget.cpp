#include "event_log_budget.h"

namespace dewmargin::daemon {

bool event_log_budget::admit(const std::string& kind) {
  const bool quiet = quiet_kind(kind);
  if (!throttled_kind(kind) && !quiet) return true;
  tally& t = events_[kind];
  t.quiet = quiet;
  ++t.seen;
  if (throttled_kind(kind) && t.logged >= limits_.lines_per_kind) return false;
  ++t.logged;
  return true;
}

void event_log_budget::count(const std::string& what, std::uint64_t n) {
  if (n > 0) counted_[what] += n;
}

std::optional<std::string> event_log_budget::summary_due(clock::time_point now) {
  if (now - window_start_ < limits_.window) return std::nullopt;
  const auto seconds = std::chrono::duration_cast<std::chrono::seconds>(now - window_start_).count();
  window_start_ = now;
  bool held_back = false;
  for (const auto& [kind, t] : events_) held_back = held_back || t.seen > t.logged || t.quiet;
  std::string text;
  if (held_back || !counted_.empty()) {
    text = "in the last " + std::to_string(seconds) + " s:";
    const char* sep = " ";
    for (const auto& [kind, t] : events_) {
      text += sep + std::to_string(t.seen) + " " + kind + " events (" + std::to_string(t.logged) +
              (t.quiet ? " logged at debug)" : " logged)");
      sep = ", ";
    }
    for (const auto& [what, n] : counted_) {
      text += sep + std::to_string(n) + " " + what;
      sep = ", ";
    }
  }
  events_.clear();
  counted_.clear();
  if (text.empty()) return std::nullopt;
  return text;
}

}  // namespace dewmargin::daemon
