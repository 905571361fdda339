#pragma once
// The Prometheus text exposition format (version 0.0.4) of the service's live state:
// each family once, with its HELP and TYPE lines before its samples; label values escaped
// (backslash, double quote, line feed); counters end in _total; base units in the names
// (celsius, kelvin, seconds). An unknown value (null in the state) has no sample: absent,
// not NaN, so alert rules see "no data" rather than a number.
#include <string>

#include "dewmargin/live_snapshot.h"

namespace dewmargin {

[[nodiscard]] std::string format_metrics(const live_snapshot::copy& snapshot);

// For the format's rules: \ → \\, " → \", line feed → \n.
[[nodiscard]] std::string escape_label_value(const std::string& value);

}  // namespace dewmargin
