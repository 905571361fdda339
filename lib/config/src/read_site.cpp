// The top level and the service sections: site, broker, storage, publish, defaults,
// plausibility, logging. The plant sections are in read_plant.cpp.
#include <algorithm>

#include "config_reading.h"
#include "dewmargin/broker_uri.h"

namespace dewmargin::config_detail {
namespace {

// A map section. Absent: nullopt (reported when required). Empty (`defaults:` with
// everything commented out) counts as an empty map for optional sections.
std::optional<yaml_node> section(const map_reader& top, const char* key, presence p, const char* shape_hint) {
  if (!top.has(key)) {
    if (p == presence::required) top.require(key);
    return std::nullopt;
  }
  const yaml_node& node = *top.value(key);
  if (node.is_null() && p == presence::optional) return std::nullopt;
  if (!expect_map(node, key, shape_hint, top.value_mark(key), top.diag())) return std::nullopt;
  return node;
}

bool non_empty_text(const map_reader& m, const char* key, presence p, std::string& target) {
  auto t = m.text(key, p);
  if (!t) return !m.has(key);
  if (t->value.empty()) {
    m.diag().error(t->at, std::string("'") + key + "' must not be empty");
    return false;
  }
  target = t->value;
  return true;
}

bool is_tls_scheme(const std::string& uri) { return broker_transport_of(uri) == broker_transport::tls; }

// scheme://host[:port], the forms Paho takes for MQTT over TCP and TLS.
bool check_broker_uri(const located<std::string>& uri, diagnostics& diag) {
  const std::string& u = uri.value;
  if (!broker_transport_of(u)) {
    diag.error(uri.at, "broker uri '" + u + "' must start with " + accepted_broker_schemes());
    return false;
  }
  const std::size_t rest = u.find("://") + 3;
  const std::string authority = u.substr(rest);
  const std::size_t colon = authority.rfind(':');
  const bool bracketed_v6 = !authority.empty() && authority.front() == '[';
  const std::size_t close = authority.find(']');
  const bool has_port = colon != std::string::npos && (!bracketed_v6 || (close != std::string::npos && colon > close));
  const std::string host = has_port ? authority.substr(0, colon) : authority;
  if (host.empty() || host.find('/') != std::string::npos) {
    diag.error(uri.at, "broker uri '" + u + "' must name a host, as in tcp://127.0.0.1:1883");
    return false;
  }
  if (has_port) {
    const std::string port = authority.substr(colon + 1);
    const bool digits = !port.empty() && port.size() <= 5 &&
                        std::all_of(port.begin(), port.end(), [](char c) { return c >= '0' && c <= '9'; });
    if (!digits || std::stoi(port) < 1 || std::stoi(port) > 65535) {
      diag.error(uri.at, "broker uri '" + u + "' has a bad port '" + port + "' (1 to 65535)");
      return false;
    }
  }
  return true;
}

void read_broker(const yaml_node& node, reading& r) {
  const map_reader m(node, "broker", {"uri", "client_id", "username", "password_file", "tls", "keepalive_s"}, r.diag);
  broker_config& b = r.config.broker;
  auto uri = m.text("uri", presence::required);
  if (uri && check_broker_uri(*uri, r.diag)) b.uri = uri->value;
  non_empty_text(m, "client_id", presence::required, b.client_id);
  non_empty_text(m, "username", presence::optional, b.username);
  if (non_empty_text(m, "password_file", presence::optional, b.password_file) && !b.password_file.empty() &&
      b.username.empty() && !m.has("username")) {
    // MQTT 3.1.1 §3.1.2.9 (from memory): a password may only be sent together with a user name.
    r.diag.error(m.key_mark("password_file"), "broker: 'password_file' needs a 'username'");
  }
  if (auto k = m.number("keepalive_s", number_rule::positive)) {
    if (k->value != static_cast<double>(static_cast<long>(k->value)) || k->value > 65535.0) {
      // The MQTT keep-alive is a 16-bit count of whole seconds (MQTT 3.1.1 §3.1.2.10, from memory).
      r.diag.error(k->at,
                   "'keepalive_s' must be a whole number of seconds from 1 to 65535, got " + format_number(k->value));
    } else {
      b.keepalive_s = k->value;
    }
  }
  if (auto tls_node = section(m, "tls", presence::optional, " like { ca_file: ..., cert_file: ..., key_file: ... }")) {
    const map_reader t(*tls_node, "broker tls", {"ca_file", "cert_file", "key_file"}, r.diag);
    tls_config tls;
    non_empty_text(t, "ca_file", presence::optional, tls.ca_file);
    non_empty_text(t, "cert_file", presence::optional, tls.cert_file);
    non_empty_text(t, "key_file", presence::optional, tls.key_file);
    if (t.has("key_file") && !t.has("cert_file")) {
      r.diag.error(t.key_mark("key_file"), "broker tls: 'key_file' needs the client certificate in 'cert_file'");
    }
    if (uri && !is_tls_scheme(uri->value)) {
      r.diag.error(m.key_mark("tls"), "broker: 'tls' is set but uri '" + uri->value +
                                          "' is not ssl:// or mqtts://; the connection would not be encrypted");
    }
    b.tls = tls;
  }
}

void read_storage(const yaml_node& node, reading& r) {
  const map_reader m(node, "storage", {"path", "keep_events_days", "keep_samples_days", "keep_minute_samples_days"},
                     r.diag);
  storage_config& s = r.config.storage;
  non_empty_text(m, "path", presence::required, s.path);
  m.number_into("keep_events_days", number_rule::positive, s.keep_events_days);
  m.number_into("keep_samples_days", number_rule::positive, s.keep_samples_days);
  m.number_into("keep_minute_samples_days", number_rule::positive, s.keep_minute_samples_days);
}

void read_publish(const yaml_node& node, reading& r) {
  const map_reader m(node, "publish", {"prefix", "min_interval_s", "setpoint_event_k"}, r.diag);
  publish_config& p = r.config.publish;
  if (m.has("prefix")) r.index.prefix.reset();  // set again below only when valid: no checks against a bad one
  if (auto prefix = m.text("prefix")) {
    const std::string& v = prefix->value;
    if (v.empty()) {
      r.diag.error(prefix->at, "publish prefix must not be empty");
    } else if (v.find_first_of("+#") != std::string::npos) {
      r.diag.error(prefix->at, "publish prefix '" + v + "' must not contain the MQTT wildcards '+' or '#'");
    } else if (v.front() == '/' || v.back() == '/') {
      r.diag.error(prefix->at, "publish prefix '" + v + "' must not start or end with '/'");
    } else {
      p.prefix = v;
      r.index.prefix = v;
    }
  }
  m.number_into("min_interval_s", number_rule::non_negative, p.min_interval_s);
  m.number_into("setpoint_event_k", number_rule::non_negative, p.setpoint_event_k);
}

void read_defaults(const yaml_node& node, reading& r) {
  const map_reader m(node, "defaults", threshold_keys(), r.diag);
  r.index.defaults = read_thresholds(m, r.config.defaults);
  check_defaults_margins(r.config.defaults, r.index.defaults, r.diag);
}

void read_range(const map_reader& section_reader, const char* key, value_range& range, reading& r) {
  auto node = section(section_reader, key, presence::optional, " like { min: ..., max: ... }");
  if (!node) return;
  const map_reader m(*node, std::string("plausibility ") + key, {"min", "max"}, r.diag);
  value_range v = range;
  const bool lo_ok = m.number_into("min", number_rule::any, v.min);
  const bool hi_ok = m.number_into("max", number_rule::any, v.max);
  if (!lo_ok || !hi_ok) return;
  if (v.min >= v.max) {
    r.diag.error(
        m.has("min") ? m.value_mark("min") : m.value_mark("max"),
        m.context() + ": 'min' (" + format_number(v.min) + ") must be below 'max' (" + format_number(v.max) + ")");
    return;
  }
  range = v;
}

void read_plausibility(const yaml_node& node, reading& r) {
  const map_reader m(node, "plausibility", {"air_temp_c", "surface_c", "water_c", "humidity_pct", "flow_l_s"}, r.diag);
  plausibility_config& p = r.config.plausibility;
  read_range(m, "air_temp_c", p.air_temp_c, r);
  read_range(m, "surface_c", p.surface_c, r);
  read_range(m, "water_c", p.water_c, r);
  read_range(m, "humidity_pct", p.humidity_pct, r);
  read_range(m, "flow_l_s", p.flow_l_s, r);
}

void read_logging(const yaml_node& node, reading& r) {
  const map_reader m(node, "logging", {"level"}, r.diag);
  auto level = m.text("level");
  if (!level) return;
  constexpr const char* k_levels[] = {"trace", "debug", "info", "warn", "error", "critical", "off"};
  if (std::find_if(std::begin(k_levels), std::end(k_levels), [&](const char* l) { return level->value == l; }) ==
      std::end(k_levels)) {
    r.diag.error(level->at,
                 "logging level '" + level->value + "' is not one of trace, debug, info, warn, error, critical, off");
    return;
  }
  r.config.logging.level = level->value;
}

void read_clock(const yaml_node& node, reading& r) {
  const map_reader m(node, "clock", {"source", "field"}, r.diag);
  if (auto source = m.text("source")) {
    if (source->value == "wall") {
      r.config.clock.source = clock_source::wall;
    } else if (source->value == "readings") {
      r.config.clock.source = clock_source::readings;
    } else {
      r.diag.error(source->at, "clock source '" + source->value + "' is not one of wall, readings");
    }
  }
  if (auto field = m.text("field")) {
    if (check_json_pointer(*field, r.diag)) r.config.clock.field = field->value;
  }
}

}  // namespace

void read_site(const yaml_node& root, reading& r) {
  if (!root.is_map()) {
    const source_mark at = mark_of(root);
    r.diag.error(
        at.line == 0 ? source_mark{1, 1} : at,
        "the top level must be a map of sections (site, broker, storage, loops, zones), got " + describe(root));
    return;
  }
  const map_reader top(root, "",
                       {"site", "broker", "storage", "publish", "defaults", "plausibility", "logging", "clock", "loops",
                        "zones", "dehumidifiers", "http"},
                       r.diag);
  non_empty_text(top, "site", presence::required, r.config.site);
  if (auto n = section(top, "broker", presence::required, " like { uri: ..., client_id: ... }")) read_broker(*n, r);
  if (auto n = section(top, "storage", presence::required, " like { path: ... }")) read_storage(*n, r);
  r.index.prefix = r.config.publish.prefix;  // the default, unless publish: says otherwise
  if (auto n = section(top, "publish", presence::optional, " like { prefix: ... }")) read_publish(*n, r);
  // Zones and loops inherit the defaults, so these come first whatever the file's order.
  if (auto n = section(top, "defaults", presence::optional, " of thresholds")) read_defaults(*n, r);
  if (auto n = section(top, "plausibility", presence::optional, " of { min: ..., max: ... } ranges")) {
    read_plausibility(*n, r);
  }
  if (auto n = section(top, "logging", presence::optional, " like { level: info }")) read_logging(*n, r);
  if (auto n = section(top, "clock", presence::optional, " like { source: readings, field: /ts }")) read_clock(*n, r);
  if (auto n = section(top, "http", presence::optional, " like { listen: \"127.0.0.1:8088\" }")) read_http(*n, r);
  if (top.has("loops")) read_loops(*top.value("loops"), top.value_mark("loops"), r);
  if (top.require("zones")) read_zones(*top.value("zones"), top.value_mark("zones"), r);
  if (top.has("dehumidifiers")) read_dehumidifiers(*top.value("dehumidifiers"), top.value_mark("dehumidifiers"), r);
  check_across_sections(r);
}

}  // namespace dewmargin::config_detail
