#include "dewmargin/metrics_text.h"

#include <cmath>
#include <cstdio>
#include <optional>
#include <vector>

#include "dewmargin/live_book.h"

namespace dewmargin {
namespace {

std::string number(double v) {
  if (std::isnan(v)) return "NaN";
  if (std::isinf(v)) return v > 0 ? "+Inf" : "-Inf";
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.10g", v);
  return buf;
}

// One metric family: HELP, TYPE, then its samples, written together so a family is
// never split or repeated.
class family {
 public:
  family(std::string name, const char* type, const char* help) : name_(std::move(name)) {
    text_ = "# HELP " + name_ + " " + help + "\n# TYPE " + name_ + " " + type + "\n";
  }
  void sample(const std::vector<std::pair<const char*, std::string>>& labels, double value,
              const std::string& suffix = {}) {
    text_ += name_ + suffix;
    if (!labels.empty()) {
      text_ += '{';
      for (std::size_t i = 0; i < labels.size(); ++i) {
        if (i > 0) text_ += ',';
        text_ += std::string(labels[i].first) + "=\"" + escape_label_value(labels[i].second) + '"';
      }
      text_ += '}';
    }
    text_ += ' ' + number(value) + '\n';
  }
  void maybe(const std::vector<std::pair<const char*, std::string>>& labels, const std::optional<double>& v) {
    if (v) sample(labels, *v);
  }
  void append_to(std::string& out) const { out += text_; }

