#pragma once
// Which event lines reach the log, and at what level, so that a flood of bad inputs or
// rejected commands, or a day of setpoint moves, cannot fill the journal: alarm-related
// events (band, ack, shelve, unshelve, valve, dehumidifier alarm) and service events are
// written at info; `setpoint`, `dehumidify` and `input` events at debug (quiet kinds);
// `input` and `rejected` events get a budget of lines per kind and window, the rest only
// counted. Once a window has passed, a summary line at info gives the counts by kind with
// what was held back or written at debug, and the drops and contained faults the service
// counted meanwhile. Time is a parameter (testable).
#include <chrono>
#include <cstdint>
#include <map>
#include <optional>
#include <string>

namespace dewmargin::daemon {

class event_log_budget {
 public:
  using clock = std::chrono::steady_clock;

  struct limits {
    std::chrono::seconds window{60};
    std::uint64_t lines_per_kind = 5;  // of each throttled kind, per window
  };

  event_log_budget(limits l, clock::time_point start) : limits_(l), window_start_(start) {}

  // Counts the event; true when its line should be written.
  bool admit(const std::string& kind);

  // Counts something that appears only in the summary ("inbound dropped", ...).
  void count(const std::string& what, std::uint64_t n = 1);

  // Once the window has passed: the summary (nullopt when nothing was held back and nothing
  // counted), and a new window begins. Before that: nullopt.
  std::optional<std::string> summary_due(clock::time_point now);

  [[nodiscard]] static bool throttled_kind(const std::string& kind) { return kind == "input" || kind == "rejected"; }
  // Written at debug level, counted for the summary.
  [[nodiscard]] static bool quiet_kind(const std::string& kind) {
    return kind == "setpoint" || kind == "dehumidify" || kind == "input";
  }

 private:
  struct tally {
    std::uint64_t seen = 0;
    std::uint64_t logged = 0;
    bool quiet = false;
  };
  limits limits_;
  clock::time_point window_start_;
  std::map<std::string, tally> events_;           // throttled kinds only
  std::map<std::string, std::uint64_t> counted_;  // summary-only counters
};

}  // namespace dewmargin::daemon
