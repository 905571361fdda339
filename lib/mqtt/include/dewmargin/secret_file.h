#pragma once
// Reads a one-line secret (the broker password) from a file. Trailing line breaks are
// stripped; everything else is kept as written. The secret never appears in an error.
#include <filesystem>
#include <string>

#include "dewmargin/result.h"

namespace dewmargin {

// Errors name the file and why it could not be used (missing, unreadable, empty, open
// to group or others, owned by another user: see secret_file_rule.h).
[[nodiscard]] result<std::string> read_secret_file(const std::filesystem::path& file);

}  // namespace dewmargin
