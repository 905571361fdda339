#include "watch_commands.h"

#include <cctype>
#include <nlohmann/json.hpp>
#include <vector>

namespace dewmargin::watch {
namespace {

// Splits off the first `count` words; the rest (trimmed) is returned in `rest`.
std::vector<std::string> words(std::string_view line, std::size_t count, std::string& rest) {
  std::vector<std::string> out;
  std::size_t i = 0;
  const auto blank = [](char c) { return c == ' ' || c == '\t'; };
  while (out.size() < count) {
    while (i < line.size() && blank(line[i])) ++i;
    if (i == line.size()) break;
    const std::size_t start = i;
    while (i < line.size() && !blank(line[i])) ++i;
    out.emplace_back(line.substr(start, i - start));
  }
  while (i < line.size() && blank(line[i])) ++i;
  std::size_t end = line.size();
  while (end > i && blank(line[end - 1])) --end;
  rest = std::string(line.substr(i, end - i));
  return out;
}

error usage(const std::string& why) { return make_error(error_code::invalid_argument, why); }

}  // namespace

result<operator_request> parse_operator_line(std::string_view line) {
  std::string rest;
  const auto head = words(line, 1, rest);
  if (head.empty()) return usage("type a ZONE, s ZONE MIN or u ZONE (q quits)");
  operator_request r;
  const std::string& verb = head.front();
  if (verb == "a" || verb == "ack") {
    r.verb = "ack";
  } else if (verb == "s" || verb == "shelve") {
    r.verb = "shelve";
  } else if (verb == "u" || verb == "unshelve") {
    r.verb = "unshelve";
  } else {
    return usage("unknown command '" + verb + "': a ZONE [NOTE], s ZONE MIN [REASON], u ZONE [REASON]");
  }
  std::string after_verb = rest;
  const auto zone = words(after_verb, 1, rest);
  if (zone.empty()) return usage(r.verb + " needs a zone: " + verb + " ZONE");
  r.zone = zone.front();
  if (r.verb == "shelve") {
    std::string after_zone = rest;
    const auto minutes = words(after_zone, 1, rest);
    const auto is_digits = [](const std::string& s) {
      if (s.empty() || s.size() > 4) return false;
      for (char c : s) {
        if (!std::isdigit(static_cast<unsigned char>(c))) return false;
      }
      return true;
    };
    if (minutes.empty() || !is_digits(minutes.front()) || std::stoi(minutes.front()) < 1 ||
        std::stoi(minutes.front()) > 1440) {
      return usage("shelve needs whole minutes from 1 to 1440: s ZONE MIN [REASON]");
    }
    r.minutes = std::stoi(minutes.front());
  }
  r.text = rest;
  return r;
}

bool valid_initials(std::string_view by) {
  if (by.empty() || by.size() > 16) return false;
  for (char c : by) {
    if (!std::isgraph(static_cast<unsigned char>(c))) return false;
  }
  return true;
}

std::string command_payload(const operator_request& request, const std::string& zone_id, const std::string& by) {
  nlohmann::ordered_json j;
  j["zone"] = zone_id;
  if (request.verb == "shelve") j["minutes"] = request.minutes;
  j["by"] = by;
  if (!request.text.empty()) j[request.verb == "ack" ? "note" : "reason"] = request.text;
  return j.dump();
}

}  // namespace dewmargin::watch
