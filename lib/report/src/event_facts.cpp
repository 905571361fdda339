#include "dewmargin/report/event_facts.h"

#include <nlohmann/json.hpp>

namespace dewmargin::report {
namespace {

std::string text_of(const nlohmann::json& j, const char* key) {
  const auto it = j.find(key);
  return it != j.end() && it->is_string() ? it->get<std::string>() : std::string();
}

std::optional<double> number_of(const nlohmann::json& j, const char* key) {
  const auto it = j.find(key);
  if (it == j.end() || !it->is_number()) return std::nullopt;
  return it->get<double>();
}

}  // namespace

event_facts facts_of(const stored_event& event) {
  event_facts f;
  const event_record& r = event.record;
  f.ts = r.ts;
  f.subject = r.subject;
  f.subject_id = r.subject_id;
  f.kind = r.kind;
  const nlohmann::json j = nlohmann::json::parse(r.json, nullptr, /*allow_exceptions=*/false);
  if (!j.is_object()) {
    f.valid = false;
    return f;
  }
  f.site = text_of(j, "site");
  f.from = text_of(j, "from");
  f.to = text_of(j, "to");
  f.from_value = number_of(j, "from");
  f.to_value = number_of(j, "to");
  f.reason = text_of(j, "reason");
  f.limited = text_of(j, "limited");
  f.topic = text_of(j, "topic");
  f.suppressed = j.contains("suppressed_by") && !j["suppressed_by"].is_null();
  const auto alarm = j.find("alarm");
  if (alarm != j.end() && alarm->is_object()) {
    const auto active = alarm->find("active");
    const auto acked = alarm->find("acknowledged");
    if (active != alarm->end() && active->is_boolean()) f.alarm_active = active->get<bool>();
    if (acked != alarm->end() && acked->is_boolean()) f.alarm_acknowledged = acked->get<bool>();
  }
  const std::string until = text_of(j, "until");
  if (!until.empty()) {
    const auto t = parse_iso8601(until);
    if (t) f.until = t.value();
  }
  return f;
}

}  // namespace dewmargin::report
