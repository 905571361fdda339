// The replay CSV reader: never crashes; an error names a line and is printable; rows that
// are read have times from 1970 to 9999 and topics an MQTT broker would carry.
#include <cstddef>
#include <cstdint>

#include "dewmargin/replay_csv.h"
#include "fuzz_checks.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace dewmargin;
  using namespace dewmargin::fuzz;
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  constexpr std::int64_t k_end_ms = 253'402'300'800'000;  // 10000-01-01
  const auto r = parse_replay_csv(text, from_unix_ms(1'784'030'400'000));
  if (!r) {
    require_printable(r.err().message, "replay error");
    require(r.err().message.find(": ") != std::string::npos, "replay error names a line", r.err().message);
    return 0;
  }
  int last_line = 0;
  for (const auto& row : r.value()) {
    require(row.line > last_line, "rows in line order");
    last_line = row.line;
    require(to_unix_ms(row.ts) >= 0 && to_unix_ms(row.ts) < k_end_ms, "ts in range", format_iso8601_utc(row.ts));
    require(!row.topic.empty() && is_valid_utf8(row.topic), "topic UTF-8", row.topic);
    require(row.topic.find_first_of(std::string("+#\0", 3)) == std::string::npos, "topic exact", row.topic);
    require(row.payload.find('\0') == std::string::npos, "payload without NUL", row.payload);
    require_printable(format_iso8601_utc(row.ts), "time text");
  }
  return 0;
}
