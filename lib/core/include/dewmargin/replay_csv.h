#pragma once
// Readings for `dewmargin replay`: CSV with columns ts,topic,payload (RFC 4180 quoting,
// so JSON payloads with commas and quotes fit in one field). `ts` is ISO 8601 or seconds
// from `start`. A header row "ts,topic,payload" and lines starting with '#' are skipped.
// A malformed record is an error naming its line, never skipped.
#include <string>
#include <string_view>
#include <vector>

#include "dewmargin/result.h"
#include "dewmargin/timestamp.h"

namespace dewmargin {

struct replay_row {
  int line = 0;  // 1-based line where the record starts
  timestamp ts;
  std::string topic;
  std::string payload;
};

// Parses the whole text; the error message starts with "LINE: ".
result<std::vector<replay_row>> parse_replay_csv(std::string_view text, timestamp start);

}  // namespace dewmargin
