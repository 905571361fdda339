#include "message_containment.h"

#include "dewmargin/safe_text.h"

namespace dewmargin::daemon {

void message_containment::dropped(const std::string& topic, const char* what, clock::time_point now) {
  ++dropped_total_;
  if (last_report_ && now - *last_report_ < interval_) {
    ++held_back_;
    return;
  }
  const containment_report r{text_excerpt(topic, k_report_bytes), text_excerpt(what, k_report_bytes), held_back_};
  held_back_ = 0;
  last_report_ = now;
  // Called from run()'s handler: what the reporter throws leaves run(), not contained.
  report_(r);
}

}  // namespace dewmargin::daemon
