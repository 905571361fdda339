#pragma once
// The file as text, before YAML: a config file is UTF-8 text. Bytes that are not
// (random junk, a Latin-1 file, a binary) are reported where they stand, and the YAML
// parser never sees them.
#include <string_view>

#include "diagnostics.h"

namespace dewmargin::config_detail {

// Reports each line holding an ill-formed UTF-8 sequence or a control character other
// than tab and line breaks (at most a few lines, then how many more). Returns whether the
// text is fit to parse. A leading byte-order mark is allowed.
bool check_config_text(std::string_view text, diagnostics& diag);

// Why a string value may not be used ("" when it may): not UTF-8, or holds a control
// character (possible through YAML escapes such as "\0" or "\e").
std::string text_value_problem(std::string_view value);

}  // namespace dewmargin::config_detail
