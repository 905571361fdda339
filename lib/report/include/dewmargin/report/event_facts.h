#pragma once
// What the report needs from one stored event, read once from its JSON.
#include <optional>
#include <string>

#include "dewmargin/engine_output.h"
#include "dewmargin/history_reader.h"

namespace dewmargin::report {

struct event_facts {
  timestamp ts;
  subject_type subject = subject_type::site;
  std::string subject_id;
  std::string kind;
  std::string site;  // the "site" label the service copied into the event
  std::string from;  // strings as they are; numbers in from_value / to_value
  std::string to;
  std::optional<double> from_value;
  std::optional<double> to_value;
  std::optional<bool> alarm_active;  // the event's "alarm" object, when it has one
  std::optional<bool> alarm_acknowledged;
  std::optional<timestamp> until;  // shelve: shelved until
  std::string reason;
  std::string limited;      // setpoint: none, min, max, rate
  std::string topic;        // input: the input's topic
  bool suppressed = false;  // carries "suppressed_by" (suppressed by design)
  bool valid = true;        // false: the stored JSON is not an object (only the columns are known)
};

[[nodiscard]] event_facts facts_of(const stored_event& event);

}  // namespace dewmargin::report
