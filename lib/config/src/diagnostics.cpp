#include "diagnostics.h"

#include <algorithm>
#include <tuple>

namespace dewmargin {

std::string config_diagnostic::to_string() const {
  if (line == 0) return file + ": " + message;
  return file + ":" + std::to_string(line) + ":" + std::to_string(column) + ": " + message;
}

namespace config_detail {

void diagnostics::error(source_mark at, std::string message) {
  errors_.push_back({file_, at.line, at.column, std::move(message)});
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
