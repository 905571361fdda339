#pragma once
// Wall-clock instants as the core sees them: milliseconds since the Unix epoch, UTC.
// The core never reads a clock; callers pass `now` in.
#include <chrono>
#include <cstdint>
#include <string>
#include <string_view>

#include "dewmargin/result.h"

namespace dewmargin {

using timestamp = std::chrono::time_point<std::chrono::system_clock, std::chrono::milliseconds>;

inline timestamp from_unix_ms(std::int64_t ms) { return timestamp{std::chrono::milliseconds{ms}}; }
inline std::int64_t to_unix_ms(timestamp t) { return t.time_since_epoch().count(); }
inline double seconds_between(timestamp from, timestamp to) {
  return static_cast<double>((to - from).count()) / 1000.0;
}

// "2026-07-14T13:00:00Z"; milliseconds are added (".250Z") only when not zero.
std::string format_iso8601_utc(timestamp t);

// Accepts "2026-07-14", "2026-07-14T13:00:00Z", "2026-07-14T13:00:00.5Z",
// "2026-07-14T13:00:00+02:00" and "2026-07-14 13:00:00" (taken as UTC).
result<timestamp> parse_iso8601(std::string_view text);

}  // namespace dewmargin
