#pragma once
// Builds and emits every event of <prefix>/events: the subject, its id and the kind are
// given once, the fields are added by the caller, and one call appends both the published
// message and the stored record (engine_output.h). The engine's events and the service's
// own (start, stop, reload) go through it alike.
#include <functional>
#include <string>

#include "dewmargin/engine_output.h"
#include "dewmargin/event_kind.h"
#include "dewmargin/message_json.h"
#include "dewmargin/timestamp.h"

namespace dewmargin {

struct event_subject {
  subject_type type = subject_type::site;
  std::string id;  // empty for the site
};

class event_emitter {
 public:
  event_emitter(std::string site, std::string events_topic);

  using fields = std::function<void(event_json&)>;
  // `alarm_related`: kept longest when the outbox overflows (message_class::alarm_event).
  void emit(engine_output& out, timestamp ts, const event_subject& subject, event_kind kind, const fields& add,
            bool alarm_related = false) const;

  [[nodiscard]] const std::string& topic() const { return topic_; }

 private:
  std::string site_;
  std::string topic_;
};

}  // namespace dewmargin
