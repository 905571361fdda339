#include "dewmargin/operator_command.h"

#include <cmath>
#include <nlohmann/json.hpp>

#include "dewmargin/safe_text.h"
#include "dewmargin/zone_alarm.h"

namespace dewmargin {
namespace {

constexpr std::size_t k_max_text = 200;  // by / note / reason are free text, but bounded
constexpr std::size_t k_max_verb_echo = 40;

// Cuts to at most max_bytes, never inside a UTF-8 character: a split character would
// make every event that echoes the text unserialisable as JSON.
std::string bounded(std::string s, std::size_t max_bytes = k_max_text) {
  if (s.size() <= max_bytes) return s;
  std::size_t cut = max_bytes;
  while (cut > 0 && (static_cast<unsigned char>(s[cut]) & 0xC0U) == 0x80U) --cut;  // continuation byte
  s.resize(cut);
  return s;
}

result<std::string> optional_text(const nlohmann::json& doc, const char* key) {
  if (!doc.contains(key) || doc[key].is_null()) return std::string{};
  if (!doc[key].is_string()) return make_error(error_code::parse_error, std::string("'") + key + "' must be a string");
  return bounded(doc[key].get<std::string>());
}

}  // namespace

const char* command_verb_name(command_verb v) {
  switch (v) {
    case command_verb::ack:
      return "ack";
    case command_verb::shelve:
      return "shelve";
    case command_verb::unshelve:
      return "unshelve";
  }
  return "ack";
}

std::optional<command_verb> parse_command_verb(std::string_view verb_text) {
  for (command_verb v : {command_verb::ack, command_verb::shelve, command_verb::unshelve}) {
    if (verb_text == command_verb_name(v)) return v;
  }
  return std::nullopt;
}

result<operator_command> parse_operator_command(std::string_view verb_text, std::string_view payload,
                                                std::string& zone_out) {
  operator_command cmd;
  // Checked before parsing: a megabyte of JSON is not worth reading to reject it.
  if (payload.size() > k_max_command_bytes) {
    return make_error(error_code::out_of_range, "command too large (" + std::to_string(payload.size()) +
                                                    " bytes, at most " + std::to_string(k_max_command_bytes) + ")");
  }
  // Each way of being unreadable has its own reason, naming the byte: an operator who corrects
  // one mistake and makes another is told so (repeats of one reason are counted, not reported).
  std::string unreadable;
  if (payload.empty()) {
    unreadable = "payload is empty (a JSON object is expected)";
  } else if (const std::size_t bad = first_invalid_utf8(payload); bad != std::string_view::npos) {
    unreadable = "payload is not valid UTF-8 (at byte " + std::to_string(bad + 1) + ")";
  }
  nlohmann::json doc = nlohmann::json(nlohmann::json::value_t::discarded);
  if (unreadable.empty()) {
    try {
      doc = nlohmann::json::parse(payload.begin(), payload.end());
    } catch (const nlohmann::json::parse_error& e) {
      unreadable = "payload is not valid JSON (at byte " + std::to_string(e.byte) + ")";
    } catch (const nlohmann::json::exception&) {  // a number beyond double, such as 1e999
      unreadable = "payload is not valid JSON (a number out of range)";
    }
  }
  // The zone is taken first so that every rejection, also of an unknown verb, can name it.
  if (doc.is_object() && doc.contains("zone") && doc["zone"].is_string()) {
    zone_out = bounded(doc["zone"].get<std::string>());
  }

  const auto verb = parse_command_verb(verb_text);
  if (!verb) {
    return make_error(
        error_code::invalid_argument,
        "unknown command '" + bounded(std::string(verb_text), k_max_verb_echo) + "' (ack, shelve, unshelve)");
  }
  cmd.verb = *verb;

  if (!unreadable.empty()) return make_error(error_code::parse_error, unreadable);
  if (!doc.is_object()) return make_error(error_code::parse_error, "payload must be a JSON object");

  if (!doc.contains("zone") || doc["zone"].is_null()) return make_error(error_code::invalid_argument, "missing 'zone'");
  if (!doc["zone"].is_string()) return make_error(error_code::parse_error, "'zone' must be a string");
  cmd.zone = zone_out;

  auto by = optional_text(doc, "by");
  if (!by) return by.err();
  if (!doc.contains("by") || doc["by"].is_null()) {
    return make_error(error_code::invalid_argument, "missing 'by' (who gives the command)");
  }
  if (by.value().find_first_not_of(" \t\r\n") == std::string::npos) {
    return make_error(error_code::invalid_argument, "'by' is blank (who gives the command)");
  }
  cmd.by = by.value();

  auto note = optional_text(doc, "note");
  if (!note) return note.err();
  cmd.note = note.value();
  auto reason = optional_text(doc, "reason");
  if (!reason) return reason.err();
  cmd.reason = reason.value();

  if (cmd.verb == command_verb::shelve) {
    if (!doc.contains("minutes") || doc["minutes"].is_null()) {
      return make_error(error_code::invalid_argument, "missing 'minutes' (1 to 1440)");
    }
    const auto& m = doc["minutes"];
    if (!m.is_number()) return make_error(error_code::parse_error, "'minutes' must be a number (1 to 1440)");
    const double minutes = m.get<double>();
    if (!std::isfinite(minutes) || minutes != std::floor(minutes) || minutes < k_min_shelve_minutes ||
        minutes > k_max_shelve_minutes) {
      return make_error(error_code::out_of_range,
                        "'minutes' must be a whole number from 1 to 1440 (got " + nlohmann::json(m).dump() + ")");
    }
    cmd.minutes = static_cast<int>(minutes);
  }
  return cmd;
}

}  // namespace dewmargin
