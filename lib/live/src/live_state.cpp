// Parsing of the retained state payloads for the live views.
#include "dewmargin/live_state.h"

#include <array>
#include <nlohmann/json.hpp>

namespace dewmargin::live {
namespace {

using json = nlohmann::json;

constexpr std::array<const char*, k_band_count> k_bands = {"safe", "tight", "alarm", "condensing", "unknown"};

error field_error(const std::string& what, const char* field, const char* expected) {
  return make_error(error_code::parse_error, what + ": '" + field + "' is not " + expected);
}

// Reads an object from a payload; the error names what was expected.
result<json> parse_object(std::string_view payload, const std::string& what) {
  json doc = json::parse(payload.begin(), payload.end(), nullptr, false);
  if (doc.is_discarded()) return make_error(error_code::parse_error, what + ": not JSON");
  if (!doc.is_object()) return make_error(error_code::parse_error, what + ": not a JSON object");
  return doc;
}

// A field read: absent and null are "not known"; anything else must have the right type.
class field_reader {
 public:
  field_reader(const json& doc, std::string what) : doc_(doc), what_(std::move(what)) {}

  bool number(const char* key, std::optional<double>& out) {
    const auto it = doc_.find(key);
    if (it == doc_.end() || it->is_null()) return true;
    if (!it->is_number()) return fail(key, "a number or null");
    out = it->get<double>();
    return true;
  }

  bool text(const char* key, std::string& out) {
    const auto it = doc_.find(key);
    if (it == doc_.end() || it->is_null()) return true;
    if (!it->is_string()) return fail(key, "a string or null");
    out = it->get<std::string>();
    return true;
  }

  bool required_text(const char* key, std::string& out) {
    const auto it = doc_.find(key);
    if (it == doc_.end() || !it->is_string() || it->get<std::string>().empty()) return fail(key, "a non-empty string");
    out = it->get<std::string>();
    return true;
  }

  bool time(const char* key, std::optional<timestamp>& out) {
    std::string text_value;
    if (!text(key, text_value)) return false;
    if (text_value.empty()) return true;
    auto t = parse_iso8601(text_value);
    if (!t) return fail(key, "an ISO 8601 time");
    out = t.value();
    return true;
  }

  bool flag(const char* key, bool& out) {
    const auto it = doc_.find(key);
    if (it == doc_.end() || it->is_null()) return true;
    if (!it->is_boolean()) return fail(key, "true or false");
    out = it->get<bool>();
    return true;
  }

  bool alarm(alarm_view& out) {
    const auto it = doc_.find("alarm");
    if (it == doc_.end() || it->is_null()) return true;
    if (!it->is_object()) return fail("alarm", "an object");
    const json& a = *it;
    if (auto f = a.find("active"); f != a.end()) {
      if (!f->is_boolean()) return fail("alarm.active", "true or false");
      out.active = f->get<bool>();
    }
    if (auto f = a.find("acknowledged"); f != a.end()) {
      if (!f->is_boolean()) return fail("alarm.acknowledged", "true or false");
      out.acknowledged = f->get<bool>();
    }
    if (auto f = a.find("shelved_until"); f != a.end() && !f->is_null()) {
      if (!f->is_string()) return fail("alarm.shelved_until", "a time or null");
      out.shelved_until = f->get<std::string>();
    }
    // Suppression by design may be told inside the alarm object or beside it.
    for (const json* holder : {&a, &doc_}) {
      if (auto f = holder->find("suppressed_by"); f != holder->end() && !f->is_null()) {
        if (!f->is_string()) return fail("suppressed_by", "a string or null");
        out.suppressed_by = f->get<std::string>();
      }
    }
    return true;
  }

  [[nodiscard]] const error& failure() const { return *failure_; }

 private:
  bool fail(const char* key, const char* expected) {
    failure_ = field_error(what_, key, expected);
    return false;
  }

