#pragma once
// The command line at the bottom of `dewmargin watch`: what an operator types and the
// command it becomes (docs/interface.md, Commands). Pure.
//
//   a ZONE [NOTE...]          acknowledge ZONE's alarm
//   s ZONE MIN [REASON...]    shelve ZONE's alarm for MIN minutes (1-1440)
//   u ZONE [REASON...]        unshelve ZONE's alarm
// ZONE is a zone id, or PREFIX/ZONE when several sites have that id.
#include <string>
#include <string_view>

#include "dewmargin/result.h"

namespace dewmargin::watch {

struct operator_request {
  std::string verb;  // ack, shelve, unshelve
  std::string zone;  // as typed
  int minutes = 0;   // shelve only
  std::string text;  // note (ack) or reason (shelve, unshelve); may be empty
};

// The error says what was wrong and how it should look.
[[nodiscard]] result<operator_request> parse_operator_line(std::string_view line);

// 1 to 16 printable characters without blanks, as in "JK" or "j.kowalski".
[[nodiscard]] bool valid_initials(std::string_view by);

// The JSON command for <prefix>/cmd/<verb>, for the zone id the request resolved to.
[[nodiscard]] std::string command_payload(const operator_request& request, const std::string& zone_id,
                                          const std::string& by);

}  // namespace dewmargin::watch
