#pragma once
// Shared by the fuzz targets: properties every output must have, checked on every input.
// A broken property aborts, which libFuzzer reports as a crash with the input saved, and
// which fails the corpus replay under ctest.
#include <cstdio>
#include <cstdlib>
#include <nlohmann/json.hpp>
#include <string>
#include <string_view>

#include "dewmargin/safe_text.h"

namespace dewmargin::fuzz {

[[noreturn]] inline void fail(const char* what, std::string_view text) {
  std::fprintf(stderr, "fuzz property broken: %s: %s\n", what, printable_text(text).c_str());
  std::abort();
}

inline void require(bool holds, const char* what, std::string_view text = {}) {
  if (!holds) fail(what, text);
}

// A message for a log line or a quoted reason: valid UTF-8, one line, no control character.
inline void require_printable(std::string_view message, const char* what) {
  require(is_valid_utf8(message), what, message);
  require(first_control_char(message) == std::string_view::npos, what, message);
}

// A document the programs publish: valid UTF-8 and JSON that reads back.
inline void require_json(std::string_view text, const char* what) {
  require(is_valid_utf8(text), what, text);
  require(nlohmann::json::accept(text), what, text);
}

// Splits the input into `n` pieces at 0xFF bytes (missing pieces are empty), so that one
// input can fill several strings.
template <std::size_t n>
struct pieces {
  std::string part[n];
  explicit pieces(std::string_view data) {
    std::size_t i = 0;
    for (const char c : data) {
      if (static_cast<unsigned char>(c) == 0xFF && i + 1 < n) {
        ++i;
      } else {
        part[i] += c;
      }
    }
  }
};

}  // namespace dewmargin::fuzz
