#pragma once
// YAML → site_config, validated. Every problem of a file is reported in one pass,
// each located as FILE:LINE:COL (1-based) so an operator can jump to it.
#include <filesystem>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "dewmargin/config.h"

namespace dewmargin {

struct config_diagnostic {
  std::string file;
  int line = 0;    // 1-based; 0 when the problem has no place (file unreadable)
  int column = 0;  // 1-based
  std::string message;

  // "FILE:LINE:COL: message" (or "FILE: message" without a place).
  [[nodiscard]] std::string to_string() const;
};

struct config_load_result {
  std::optional<site_config> config;           // set only when `errors` is empty
  std::vector<config_diagnostic> errors;       // in file order
  [[nodiscard]] bool ok() const { return config.has_value() && errors.empty(); }
};

// Reads and validates a config file. Never throws.
config_load_result load_config_file(const std::filesystem::path& file);

// Same for text already in memory; `file_label` is used in diagnostics.
config_load_result load_config_text(std::string_view yaml_text, const std::string& file_label);

}  // namespace dewmargin
