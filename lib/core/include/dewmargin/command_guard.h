#pragma once
// Limits on operator commands, so that a flood on <prefix>/cmd/ can neither drown the
// event log nor starve supervision (documented in DEVELOPERS.md, "Commands"):
//   - at most k_command_rate_per_s commands a second, bursts of k_command_burst (a token
//     bucket in event time); the rest are dropped, counted, and reported by at most one
//     `rejected` event a second;
//   - one `rejected` event per change of (topic, kind of rejection, reason); the same
//     rejection again within k_rejection_repeat_s is counted, not reported. The reason is part
//     of the key so that an operator who corrects one mistake and makes another is told so.
#include <cstdint>
#include <optional>
#include <string>

#include "dewmargin/timestamp.h"

namespace dewmargin {

inline constexpr double k_command_rate_per_s = 10.0;
inline constexpr double k_command_burst = 20.0;
inline constexpr double k_rejection_repeat_s = 10.0;
inline constexpr double k_rate_limit_report_s = 1.0;

enum class rejection_kind {
  too_large,        // payload over k_max_command_bytes
  unknown_command,  // not ack, shelve or unshelve
  malformed,        // not JSON, a missing or wrongly typed field, minutes out of range
  unknown_zone,     // names no configured zone
  refused,          // valid, but nothing to do (nothing to acknowledge, not shelved)
  rate_limited,     // beyond the command rate
};
const char* rejection_kind_name(rejection_kind k);

// Refills at rate_per_s up to burst; take() spends one token when there is one.
class token_bucket {
 public:
  token_bucket(double rate_per_s, double burst) : rate_per_s_(rate_per_s), burst_(burst), tokens_(burst) {}
  bool take(timestamp now);

 private:
  double rate_per_s_;
  double burst_;
  double tokens_;
  std::optional<timestamp> last_;
};

class command_guard {
 public:
  // True when the command may be handled; false when it is over the rate (counted).
  bool admit(timestamp now);
  // True when a `rate_limited` rejection should be reported now (at most once a second).
  bool report_rate_limit(timestamp now);
  // True when this rejection should become an event; false when it repeats the last one.
  bool report_rejection(const std::string& topic, rejection_kind kind, const std::string& reason, timestamp now);

  [[nodiscard]] std::uint64_t dropped() const { return dropped_; }

 private:
  token_bucket bucket_{k_command_rate_per_s, k_command_burst};
  std::uint64_t dropped_ = 0;
  std::optional<timestamp> last_rate_report_;
  std::string last_topic_;
  std::optional<rejection_kind> last_kind_;
  std::string last_reason_;
  std::optional<timestamp> last_report_;
};

}  // namespace dewmargin
