#include "message_containment.h"

#include <algorithm>
#include <cstdio>

namespace dewmargin::daemon {

std::string escape_for_report(const std::string& text, std::size_t max_bytes) {
  std::string out;
  const std::size_t n = std::min(text.size(), max_bytes);
  out.reserve(n + 8);
  for (std::size_t i = 0; i < n; ++i) {
    const auto c = static_cast<unsigned char>(text[i]);
    if (c >= 0x20 && c < 0x7f && c != '\\') {
      out.push_back(static_cast<char>(c));
    } else {
      char hex[5];
      std::snprintf(hex, sizeof hex, "\\x%02x", c);
      out += hex;
    }
  }
  if (text.size() > n) out += "...";
  return out;
}

void message_containment::dropped(const std::string& topic, const char* what, clock::time_point now) {
  ++dropped_total_;
  if (last_report_ && now - *last_report_ < interval_) {
    ++held_back_;
    return;
  }
  const containment_report r{escape_for_report(topic), escape_for_report(what), held_back_};
  held_back_ = 0;
  last_report_ = now;
  // Called from run()'s handler: what the reporter throws leaves run(), not contained.
  report_(r);
}

}  // namespace dewmargin::daemon
