// The `incidents` list of a scenario: what goes wrong, where and when (docs/scenarios.md).
#include <algorithm>
#include <cmath>
#include <limits>

#include "scenario_file/scenario_reading.h"

namespace dewmargin::sim::scenario_detail {
namespace {

// Outdoor air through an open door or window, m³/s. Invented demo values: a wide entrance door
// propped open in a breeze; a casement window with some wind (common practice, no source).
constexpr double k_door_open_m3_s = 1.5;
constexpr double k_window_open_m3_s = 0.3;

struct kind_rule {
  incident_kind kind;
  const char* target;                 // "zone", "loop", "dehumidifier", "zone or loop" or ""
  std::vector<std::string> required;  // besides kind, start, end and the target
  std::vector<std::string> optional;
};

const std::vector<kind_rule>& rules() {
  static const std::vector<kind_rule> r = {
      {incident_kind::door_open, "zone", {}, {"flow_m3_s"}},
      {incident_kind::window_open, "zone", {}, {"flow_m3_s"}},
      {incident_kind::crowd, "zone", {"people"}, {}},
      {incident_kind::coil_trip, "dehumidifier", {}, {}},
      {incident_kind::sensor_silent, "zone or loop", {"input"}, {"topic"}},
      {incident_kind::sensor_stuck, "zone or loop", {"input", "value"}, {"topic"}},
      {incident_kind::sensor_drift, "zone or loop", {"input"}, {"topic", "k_per_h", "pct_per_h"}},
      {incident_kind::switch_wet, "zone", {}, {}},
      {incident_kind::supply_high, "loop", {}, {"max_c"}},
      {incident_kind::broker_outage, "", {}, {}},
  };
  return r;
}

std::vector<std::string> kind_words() {
  std::vector<std::string> w;
  for (const auto& r : rules()) w.push_back(incident_kind_name(r.kind));
  return w;
}

const std::vector<std::string> k_all_keys = {"kind",  "start",        "end",       "note",      "zone",
                                             "loop",  "dehumidifier", "input",     "topic",     "people",
                                             "value", "k_per_h",      "pct_per_h", "flow_m3_s", "max_c"};
const std::vector<std::string> k_zone_inputs = {"air_temp", "humidity", "surface"};
const std::vector<std::string> k_loop_inputs = {"supply_temp", "return_temp", "flow"};

sensor_input input_from_word(const std::string& w) {
  if (w == "humidity") return sensor_input::humidity;
  if (w == "surface") return sensor_input::surface;
  if (w == "supply_temp") return sensor_input::supply_temp;
  if (w == "return_temp") return sensor_input::return_temp;
  if (w == "flow") return sensor_input::flow;
  return sensor_input::air_temp;
}

// The topics of the config a sensor incident can hit (none: the target lacks the input).
std::vector<std::string> topics_of(const config_view& config, const std::string& target, sensor_input in) {
  std::vector<std::string> t;
  if (const zone_config* z = config.zone(target)) {
    if (in == sensor_input::air_temp) t.push_back(z->air_temp.topic);
    if (in == sensor_input::humidity) {
      for (const auto& h : z->humidity) t.push_back(h.topic);
    }
    if (in == sensor_input::surface) {
      for (const auto& s : z->surfaces) t.push_back(s.topic);
    }
  }
  if (const loop_config* l = config.loop(target)) {
    if (in == sensor_input::supply_temp) t.push_back(l->supply_temp.topic);
    if (in == sensor_input::return_temp && l->return_temp) t.push_back(l->return_temp->topic);
    if (in == sensor_input::flow && l->flow) t.push_back(l->flow->topic);
  }
  return t;
}

// A sensor incident's value: in °C for temperatures, %RH for humidity, L/s for flow.
number_range value_range(sensor_input in) {
  switch (in) {
    case sensor_input::humidity:
      return number_range::between(0.0, 100.0);
    case sensor_input::flow:
      return number_range::between(0.0, 1000.0);
    case sensor_input::air_temp:
    case sensor_input::surface:
    case sensor_input::supply_temp:
    case sensor_input::return_temp:
      break;
  }
  return number_range::between(-20.0, 80.0);
}

bool is_temperature(sensor_input in) { return in != sensor_input::humidity && in != sensor_input::flow; }

// Reads the target key(s) of one incident; empty when it is missing or wrong (reported).
std::string read_target(const fields& f, const kind_rule& rule, const config_view& config) {
  const std::string kind = incident_kind_name(rule.kind);
  const std::string target_rule = rule.target;
  for (const char* key : {"zone", "loop", "dehumidifier"}) {
    if (f.has(key) && target_rule.find(key) == std::string::npos) {
      f.src().error(f.key_place(key),
                    f.context() + ": a " + kind + " incident " +
                        (target_rule.empty() ? std::string("has no target") : "targets a " + target_rule) +
                        ", not a '" + key + "'");
    }
  }
  if (target_rule.empty()) return {};
  const bool zone_ok = target_rule.find("zone") != std::string::npos;
  const bool loop_ok = target_rule.find("loop") != std::string::npos;
  if (zone_ok && loop_ok && f.has("zone") && f.has("loop")) {
    f.src().error(f.key_place("loop"), f.context() + ": give 'zone' or 'loop', not both");
    return {};
  }
  std::string key = target_rule;
  if (zone_ok && loop_ok) key = f.has("loop") ? "loop" : "zone";
  if (!f.has(key)) {
    f.src().error(f.where(),
                  f.context() + ": missing required key '" + (zone_ok && loop_ok ? "zone' or 'loop" : key) + "'");
    return {};
  }
  const auto id = f.text(key);
  if (!id) return {};
  const bool known = key == "zone"   ? config.zone(*id) != nullptr
                     : key == "loop" ? config.loop(*id) != nullptr
                                     : config.dehumidifier(*id) != nullptr;
  if (!known) {
    const auto ids = key == "zone" ? config.zone_ids() : key == "loop" ? config.loop_ids() : config.dehumidifier_ids();
    f.error_at_value(key, unknown_id(key, *id, ids, config));
    return {};
  }
  return *id;
}

std::string describe_incident(const incident& i, const std::string& unit) {
  std::string text = incident_kind_name(i.kind);
  if (!i.target.empty())
    text += (i.input ? " of " + std::string(sensor_input_name(*i.input)) + " in " : " in ") + i.target;
  switch (i.kind) {
    case incident_kind::crowd:
      text += " (" + number_text(i.value) + " people)";
      break;
    case incident_kind::sensor_stuck:
      text += " (at " + number_text(i.value) + " " + unit + ")";
      break;
    case incident_kind::sensor_drift:
      text += " (" + std::string(i.value >= 0 ? "+" : "") + number_text(i.value) + " " + unit + "/h)";
      break;
    default:
      break;
  }
  return text;
}

std::optional<incident> read_incident(const YAML::Node& node, int number, const source& src, const config_view& config,
                                      double day_start_s, double day_end_s) {
  const std::string label = "incident " + std::to_string(number);
  if (!node.IsMap()) {
    src.error(place_of(node), label + " must be a map with 'kind', 'start' and 'end', got " + describe(node));
    return std::nullopt;
  }
  // The kind first, to name the incident in the other messages. (yaml-cpp's iterator hands
  // out temporaries: keep the text, not a pointer into one.)
  std::string kind_text;
  for (const auto& kv : node) {
    if (kv.first.IsScalar() && kv.first.Scalar() == "kind" && kv.second.IsScalar()) {
      kind_text = kv.second.Scalar();
      break;
    }
  }
  const std::string context = label + (kind_text.empty() ? std::string() : " (" + kind_text + ")");
  const fields f(node, context, k_all_keys, src);
  f.require("kind");
  f.require("start");
  f.require("end");
  const auto kind_word = f.word("kind", kind_words());
  incident inc;
  const auto start = f.time_of_day("start");
  const auto end = f.time_of_day("end");
  bool ok = kind_word && start && end;
  if (start && end && *end <= *start) {
    f.error_at_value("end", context + ": 'end' " + clock_text(*end) + " is not after 'start' " + clock_text(*start));
    ok = false;
  } else if (start && end && (*start < day_start_s || *end > day_end_s)) {
    f.error_at_value(*start < day_start_s ? "start" : "end", context + ": " + clock_text(*start) + "-" +
                                                                 clock_text(*end) + " is outside the day " +
                                                                 clock_text(day_start_s) + "-" + clock_text(day_end_s));
    ok = false;
  }
  if (!kind_word) return std::nullopt;
  const kind_rule& rule = *std::find_if(rules().begin(), rules().end(),
                                        [&](const kind_rule& r) { return *kind_word == incident_kind_name(r.kind); });
  inc.kind = rule.kind;
  if (start) inc.start_s = *start;
  if (end) inc.end_s = *end;

  // Keys that do not belong to this kind.
  for (const auto& key : k_all_keys) {
    if (!f.has(key) || key == "kind" || key == "start" || key == "end" || key == "note" || key == "zone" ||
        key == "loop" || key == "dehumidifier") {
      continue;
    }
    const bool allowed = std::find(rule.required.begin(), rule.required.end(), key) != rule.required.end() ||
                         std::find(rule.optional.begin(), rule.optional.end(), key) != rule.optional.end();
    if (!allowed) {
      f.src().error(f.key_place(key), context + ": '" + key + "' does not apply to a " + *kind_word + " incident");
      ok = false;
    }
  }
  for (const auto& key : rule.required) ok = f.require(key) && ok;
  inc.target = read_target(f, rule, config);
  if (std::string(rule.target).size() > 0 && inc.target.empty()) ok = false;

  std::string unit;
  switch (inc.kind) {
    case incident_kind::door_open:
    case incident_kind::window_open:
      inc.value = inc.kind == incident_kind::door_open ? k_door_open_m3_s : k_window_open_m3_s;
      f.number_into("flow_m3_s", number_range::positive(), inc.value);
      break;
    case incident_kind::crowd:
      if (const auto p = f.number("people", number_range::non_negative()))
        inc.value = *p;
      else
        ok = false;
      break;
    case incident_kind::switch_wet:
      if (!inc.target.empty() && !config.zone(inc.target)->condensation_switch) {
        f.error_at_value(
            "zone", context + ": zone '" + inc.target + "' has no condensation_switch in the config " + config.label);
        ok = false;
      }
      break;
    case incident_kind::supply_high:
      inc.value = std::numeric_limits<double>::quiet_NaN();  // the loop's design supply, filled in later
      if (f.has("max_c")) {
        if (const auto v = f.number("max_c", number_range::between(5.0, 30.0)))
          inc.value = *v;
        else
          ok = false;
      }
      break;
    case incident_kind::sensor_silent:
    case incident_kind::sensor_stuck:
    case incident_kind::sensor_drift: {
      if (inc.target.empty()) {
        ok = false;  // the target's error is reported; its inputs are unknown
        break;
      }
      const bool on_loop = !inc.target.empty() && config.loop(inc.target) && !f.has("zone");
      const auto word = f.word("input", on_loop ? k_loop_inputs : k_zone_inputs);
      if (!word) {
        ok = false;
        break;
      }
      inc.input = input_from_word(*word);
      unit = is_temperature(*inc.input) ? "°C" : *inc.input == sensor_input::humidity ? "%RH" : "L/s";
      const auto topics = inc.target.empty() ? std::vector<std::string>{} : topics_of(config, inc.target, *inc.input);
      if (!inc.target.empty() && topics.empty()) {
        f.error_at_value("input", context + ": " + (on_loop ? "loop '" : "zone '") + inc.target + "' has no " + *word +
                                      " input in the config " + config.label);
        ok = false;
      }
      if (const auto t = f.text("topic")) {
        if (!topics.empty() && std::find(topics.begin(), topics.end(), *t) == topics.end()) {
          f.error_at_value("topic", context + ": '" + *t + "' is not a " + *word + " topic of " + inc.target +
                                        " (it has " + one_of(topics) + ")");
          ok = false;
        }
        inc.topic = *t;
      }
      if (inc.kind == incident_kind::sensor_stuck) {
        if (const auto v = f.number("value", value_range(*inc.input)))
          inc.value = *v;
        else
          ok = false;
      }
      if (inc.kind == incident_kind::sensor_drift) {
        const char* right = is_temperature(*inc.input) ? "k_per_h" : "pct_per_h";
        const char* wrong = is_temperature(*inc.input) ? "pct_per_h" : "k_per_h";
        if (f.has(wrong)) {
          f.src().error(f.key_place(wrong),
                        context + ": input '" + *word + "' drifts in '" + right + "', not '" + wrong + "'");
          ok = false;
        } else if (!f.has(right)) {
          f.src().error(f.where(), context + ": missing required key '" + right + "'");
          ok = false;
        } else if (const auto v = f.number(right, number_range::between(-100.0, 100.0))) {
          inc.value = *v;
          unit = is_temperature(*inc.input) ? "K" : *inc.input == sensor_input::humidity ? "%RH" : "%";
        } else {
          ok = false;
        }
      }
      break;
    }
    case incident_kind::coil_trip:
    case incident_kind::broker_outage:
      break;
  }
  inc.description = f.text("note").value_or(describe_incident(inc, unit));
  if (!ok) return std::nullopt;
  return inc;
}

}  // namespace

std::vector<incident> read_incidents(const fields& top, const config_view& config, double day_start_s,
                                     double day_end_s) {
  std::vector<incident> out;
  const YAML::Node* list = top.node("incidents");
  if (!list || list->IsNull()) return out;
  if (!list->IsSequence()) {
    top.error_at_value("incidents", "'incidents' must be a list, got " + describe(*list));
    return out;
  }
  int number = 0;
  for (const auto& item : *list) {
    ++number;
    if (auto i = read_incident(item, number, top.src(), config, day_start_s, day_end_s)) out.push_back(std::move(*i));
  }
  return out;
}

}  // namespace dewmargin::sim::scenario_detail
