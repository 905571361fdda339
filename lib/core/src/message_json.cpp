#include "dewmargin/message_json.h"

#include <cstdio>
#include <nlohmann/json.hpp>

#include "dewmargin/json_dump.h"
#include "dewmargin/units.h"

namespace dewmargin {
namespace {

nlohmann::json rounded(std::optional<double> v) {
  if (!v) return nullptr;
  return units::round_to_hundredths(*v);
}

nlohmann::json alarm_object(const alarm_status& a) {
  nlohmann::json j;
  j["active"] = a.active;
  j["acknowledged"] = a.acknowledged;
  j["shelved_until"] = a.shelved_until ? nlohmann::json(format_iso8601_utc(*a.shelved_until)) : nlohmann::json(nullptr);
  return j;
}

nlohmann::json text_or_null(const char* s) { return s ? nlohmann::json(s) : nlohmann::json(nullptr); }

}  // namespace

struct event_json::impl {
  nlohmann::ordered_json j;
};

event_json::event_json(const std::string& site, timestamp ts, subject_type subject, const std::string& subject_id,
                       const std::string& kind)
    : impl_(std::make_unique<impl>()) {
  impl_->j["ts"] = format_iso8601_utc(ts);
  impl_->j["site"] = site;
  if (subject != subject_type::site) impl_->j[subject_type_name(subject)] = subject_id;
  impl_->j["kind"] = kind;
  impl_->j["from"] = nullptr;
  impl_->j["to"] = nullptr;
}

event_json::~event_json() = default;

event_json& event_json::text(const char* key, const std::string& value) {
  impl_->j[key] = value;
  return *this;
}
event_json& event_json::text_or_null(const char* key, const std::string& value) {
  if (value.empty()) {
    impl_->j[key] = nullptr;
  } else {
    impl_->j[key] = value;
  }
  return *this;
}
event_json& event_json::number(const char* key, std::optional<double> value) {
  impl_->j[key] = rounded(value);
  return *this;
}
event_json& event_json::integer(const char* key, long long value) {
  impl_->j[key] = value;
  return *this;
}
event_json& event_json::null(const char* key) {
  impl_->j[key] = nullptr;
  return *this;
}
event_json& event_json::alarm(const alarm_status& a) {
  impl_->j["alarm"] = alarm_object(a);
  return *this;
}
std::string event_json::dump() const { return json_dump(impl_->j); }

std::string format_zone_state(const zone_state_view& v) {
  nlohmann::ordered_json j;
  j["site"] = v.site;
  j["zone"] = v.zone;
  j["ts"] = format_iso8601_utc(v.ts);
  j["band"] = v.band;
  j["dew_point_c"] = rounded(v.dew_point_c);
  j["air_temp_c"] = rounded(v.air_temp_c);
  j["rh_pct"] = rounded(v.rh_pct);
  j["surface_min_c"] = rounded(v.surface_min_c);
  j["surface_rh_pct"] = rounded(v.surface_rh_pct);
  j["supply_c"] = rounded(v.supply_c);
  j["margin_k"] = rounded(v.margin_k);
  j["margin_source"] = text_or_null(v.margin_source);
  j["valve"] = text_or_null(v.valve);
  j["alarm"] = alarm_object(v.alarm);
  j["minutes_to_condensation"] = rounded(v.minutes_to_condensation);
  j["valve_hold"] = text_or_null(v.valve_hold);
  j["suppressed_by"] = text_or_null(v.suppressed_by);
  return json_dump(j);
}

std::string format_dehumidifier_state(const dehumidifier_state_view& v) {
  nlohmann::ordered_json j;
  j["site"] = v.site;
  j["dehumidifier"] = v.dehumidifier;
  j["ts"] = format_iso8601_utc(v.ts);
  j["request_c"] = rounded(v.request_c);
  j["supply_dew_point_c"] = rounded(v.supply_dew_point_c);
  j["fault"] = v.fault;
  j["reason"] = v.reason.empty() ? nlohmann::ordered_json() : nlohmann::ordered_json(v.reason);
  j["alarm"] = alarm_object(v.alarm);
  return json_dump(j);
}

std::string format_loop_state(const loop_state_view& v) {
  nlohmann::ordered_json j;
  j["site"] = v.site;
  j["loop"] = v.loop;
  j["ts"] = format_iso8601_utc(v.ts);
  j["setpoint_c"] = units::round_to_hundredths(v.setpoint_c);
  j["supply_c"] = rounded(v.supply_c);
  j["return_c"] = rounded(v.return_c);
  j["flow_l_s"] = rounded(v.flow_l_s);
  j["reason"] = v.reason;
  j["limited"] = v.limited;
  j["cooling_kw"] = rounded(v.cooling_kw);
  return json_dump(j);
}

std::string format_bare_number(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.2f", units::round_to_hundredths(v));
  return buf;
}

}  // namespace dewmargin
