#include "model/report.h"

#include <cmath>
#include <cstdio>
#include <map>
#include <nlohmann/json.hpp>
#include <set>
#include <sstream>

#include "dewmargin/json_dump.h"
#include "model/moist_air.h"
#include "model/verdict.h"

namespace dewmargin::sim {
namespace {

std::string fixed(double v, int decimals) {
  char buf[48];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
  return buf;
}

std::string signed_k(double v) {
  char buf[48];
  std::snprintf(buf, sizeof buf, "%+.2f K", v);
  return buf;
}

std::string incidents_now(const simulation& sim) {
  const auto active = sim.script().active_at(sim.now_s());
  if (active.empty()) return "none";
  std::string text;
  for (const incident* i : active) text += (text.empty() ? "" : "; ") + i->description;
  return text;
}

double hundredths(double v) {
  const double r = std::round(v * 100.0) / 100.0;
  return r == 0.0 ? 0.0 : r;
}

}  // namespace

std::string status_line(const simulation& sim) {
  std::ostringstream os;
  os << "[" << clock_text(sim.now_s()) << "] ";
  const auto& plant = sim.plant();
  if (sim.options().with_service) {
    const watched_zone* worst = sim.watch().worst_zone();
    if (worst) {
      os << "worst " << worst->id << " " << signed_k(*worst->margin_k) << " " << worst->band;
    } else {
      os << "worst: no margin known yet";
    }
    const int unknown = sim.watch().unknown_zones();
    if (unknown > 0) os << " (" << unknown << " unknown)";
    const auto& t = sim.watch().tally();
    os << " | alarms " << t.alarms_raised << ", acked " << t.acknowledged;
  } else {
    const std::size_t w = sim.truth().worst_zone_now();
    os << "worst " << plant.layout().zones[w].id << " " << signed_k(sim.truth().worst_margin_now_k()) << " (true)";
  }
  int closed = 0;
  for (const auto& z : plant.zones()) closed += z.valve_open ? 0 : 1;
  os << " | valves closed " << closed << " | supply";
  for (const auto& l : plant.loops()) os << " " << fixed(l.supply_c, 1);
  os << " °C | wet " << fixed(sim.truth().total_condensing_min(), 1) << " zone-min | " << incidents_now(sim);
  return os.str();
}

namespace {

std::string day_header(const simulation& sim, const char* what) {
  std::ostringstream os;
  const auto& sc = sim.script();
  os << "== simulated day '" << sc.name << "' " << sc.date << " " << clock_text(sc.start_s) << "-"
     << clock_text(sc.end_s) << " UTC, building " << sim.plant().layout().name << ", " << what << "\n";
  return os.str();
}

std::string wet_while(const simulation& sim, const char* label) {
  if (sim.truth().condensing_min_by_incident().empty()) return {};
  std::ostringstream os;
  os << "  " << label << " wet while:";
  for (const auto& kv : sim.truth().condensing_min_by_incident()) os << " " << kv.first << " " << fixed(kv.second, 1);
  os << " (zone-min)\n";
  return os.str();
}

}  // namespace

namespace {

// Alarms the service raised (annunciated) while each kind of incident stood: a zone's alarm
// onset counts for every incident active at its time.
std::map<std::string, int> alarms_raised_while(const simulation& sim) {
  std::map<std::string, int> by;
  std::vector<std::vector<double>> onsets;
  for (const auto& z : sim.watch().zones()) onsets.push_back(z.alarm_onsets_s);
  onsets.push_back(sim.watch().tally().unit_alarm_onsets_s);  // the units' own alarms count too
  for (const auto& list : onsets) {
    for (double t_s : list) {
      std::set<std::string> kinds;
      for (const incident& i : sim.script().incidents) {
        if (i.active_at(t_s)) kinds.insert(incident_kind_name(i.kind));
      }
      if (kinds.empty()) kinds.insert("no incident");
      for (const auto& k : kinds) ++by[k];
    }
  }
  return by;
}

}  // namespace

std::string service_text(const simulation& sim) {
  std::ostringstream os;
  const auto& t = sim.watch().tally();
  os << "service (its events on MQTT): alarms raised " << t.alarms_raised << " by zones and "
     << t.unit_alarm_onsets_s.size() << " by dehumidifiers, acknowledged " << t.acknowledged;
  if (sim.options().ack_after_s > 0) {
    os << " (by '" << sim.options().operator_name << "', the simulated operator, "
       << fixed(sim.options().ack_after_s / 60.0, 0) << " min after each)";
  }
  os << "\n  valve actions " << t.valves_closed + t.valves_opened << " (" << t.valves_closed << " closed, "
     << t.valves_opened << " opened), setpoint events " << t.setpoint_events << ", dehumidifier requests "
     << t.dehumidify_events << ", input events " << t.input_events << ", rejected commands " << t.rejected << "\n";
  const auto raised_while = alarms_raised_while(sim);
  if (!raised_while.empty()) {
    os << "  alarms raised while:";
    for (const auto& kv : raised_while) os << " " << kv.first << " " << kv.second;
    os << "\n";
  }
  const auto& c = sim.commands();
  os << "plant commands received:";
  for (const auto& kv : c.setpoint_by_loop) {
    os << " " << kv.first << " " << fixed(kv.second.min, 1) << "-" << fixed(kv.second.max, 1) << " °C;";
  }
  for (const auto& kv : c.dew_point_request_by_unit) {
    os << " " << kv.first << " dew point " << fixed(kv.second.min, 1) << "-" << fixed(kv.second.max, 1) << " °C;";
  }
  os << " valves " << c.valve_closings << " closed, " << c.valve_openings << " opened";
  if (c.bad_commands > 0) os << "; " << c.bad_commands << " unreadable (last: " << c.last_bad_command << ")";
  os << "\n";
  const auto& o = sim.outage();
  if (o.readings_dropped > 0 || o.messages_missed > 0) {
    os << "broker outage: " << o.readings_dropped << " messages not published, " << o.messages_missed
       << " from the service not heard\n";
  }
  return os.str();
}

std::string summary_text(const simulation& sim) {
  const bool service = sim.options().with_service;
  std::string text = day_header(sim, service ? "supervised by the service" : "baseline without the service");
  text += verdict_table(verdict_of(sim));
  text += wet_while(sim, service ? "with the service" : "without the service");
  if (service) text += service_text(sim);
  return text;
}

std::string compare_text(const simulation& baseline, const simulation& supervised) {
  std::string text = day_header(supervised, "without and with the service");
  text += compare_table(verdict_of(baseline), verdict_of(supervised));
  text += wet_while(baseline, "without the service");
  text += wet_while(supervised, "with the service");
  text += service_text(supervised);
  return text;
}

std::string trace_header() {
  return "time,zone,air_c,rh_pct,dew_point_c,surface_c,margin_k,valve,people,supply_c,setpoint_c,"
         "outdoor_c,outdoor_dew_point_c,supply_air_dew_point_c,dew_point_request_c\n";
}

std::string trace_rows(const simulation& sim) {
  std::ostringstream os;
  const auto& plant = sim.plant();
  const auto out = plant.outdoor();
  const std::string t = format_iso8601_utc(sim.now());
  for (std::size_t i = 0; i < plant.zones().size(); ++i) {
    const zone_state& z = plant.zones()[i];
    const loop_state& l = plant.loops()[plant.loop_of(i)];
    // The zone's supply air: its dehumidifier's, or outdoor air (no request) where none serves it.
    double supply_dp_c = out.dew_point_c;
    double request_c = 0.0;
    if (plant.dehumidifier_of(i) != plant_model::npos) {
      supply_dp_c = plant.dehumidifiers()[plant.dehumidifier_of(i)].supply_dew_point_c;
      request_c = plant.dehumidifiers()[plant.dehumidifier_of(i)].request_c;
    }
    char line[320];
    std::snprintf(line, sizeof line, "%s,%s,%.3f,%.2f,%.3f,%.3f,%.3f,%s,%.1f,%.3f,%.2f,%.2f,%.2f,%.3f,%.2f\n",
                  t.c_str(), plant.layout().zones[i].id.c_str(), z.air_c, relative_humidity_pct(z.air_c, z.dew_point_c),
                  z.dew_point_c, z.surface_c, z.surface_c - z.dew_point_c, z.valve_open ? "open" : "closed", z.people,
                  l.supply_c, l.setpoint_c, out.air_c, out.dew_point_c, supply_dp_c, request_c);
    os << line;
  }
  return os.str();
}

std::string summary_json(const simulation& sim, const pace_report* pace) {
  nlohmann::json j;
  const auto& sc = sim.script();
  j["scenario"] = sc.name;
  j["date"] = sc.date;
  j["start"] = format_iso8601_utc(sc.at(sc.start_s));
  j["end"] = format_iso8601_utc(sc.at(sc.end_s));
  j["building"] = sim.plant().layout().name;
  j["mode"] = sim.options().with_service ? "service" : "baseline";
  j["seed"] = sim.options().seed;
  j["condensation_zone_min"] = hundredths(sim.truth().total_condensing_min());
  nlohmann::json zones = nlohmann::json::object();
  const auto time_or_null = [](const std::optional<double>& t_s) {
    return t_s ? nlohmann::json(clock_text(*t_s)) : nlohmann::json();
  };
  for (const auto& z : verdict_of(sim).zones) {
    nlohmann::json o = {{"condensation_min", hundredths(z.wet_min)},
                        {"lowest_margin_k", hundredths(z.lowest_margin_k)},
                        {"lowest_margin_at", clock_text(z.lowest_margin_at_s)},
                        {"first_wet_at", time_or_null(z.first_wet_s)}};
    if (sim.options().with_service) {
      o["alarms"] = z.alarms;
      o["first_alarm_at"] = time_or_null(z.first_alarm_s);
      o["warning_min"] = z.warning_min ? nlohmann::json(hundredths(*z.warning_min)) : nlohmann::json();
    }
    zones[z.zone] = std::move(o);
  }
  j["zones"] = zones;
  nlohmann::json by = nlohmann::json::object();
  for (const auto& kv : sim.truth().condensing_min_by_incident()) by[kv.first] = hundredths(kv.second);
  j["condensation_zone_min_while"] = by;
  if (sim.options().with_service) {
    const auto& t = sim.watch().tally();
    j["service"] = {{"alarms_raised", t.alarms_raised},
                    {"acknowledged", t.acknowledged},
                    {"acks_sent", t.acks_sent},
                    {"valves_closed", t.valves_closed},
                    {"valves_opened", t.valves_opened},
                    {"setpoint_events", t.setpoint_events},
                    {"dehumidify_events", t.dehumidify_events},
                    {"input_events", t.input_events},
                    {"rejected", t.rejected},
                    {"band_events", t.band_events},
                    {"alarms_by_zone", t.alarms_by_zone},
                    {"bands_entered", t.bands_entered},
                    {"unit_alarms_raised", t.unit_alarm_onsets_s.size()},
                    {"alarms_raised_while", alarms_raised_while(sim)}};
    const auto& c = sim.commands();
    nlohmann::json sp = nlohmann::json::object();
    for (const auto& kv : c.setpoint_by_loop) sp[kv.first] = {{"min_c", kv.second.min}, {"max_c", kv.second.max}};
    nlohmann::json dp = nlohmann::json::object();
    for (const auto& kv : c.dew_point_request_by_unit) {
      dp[kv.first] = {{"min_c", kv.second.min}, {"max_c", kv.second.max}};
    }
    j["commands"] = {{"setpoint_c", sp},
                     {"dew_point_request_c", dp},
                     {"valve_closings", c.valve_closings},
                     {"valve_openings", c.valve_openings},
                     {"bad_commands", c.bad_commands}};
    j["broker_outage"] = {{"readings_dropped", sim.outage().readings_dropped},
                          {"messages_missed", sim.outage().messages_missed}};
  }
  if (pace) {
    j["pace"] = {
        {"asked_speed", pace->asked_speed},       {"achieved_speed", hundredths(pace->achieved_speed)},
        {"simulated_s", hundredths(pace->sim_s)}, {"wall_s", hundredths(pace->wall_s)},
        {"slowed_s", hundredths(pace->slowed_s)}, {"broker_wait_s", hundredths(pace->broker_wait_s)},
        {"broker_stalls", pace->broker_stalls},   {"service_wait_s", hundredths(pace->service_wait_s)},
        {"service_stalls", pace->service_stalls}, {"worst_service_lag_s", hundredths(pace->worst_service_lag_s)}};
  }
  return json_dump(j);
}

std::string compare_json(const simulation& baseline, const simulation& supervised, const pace_report* pace,
                         std::optional<double> max_wet_zone_min) {
  nlohmann::json j;
  j["scenario"] = supervised.script().name;
  j["building"] = supervised.plant().layout().name;
  j["max_wet_zone_min"] = max_wet_zone_min ? nlohmann::json(*max_wet_zone_min) : nlohmann::json();
  const double wet = supervised.truth().total_condensing_min();
  j["verdict"] = !max_wet_zone_min ? "none" : wet <= *max_wet_zone_min ? "pass" : "fail";
  j["baseline"] = nlohmann::json::parse(summary_json(baseline, nullptr));
  j["service"] = nlohmann::json::parse(summary_json(supervised, pace));
  return j.dump();
}

}  // namespace dewmargin::sim
