// `dewmargin check`: validate a config file and summarise it.
#include <cstdio>
#include <ostream>
#include <set>
#include <string>
#include <vector>

#include "commands.h"
#include "dewmargin/config_loader.h"
#include "dewmargin/input_decoder.h"
#include "dewmargin/named_files_check.h"
#include "dewmargin/safe_text.h"

namespace dewmargin::cli {
namespace {

std::string num(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%g", v);
  return buf;
}

std::string plural(std::size_t n, const char* one, const char* many) {
  return std::to_string(n) + " " + (n == 1 ? one : many);
}

const char* unit_label(input_unit u) {
  switch (u) {
    case input_unit::celsius:
      return "°C";
    case input_unit::fahrenheit:
      return "°F";
    case input_unit::percent:
      return "% RH";
    case input_unit::fraction:
      return "RH fraction";
    case input_unit::litres_per_second:
      return "L/s";
    case input_unit::cubic_metres_per_hour:
      return "m3/h";
    case input_unit::us_gallons_per_minute:
      return "gpm";
    case input_unit::none:
      break;
  }
  return "";
}

std::string quoted_words(const std::vector<std::string>& words) {
  std::string s;
  for (std::size_t i = 0; i < words.size(); ++i) s += (i == 0 ? " \"" : ", \"") + words[i] + "\"";
  return s;
}

// topic[field] unit, then what is special about this input.
std::string describe_input(const input_config& in) {
  std::string s = in.topic;
  if (!in.field.empty()) s += "[" + in.field + "]";
  if (in.unit != input_unit::none) s += std::string(" ") + unit_label(in.unit);
  if (!in.active.empty()) {
    s += " active:" + quoted_words(in.active);
    s += std::string(in.inactive.empty() ? " inactive (default):" : " inactive:") + quoted_words(inactive_payloads(in));
  }
  if (in.stale_after_s)
    s += *in.stale_after_s == 0.0 ? " (never stale)" : " (stale after " + num(*in.stale_after_s) + " s)";
  return s;
}

void line(std::ostream& out, const char* label, const std::string& text) {
  char head[32];
  std::snprintf(head, sizeof head, "    %-20s ", label);
  out << head << text << '\n';
}

std::string thresholds_text(const band_thresholds& t, const band_thresholds& defaults) {
  std::string s = "warn " + num(t.margin_warn_k) + " K, alarm " + num(t.margin_alarm_k) + " K, hysteresis " +
                  num(t.hysteresis_k) + " K, confirm " + num(t.confirm_s) + " s, stale after " + num(t.stale_after_s) +
                  " s, trend window " + num(t.trend_window_s) + " s";
  std::vector<const char*> overridden;
  if (t.margin_warn_k != defaults.margin_warn_k) overridden.push_back("margin_warn_k");
  if (t.margin_alarm_k != defaults.margin_alarm_k) overridden.push_back("margin_alarm_k");
  if (t.hysteresis_k != defaults.hysteresis_k) overridden.push_back("hysteresis_k");
  if (t.confirm_s != defaults.confirm_s) overridden.push_back("confirm_s");
  if (t.stale_after_s != defaults.stale_after_s) overridden.push_back("stale_after_s");
  if (t.trend_window_s != defaults.trend_window_s) overridden.push_back("trend_window_s");
  if (!overridden.empty()) {
    s += " (differs from defaults:";
    for (std::size_t i = 0; i < overridden.size(); ++i) s += std::string(i == 0 ? " " : ", ") + overridden[i];
    s += ")";
  }
  return s;
}

void print_summary(const std::string& file, const site_config& c, std::ostream& out) {
  std::size_t inputs = 0;
  std::set<std::string> topics;
  const auto count = [&](const input_config& in) {
    ++inputs;
    topics.insert(in.topic);
  };

  out << file << ": ok\n";
  out << "site      " << c.site << '\n';
  std::string broker =
      c.broker.uri + ", client id " + c.broker.client_id + ", keepalive " + num(c.broker.keepalive_s) + " s";
  if (!c.broker.username.empty()) broker += ", user " + c.broker.username;
  if (!c.broker.password_file.empty()) broker += ", password from " + c.broker.password_file;
  if (c.broker.tls) broker += ", TLS";
  out << "broker    " << broker << '\n';
  out << "storage   " << c.storage.path << " (events kept " << num(c.storage.keep_events_days) << " d, samples "
      << num(c.storage.keep_samples_days) << " d)\n";
  out << "publish   prefix " << c.publish.prefix << "/ (unchanged states at most every "
      << num(c.publish.min_interval_s) << " s)\n";
  out << "logging   " << c.logging.level << '\n';

  out << "\nloops (" << c.loops.size() << ")\n";
  for (const auto& l : c.loops) {
    out << "  " << l.id << '\n';
    line(out, "supply_temp", describe_input(l.supply_temp));
    count(l.supply_temp);
    if (l.return_temp) {
      line(out, "return_temp", describe_input(*l.return_temp));
      count(*l.return_temp);
    }
    if (l.flow) {
      line(out, "flow", describe_input(*l.flow));
      count(*l.flow);
    }
    const auto& s = l.setpoint;
    line(out, "setpoint",
         s.topic + ", " + num(s.min_c) + " to " + num(s.max_c) + " °C (reset margin " + num(s.reset_margin_k) +
             " K, falls at most " + num(s.fall_k_per_min) + " K/min)");
    line(out, "inputs stale after", l.stale_after_s == 0.0 ? "never" : num(l.stale_after_s) + " s");
  }

  out << "\nzones (" << c.zones.size() << ")\n";
  for (const auto& z : c.zones) {
    out << "  " << z.id << " (loop " << z.loop << ")\n";
    line(out, "air_temp", describe_input(z.air_temp));
    count(z.air_temp);
    for (const auto& h : z.humidity) {
      line(out, "humidity", describe_input(h));
      count(h);
    }
    for (const auto& s : z.surfaces) {
      line(out, "surface", describe_input(s));
      count(s);
    }
    if (z.surfaces.empty()) line(out, "surface", "none: the loop's supply temperature stands in");
    if (z.condensation_switch) {
      line(out, "condensation_switch", describe_input(*z.condensation_switch));
      count(*z.condensation_switch);
    }
    if (z.window_contact) {
      line(out, "window_contact", describe_input(*z.window_contact));
      count(*z.window_contact);
    }
    if (z.valve) {
      line(out, "valve",
           z.valve->topic + " (\"" + z.valve->open_payload + "\" / \"" + z.valve->closed_payload + "\", reopen after " +
               num(z.valve->reopen_after_s) + " s)");
    } else {
      line(out, "valve", "none");
    }
    line(out, "thresholds", thresholds_text(z.thresholds, c.defaults));
  }

  out << "\ndehumidifiers (" << c.dehumidifiers.size() << ")" << (c.dehumidifiers.empty() ? ": none" : "") << '\n';
  for (const auto& d : c.dehumidifiers) {
    std::string zones;
    for (const auto& z : d.zones) zones += (zones.empty() ? "" : ", ") + z;
    const auto& r = d.dew_point_request;
    out << "  " << d.id << " (zones " << zones << ")\n";
    line(out, "dew_point_request",
         r.topic + ", " + num(r.min_c) + " to " + num(r.max_c) + " °C (offset " + num(r.offset_k) + " K)");
  }

  out << "\ntotals: " << plural(c.zones.size(), "zone", "zones") << ", " << plural(c.loops.size(), "loop", "loops")
      << ", " << plural(c.dehumidifiers.size(), "dehumidifier", "dehumidifiers") << ", "
      << plural(inputs, "input", "inputs") << " subscribed (" << plural(topics.size(), "topic", "topics") << ")\n";
}

}  // namespace

int run_check(const std::string& file, std::ostream& out, std::ostream& err) {
  const auto loaded = load_config_file(file);
  if (!loaded.ok()) {
    for (const auto& d : loaded.errors) err << d.to_string() << '\n';
    return k_exit_usage;
  }
  const auto file_problems = check_named_files(*loaded.config);
  if (!file_problems.empty()) {
    for (const auto& p : file_problems) err << printable_text(file) << ": " << p << '\n';
    return k_exit_usage;
  }
  print_summary(file, *loaded.config, out);
  return k_exit_ok;
}

}  // namespace dewmargin::cli
