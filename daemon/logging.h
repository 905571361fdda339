#pragma once
// spdlog set up for a service: stderr, with timestamps when run by hand and with syslog
// priority prefixes ("<4>...") instead when stderr goes to the journal (which adds its
// own timestamps). Repeated errors are rate-limited by the reporter.
#include <chrono>
#include <memory>
#include <mutex>
#include <spdlog/spdlog.h>
#include <string>
#include <unordered_map>

namespace dewmargin::daemon {

// True when stderr is connected to the systemd journal (JOURNAL_STREAM matches it).
bool stderr_is_journal();

std::shared_ptr<spdlog::logger> make_logger(bool journal_format);

// Parses "trace".."off"; false for anything else.
bool parse_log_level(const std::string& text, spdlog::level::level_enum& out);

// One place for problems reported by adapters from any thread (store, broker link).
// Warnings and errors: the same problem is logged at most once per interval, and the number
// of repeats held back is added to the next line that goes out. "The same problem" is the
// message with every number (digits, with a decimal point) taken as one ("commit of 12 rows" and "commit of 7 rows"
// are one problem), so counters in a message do not defeat the limit. Info lines (a
// connection made, a store opened again: recoveries) always go out.
class problem_reporter {
 public:
  problem_reporter(std::shared_ptr<spdlog::logger> log, std::chrono::seconds interval)
      : log_(std::move(log)), interval_(interval) {}
  void report(spdlog::level::level_enum level, const std::string& message);

  // The key under which repeats of a message are counted.
  [[nodiscard]] static std::string problem_key(const std::string& message);

 private:
  struct seen {
    std::chrono::steady_clock::time_point last;
    unsigned held_back = 0;
  };
  std::shared_ptr<spdlog::logger> log_;
  std::chrono::seconds interval_;
  std::mutex mutex_;
  std::unordered_map<std::string, seen> seen_;
};

}  // namespace dewmargin::daemon
