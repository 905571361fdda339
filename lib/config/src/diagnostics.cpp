#include "diagnostics.h"

#include <algorithm>
#include <tuple>

#include "dewmargin/safe_text.h"

namespace dewmargin {

// The file name is outside text too: written printable, like every message.
std::string config_diagnostic::to_string() const {
  const std::string name = printable_text(file);
  if (line == 0) return name + ": " + message;
  return name + ":" + std::to_string(line) + ":" + std::to_string(column) + ": " + message;
}

namespace config_detail {

// Messages quote what the file holds (keys, values): made printable UTF-8 and kept to
// one line of reasonable length here, so that no byte of a file reaches a log line or
// a JSON event raw.
void diagnostics::error(source_mark at, std::string message) {
  constexpr std::size_t k_max_message_bytes = 400;
  errors_.push_back({file_, at.line, at.column, text_excerpt(message, k_max_message_bytes)});
}

std::vector<config_diagnostic> diagnostics::take_in_file_order() {
  std::stable_sort(errors_.begin(), errors_.end(), [](const config_diagnostic& a, const config_diagnostic& b) {
    return std::tie(a.line, a.column) < std::tie(b.line, b.column);
  });
  // Two readers may notice the same thing (an alias read twice): report it once.
  std::vector<config_diagnostic> unique;
  for (auto& d : errors_) {
    const bool seen = std::any_of(unique.begin(), unique.end(), [&](const config_diagnostic& u) {
      return u.line == d.line && u.column == d.column && u.message == d.message;
    });
    if (!seen) unique.push_back(std::move(d));
  }
  errors_.clear();
  return unique;
}

}  // namespace config_detail
}  // namespace dewmargin
