#include "dewmargin/event_kind.h"

namespace dewmargin {

const char* event_kind_name(event_kind k) {
  switch (k) {
    case event_kind::band:
      return "band";
    case event_kind::ack:
      return "ack";
    case event_kind::shelve:
      return "shelve";
    case event_kind::unshelve:
      return "unshelve";
    case event_kind::valve:
      return "valve";
    case event_kind::setpoint:
      return "setpoint";
    case event_kind::dehumidify:
      return "dehumidify";
    case event_kind::input:
      return "input";
    case event_kind::rejected:
      return "rejected";
    case event_kind::service:
      return "service";
  }
  return "service";
}

std::optional<event_kind> parse_event_kind(std::string_view text) {
  for (event_kind k : k_event_kinds) {
    if (text == event_kind_name(k)) return k;
  }
  return std::nullopt;
}

std::string event_kind_list() {
  std::string s;
  for (event_kind k : k_event_kinds) {
    if (!s.empty()) s += ", ";
    s += event_kind_name(k);
  }
  return s;
}

}  // namespace dewmargin
