#include "logging.h"

#include <spdlog/pattern_formatter.h>
#include <spdlog/sinks/stdout_sinks.h>
#include <sys/stat.h>

#include <cstdio>
#include <cstdlib>

namespace dewmargin::daemon {
namespace {

// "%*": the syslog priority prefix journald understands (SyslogLevelPrefix=yes).
class syslog_priority_flag : public spdlog::custom_flag_formatter {
 public:
  void format(const spdlog::details::log_msg& msg, const std::tm&, spdlog::memory_buf_t& dest) override {
    const char* p = "<6>";
    switch (msg.level) {
      case spdlog::level::trace:
      case spdlog::level::debug: p = "<7>"; break;
      case spdlog::level::info: p = "<6>"; break;
      case spdlog::level::warn: p = "<4>"; break;
      case spdlog::level::err: p = "<3>"; break;
      case spdlog::level::critical: p = "<2>"; break;
      case spdlog::level::off:
      case spdlog::level::n_levels: break;
    }
    dest.append(p, p + 3);
  }
  [[nodiscard]] std::unique_ptr<custom_flag_formatter> clone() const override {
    return std::make_unique<syslog_priority_flag>();
  }
};

}  // namespace

bool stderr_is_journal() {
  const char* js = std::getenv("JOURNAL_STREAM");
  if (!js) return false;
  unsigned long dev = 0, ino = 0;
  if (std::sscanf(js, "%lu:%lu", &dev, &ino) != 2) return false;
  struct stat st {};
  if (fstat(2, &st) != 0) return false;
  return st.st_dev == dev && st.st_ino == ino;
}

std::shared_ptr<spdlog::logger> make_logger(bool journal_format) {
  auto sink = std::make_shared<spdlog::sinks::stderr_sink_mt>();
  std::unique_ptr<spdlog::pattern_formatter> formatter;
  if (journal_format) {
    formatter = std::make_unique<spdlog::pattern_formatter>();
    formatter->add_flag<syslog_priority_flag>('*').set_pattern("%*%v");
  } else {
    formatter = std::make_unique<spdlog::pattern_formatter>("%Y-%m-%dT%H:%M:%S.%eZ %l %v",
                                                            spdlog::pattern_time_type::utc);
  }
  sink->set_formatter(std::move(formatter));
  auto log = std::make_shared<spdlog::logger>("dewmargind", std::move(sink));
  log->flush_on(spdlog::level::info);
  return log;
}

bool parse_log_level(const std::string& text, spdlog::level::level_enum& out) {
  static constexpr const char* k_names[] = {"trace", "debug", "info", "warn", "error", "critical", "off"};
  for (int i = 0; i < 7; ++i) {
    if (text == k_names[i]) {
      out = static_cast<spdlog::level::level_enum>(i);
      return true;
    }
  }
  return false;
}

std::string problem_reporter::problem_key(const std::string& message) {
  constexpr std::size_t k_max_key = 200;
  std::string key;
  for (std::size_t i = 0; i < message.size() && key.size() < k_max_key; ++i) {
    const auto is_digit = [&](std::size_t j) { return j < message.size() && message[j] >= '0' && message[j] <= '9'; };
    // A decimal point inside a number belongs to it ("0.25" and "30" are both "#").
    const bool digit = is_digit(i) || (message[i] == '.' && i > 0 && is_digit(i - 1) && is_digit(i + 1));
    if (!digit) {
      key.push_back(message[i]);
    } else if (key.empty() || key.back() != '#') {
      key.push_back('#');
    }
  }
  return key;
}

void problem_reporter::report(spdlog::level::level_enum level, const std::string& message) {
  if (level < spdlog::level::warn) {
    log_->log(level, "{}", message);
    return;
  }
  const auto now = std::chrono::steady_clock::now();
  unsigned held_back = 0;
  {
    std::lock_guard<std::mutex> lock(mutex_);
    auto& s = seen_[problem_key(message)];
    if (s.last.time_since_epoch().count() != 0 && now - s.last < interval_) {
      ++s.held_back;
      return;
    }
    held_back = s.held_back;
    s.held_back = 0;
    s.last = now;
    if (seen_.size() > 1000) seen_.clear();  // bounded: distinct problems are few
  }
  if (held_back > 0) {
    log_->log(level, "{} ({} similar held back)", message, held_back);
  } else {
    log_->log(level, "{}", message);
  }
}

}  // namespace dewmargin::daemon
