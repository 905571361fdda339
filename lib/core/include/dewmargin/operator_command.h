#pragma once
// Operator commands received on <prefix>/cmd/<verb>: ack, shelve, unshelve.
// Parsing checks shape and bounds only (size, JSON object, fields and types); whether the
// zone exists and has anything to acknowledge is the engine's business. Limits
// (DEVELOPERS.md, "Commands"): the payload at most k_max_command_bytes; `by` required;
// `zone`, `by`, `note` and `reason` cut to 200 bytes between UTF-8 characters.
#include <cstddef>
#include <optional>
#include <string>
#include <string_view>

#include "dewmargin/result.h"

namespace dewmargin {

inline constexpr std::size_t k_max_command_bytes = 4096;

enum class command_verb { ack, shelve, unshelve };
const char* command_verb_name(command_verb v);
// The verb named by the last topic level; empty when it is none of the three.
std::optional<command_verb> parse_command_verb(std::string_view verb_text);

struct operator_command {
  command_verb verb = command_verb::ack;
  std::string zone;
  std::string by;
  std::string note;     // ack
  int minutes = 0;      // shelve: 1..1440
  std::string reason;   // shelve / unshelve
};

// `verb_text` is the last topic level. The error message is the `reason` of the
// resulting `rejected` event. `zone_out` receives the zone named in the payload, if any,
// even when the command is rejected, so the event can name it.
result<operator_command> parse_operator_command(std::string_view verb_text, std::string_view payload,
                                                std::string& zone_out);

}  // namespace dewmargin
