#include "dewmargin/command_guard.h"

#include <algorithm>

namespace dewmargin {

const char* rejection_kind_name(rejection_kind k) {
  switch (k) {
    case rejection_kind::too_large:
      return "too_large";
    case rejection_kind::unknown_command:
      return "unknown_command";
    case rejection_kind::malformed:
      return "malformed";
    case rejection_kind::unknown_zone:
      return "unknown_zone";
    case rejection_kind::refused:
      return "refused";
    case rejection_kind::rate_limited:
      return "rate_limited";
  }
  return "malformed";
}

bool token_bucket::take(timestamp now) {
  if (last_) {
    const double elapsed_s = std::max(0.0, seconds_between(*last_, now));
    tokens_ = std::min(burst_, tokens_ + elapsed_s * rate_per_s_);
  }
  last_ = now;
  if (tokens_ < 1.0) return false;
  tokens_ -= 1.0;
  return true;
}

bool command_guard::admit(timestamp now) {
  if (bucket_.take(now)) return true;
  ++dropped_;
  return false;
}

bool command_guard::report_rate_limit(timestamp now) {
  if (last_rate_report_ && seconds_between(*last_rate_report_, now) < k_rate_limit_report_s) return false;
  last_rate_report_ = now;
  return true;
}

bool command_guard::report_rejection(const std::string& topic, rejection_kind kind, const std::string& reason,
                                     timestamp now) {
  const bool repeat = last_kind_ == kind && last_topic_ == topic && last_reason_ == reason && last_report_ &&
                      seconds_between(*last_report_, now) < k_rejection_repeat_s;
  if (repeat) return false;
  last_topic_ = topic;
  last_kind_ = kind;
  last_reason_ = reason;
  last_report_ = now;
  return true;
}

}  // namespace dewmargin
