#pragma once
// Collects the located errors of one config file. Readers keep going after an error,
// so one pass finds every mistake; the list is handed out in file order, once each.
// Every message is made printable UTF-8 here (see safe_text.h).
#include <string>
#include <vector>

#include "dewmargin/config_loader.h"

namespace dewmargin::config_detail {

// A place in the file, 1-based. {0, 0} means "no place" (the file as a whole).
struct source_mark {
  int line = 0;
  int column = 0;
};

class diagnostics {
 public:
  explicit diagnostics(std::string file_label) : file_(std::move(file_label)) {}

  void error(source_mark at, std::string message);
  [[nodiscard]] bool empty() const { return errors_.empty(); }

  // Sorted by place (stable for errors at one place), exact repeats dropped.
  [[nodiscard]] std::vector<config_diagnostic> take_in_file_order();

 private:
  std::string file_;
  std::vector<config_diagnostic> errors_;
};

}  // namespace dewmargin::config_detail
