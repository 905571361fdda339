#pragma once
// Readings for `dewmargin replay`: CSV with columns ts,topic,payload (RFC 4180 quoting,
// so JSON payloads with commas and quotes fit in one field). The first record must be the
// header "ts,topic,payload" (a UTF-8 byte-order mark before it is skipped); lines starting
// with '#' and blank lines are not records. `ts` is ISO 8601 or seconds from `start`, and
// must lie from 1970-01-01 to 9999-12-31. A topic is UTF-8 without NUL or wildcards; a
// payload holds no NUL. A malformed record is an error naming its line, never skipped.
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
