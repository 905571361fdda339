// Placeholder until the YAML loader lands in this same change; reports the file as unreadable.
#include "dewmargin/config_loader.h"

namespace dewmargin {

std::string config_diagnostic::to_string() const {
  if (line == 0) return file + ": " + message;
  return file + ":" + std::to_string(line) + ":" + std::to_string(column) + ": " + message;
}

config_load_result load_config_text(std::string_view, const std::string& file_label) {
  config_load_result r;
  r.errors.push_back({file_label, 0, 0, "config loading not implemented yet"});
  return r;
}

config_load_result load_config_file(const std::filesystem::path& file) { return load_config_text("", file.string()); }

}  // namespace dewmargin