  const json& doc_;
  std::string what_;
  std::optional<error> failure_;
};

}  // namespace

int band_severity(std::string_view band) {
  for (int i = 0; i < k_band_count; ++i) {
    if (band == k_bands[static_cast<std::size_t>(i)]) return i;
  }
  return k_band_count - 1;
}

const char* band_name(int severity) {
  if (severity < 0 || severity >= k_band_count) return "unknown";
  return k_bands[static_cast<std::size_t>(severity)];
}

const char* alarm_display_name(alarm_display a) {
  switch (a) {
    case alarm_display::none:
      return "none";
    case alarm_display::active:
      return "active";
    case alarm_display::acknowledged:
      return "acknowledged";
    case alarm_display::latched:
      return "latched";
    case alarm_display::shelved:
      return "shelved";
    case alarm_display::suppressed:
      return "suppressed";
  }
  return "none";
}

alarm_display display_of(const alarm_view& a) {
  // Shelving and suppression hide the alarm whatever its condition: they are what the
  // operator must know first, since the alarm itself no longer annunciates.
  if (a.shelved_until) return alarm_display::shelved;
  if (a.suppressed_by) return alarm_display::suppressed;
  if (a.active) return a.acknowledged ? alarm_display::acknowledged : alarm_display::active;
  if (!a.acknowledged) return alarm_display::latched;
  return alarm_display::none;
}

result<zone_view> parse_zone_state(std::string_view payload) {
  auto doc = parse_object(payload, "zone state");
  if (!doc) return doc.err();
  zone_view v;
  field_reader r(doc.value(), "zone state");
  const bool ok = r.required_text("zone", v.zone) && r.text("site", v.site) && r.time("ts", v.ts) &&
                  r.required_text("band", v.band) && r.number("margin_k", v.margin_k) &&
                  r.number("dew_point_c", v.dew_point_c) && r.number("air_temp_c", v.air_temp_c) &&
                  r.number("rh_pct", v.rh_pct) && r.number("surface_min_c", v.surface_min_c) &&
                  r.number("surface_rh_pct", v.surface_rh_pct) && r.number("supply_c", v.supply_c) &&
                  r.number("minutes_to_condensation", v.minutes_to_condensation) &&
                  r.text("margin_source", v.margin_source) && r.text("valve", v.valve) &&
                  r.text("valve_hold", v.valve_hold) && r.alarm(v.alarm);
  if (!ok) return r.failure();
  return v;
}

result<loop_view> parse_loop_state(std::string_view payload) {
  auto doc = parse_object(payload, "loop state");
  if (!doc) return doc.err();
  loop_view v;
  field_reader r(doc.value(), "loop state");
  const bool ok = r.required_text("loop", v.loop) && r.text("site", v.site) && r.time("ts", v.ts) &&
                  r.number("setpoint_c", v.setpoint_c) && r.number("supply_c", v.supply_c) &&
                  r.number("return_c", v.return_c) && r.number("flow_l_s", v.flow_l_s) &&
                  r.number("cooling_kw", v.cooling_kw) && r.text("limited", v.limited) && r.text("reason", v.reason);
  if (!ok) return r.failure();
  return v;
}

result<dehumidifier_view> parse_dehumidifier_state(std::string_view payload) {
  auto doc = parse_object(payload, "dehumidifier state");
  if (!doc) return doc.err();
  dehumidifier_view v;
  field_reader r(doc.value(), "dehumidifier state");
  const bool ok = r.required_text("dehumidifier", v.dehumidifier) && r.text("site", v.site) && r.time("ts", v.ts) &&
                  r.number("request_c", v.request_c) && r.number("supply_dew_point_c", v.supply_dew_point_c) &&
                  r.flag("fault", v.fault) && r.alarm(v.alarm);
  if (!ok) return r.failure();
  return v;
}

result<status_view> parse_status(std::string_view payload) {
  auto doc = parse_object(payload, "status");
  if (!doc) return doc.err();
  status_view v;
  field_reader r(doc.value(), "status");
  const bool ok = r.required_text("state", v.state) && r.text("site", v.site) && r.text("version", v.version) &&
                  r.time("ts", v.ts) && r.text("reason", v.reason);
  if (!ok) return r.failure();
  return v;
}

std::optional<event_summary> summarize_event(std::string_view payload) {
  const json doc = json::parse(payload.begin(), payload.end(), nullptr, false);
  if (!doc.is_object()) return std::nullopt;
  const auto text_of = [&](const char* key) -> std::string {
    const auto it = doc.find(key);
    if (it == doc.end() || it->is_null()) return {};
    if (it->is_string()) return it->get<std::string>();
    return it->dump();
  };
  event_summary s;
  s.kind = text_of("kind");
  if (s.kind.empty()) return std::nullopt;
  s.zone = text_of("zone");
  std::string line = s.kind;
  if (!s.zone.empty()) line += " " + s.zone;
  if (s.kind == "rejected") {
    const std::string topic = text_of("topic");
    line += ": " + text_of("reason");
    if (!topic.empty()) line += " (" + topic + ")";
  } else {
    const std::string from = text_of("from");
    const std::string to = text_of("to");
    if (!from.empty() || !to.empty()) line += " " + (from.empty() ? std::string("-") : from) + " -> " + to;
    if (const std::string by = text_of("by"); !by.empty()) line += " by " + by;
    if (const std::string until = text_of("until"); !until.empty()) line += " until " + until;
    if (const std::string reason = text_of("reason"); !reason.empty()) line += " (" + reason + ")";
  }
  s.text = line;
  return s;
}

}  // namespace dewmargin::live
