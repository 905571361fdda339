#pragma once
// Test helper: the demo config (config/demo.yaml), as is or with text replaced, loaded by the
// project's loader.
#include <fstream>
#include <sstream>
#include <string>
#include <utility>
#include <vector>

#include "dewmargin/config_loader.h"

namespace dewmargin::sim::testing {

inline std::string demo_config_text() {
  std::ifstream in(std::string(DEWMARGIN_SOURCE_DIR) + "/config/demo.yaml");
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

// Every occurrence of each `from` replaced by its `to`.
inline std::string replaced(std::string text, const std::vector<std::pair<std::string, std::string>>& edits) {
  for (const auto& [from, to] : edits) {
    for (std::size_t at = text.find(from); at != std::string::npos; at = text.find(from, at + to.size())) {
      text.replace(at, from.size(), to);
    }
  }
  return text;
}

inline config_load_result load_demo(const std::vector<std::pair<std::string, std::string>>& edits = {}) {
  return load_config_text(replaced(demo_config_text(), edits), "demo.yaml");
}

}  // namespace dewmargin::sim::testing
