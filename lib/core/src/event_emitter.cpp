#include "dewmargin/event_emitter.h"

#include <utility>

namespace dewmargin {

event_emitter::event_emitter(std::string site, std::string events_topic)
    : site_(std::move(site)), topic_(std::move(events_topic)) {}

void event_emitter::emit(engine_output& out, timestamp ts, const event_subject& subject, event_kind kind,
                         const fields& add, bool alarm_related) const {
  const char* kind_name = event_kind_name(kind);
  event_json e(site_, ts, subject.type, subject.id, kind_name);
  if (add) add(e);
  std::string json = e.dump();
  out.messages.push_back({topic_, json, false, alarm_related ? message_class::alarm_event : message_class::event});
  out.events.push_back({ts, subject.type, subject.id, kind_name, std::move(json)});
}

}  // namespace dewmargin