 private:
  std::string name_;
  std::string text_;
};

}  // namespace

std::string escape_label_value(const std::string& value) {
  std::string out;
  out.reserve(value.size());
  for (char c : value) {
    if (c == '\\')
      out += "\\\\";
    else if (c == '"')
      out += "\\\"";
    else if (c == '\n')
      out += "\\n";
    else
      out += c;
  }
  return out;
}

std::string format_metrics(const live_snapshot::copy& s) {
  live::live_book book({s.prefix});
  for (const auto& [topic, payload] : s.states) (void)book.ingest(topic, payload);

  family info("dewmargin_info", "gauge", "The service: site and version (always 1).");
  info.sample({{"site", s.site}, {"version", s.version}}, 1);

  family margin("dewmargin_zone_margin_kelvin", "gauge", "Coldest surface (or supply) minus dew point.");
  family dew("dewmargin_zone_dew_point_celsius", "gauge", "Highest dew point of the zone's humidity inputs.");
  family surface("dewmargin_zone_surface_min_celsius", "gauge", "Coldest fresh chilled-surface temperature.");
  family surface_rh("dewmargin_zone_surface_relative_humidity_percent", "gauge",
                    "Relative humidity of the air at the coldest surface, when the state carries it.");
  family band("dewmargin_zone_band", "gauge", "1 for the zone's current band, 0 for the others.");
  family to_wet("dewmargin_zone_time_to_condensation_seconds", "gauge",
                "Margin trend extrapolated to zero; absent while the margin is not falling.");
  family alarm_active("dewmargin_zone_alarm_active", "gauge", "1 while the zone's alarm condition is present.");
  family alarm_unacked("dewmargin_zone_alarm_unacknowledged", "gauge",
                       "1 while the zone's alarm awaits acknowledgement.");
  family alarm_shelved("dewmargin_zone_alarm_shelved", "gauge", "1 while the zone's alarm is shelved.");
  family zone_ts("dewmargin_zone_state_timestamp_seconds", "gauge", "Time of the zone's latest state (Unix seconds).");

  for (const auto* z : book.zones_worst_first()) {
    const auto& v = z->view;
    const std::vector<std::pair<const char*, std::string>> l = {{"site", s.site}, {"zone", v.zone}};
    margin.maybe(l, v.margin_k);
    dew.maybe(l, v.dew_point_c);
    surface.maybe(l, v.surface_min_c);
    surface_rh.maybe(l, v.surface_rh_pct);
    for (int b = 0; b < live::k_band_count; ++b) {
      band.sample({{"site", s.site}, {"zone", v.zone}, {"band", live::band_name(b)}},
                  live::band_severity(v.band) == b ? 1 : 0);
    }
    if (v.minutes_to_condensation) to_wet.sample(l, *v.minutes_to_condensation * 60.0);
    alarm_active.sample(l, v.alarm.active ? 1 : 0);
    alarm_unacked.sample(l, v.alarm.acknowledged ? 0 : 1);
    alarm_shelved.sample(l, v.alarm.shelved_until ? 1 : 0);
    if (v.ts) zone_ts.sample(l, static_cast<double>(to_unix_ms(*v.ts)) / 1000.0);
  }

  family setpoint("dewmargin_loop_setpoint_celsius", "gauge", "Supply-water setpoint written to the loop.");
  family supply("dewmargin_loop_supply_celsius", "gauge", "Measured supply-water temperature.");
  family cooling("dewmargin_loop_cooling_kilowatts", "gauge",
                 "Cooling output from flow and supply/return temperatures.");
  for (const auto* e : book.loops()) {
    const std::vector<std::pair<const char*, std::string>> l = {{"site", s.site}, {"loop", e->view.loop}};
    setpoint.maybe(l, e->view.setpoint_c);
    supply.maybe(l, e->view.supply_c);
    cooling.maybe(l, e->view.cooling_kw);
  }

  family request("dewmargin_dehumidifier_dew_point_request_celsius", "gauge",
                 "Supply-air dew point requested from the outdoor-air unit.");
  family unit_dew("dewmargin_dehumidifier_supply_dew_point_celsius", "gauge",
                  "The unit's measured supply-air dew point, when it has that input.");
  family unit_fault("dewmargin_dehumidifier_fault", "gauge", "1 while the unit is in fault (its alarm condition).");
  family unit_unacked("dewmargin_dehumidifier_alarm_unacknowledged", "gauge",
                      "1 while the unit's alarm awaits acknowledgement.");
  for (const auto* e : book.dehumidifiers()) {
    const std::vector<std::pair<const char*, std::string>> l = {{"site", s.site},
                                                                {"dehumidifier", e->view.dehumidifier}};
    request.maybe(l, e->view.request_c);
    unit_dew.maybe(l, e->view.supply_dew_point_c);
    unit_fault.sample(l, e->view.fault ? 1 : 0);
    unit_unacked.sample(l, e->view.alarm.acknowledged ? 0 : 1);
  }

  const service_counters& c = s.counters;
  family messages("dewmargin_messages_received_total", "counter", "MQTT messages received.");
  messages.sample({}, static_cast<double>(c.messages_received));
  family bad("dewmargin_bad_inputs_total", "counter", "Readings rejected: undecodable, implausible or out of order.");
  bad.sample({}, static_cast<double>(c.bad_inputs));
  family rejected("dewmargin_commands_rejected_total", "counter", "Operator commands rejected.");
  rejected.sample({}, static_cast<double>(c.commands_rejected));
  family reconnects("dewmargin_broker_reconnects_total", "counter", "Broker connections after the first.");
  reconnects.sample({}, static_cast<double>(c.broker_reconnects));
  family store_errors("dewmargin_store_write_errors_total", "counter", "Failed history writes and maintenance steps.");
  store_errors.sample({}, static_cast<double>(c.store_write_errors));
  family inbound_drops("dewmargin_inbound_dropped_total", "counter",
                       "Received messages dropped because the inbound queue was full (commands never).");
  inbound_drops.sample({}, static_cast<double>(c.inbound_drops));
  family drops("dewmargin_outbox_dropped_total", "counter",
               "Events dropped because the outbox's capacity for events was full (states and commands never).");
  drops.sample({}, static_cast<double>(c.outbox_drops));
  family commit("dewmargin_store_commit_seconds", "summary", "Time of the history's write transactions.");
  commit.sample({}, static_cast<double>(c.store_commit_us_total) / 1e6, "_sum");
  commit.sample({}, static_cast<double>(c.store_commits), "_count");
  family connected("dewmargin_broker_connected", "gauge", "1 while connected to the broker.");
  connected.sample({}, c.broker_connected ? 1 : 0);

  std::string out;
  for (const family* f :
       {&info,         &margin,        &dew,           &surface,      &surface_rh, &band,     &to_wet,
        &alarm_active, &alarm_unacked, &alarm_shelved, &zone_ts,      &setpoint,   &supply,   &cooling,
        &request,      &unit_dew,      &unit_fault,    &unit_unacked, &messages,   &bad,      &rejected,
        &reconnects,   &store_errors,  &inbound_drops, &drops,        &commit,     &connected}) {
    f->append_to(out);
  }
  return out;
}

}  // namespace dewmargin
