#include "dewmargin/restart_needed.h"

#include <algorithm>

namespace dewmargin {
namespace {

class differences {
 public:
  template <typename T>
  void compare(const char* setting, const T& old_value, const T& new_value) {
    if (!(old_value == new_value)) names_.emplace_back(setting);
  }
  void add(std::string name) { names_.push_back(std::move(name)); }
  std::vector<std::string> take() { return std::move(names_); }

 private:
  std::vector<std::string> names_;
};

void compare_tls(const std::optional<tls_config>& old_tls, const std::optional<tls_config>& new_tls, differences& d) {
  if (old_tls.has_value() != new_tls.has_value()) {
    d.add("broker.tls");
    return;
  }
  if (!old_tls) return;
  d.compare("broker.tls.ca_file", old_tls->ca_file, new_tls->ca_file);
  d.compare("broker.tls.cert_file", old_tls->cert_file, new_tls->cert_file);
  d.compare("broker.tls.key_file", old_tls->key_file, new_tls->key_file);
}

void compare_http(const std::optional<http_config>& old_http, const std::optional<http_config>& new_http,
                  differences& d) {
  if (old_http.has_value() != new_http.has_value()) {
    d.add("http");
    return;
  }
  if (!old_http) return;
  d.compare("http.listen", old_http->host + ":" + std::to_string(old_http->port),
            new_http->host + ":" + std::to_string(new_http->port));
  d.compare("http.token_file", old_http->token_file, new_http->token_file);
}

void add_topic(const input_config& in, std::vector<std::string>& topics) {
  if (std::find(topics.begin(), topics.end(), in.topic) == topics.end()) topics.push_back(in.topic);
}

}  // namespace

std::vector<std::string> input_topics(const site_config& c) {
  std::vector<std::string> topics;
  for (const auto& l : c.loops) {
    add_topic(l.supply_temp, topics);
    if (l.return_temp) add_topic(*l.return_temp, topics);
    if (l.flow) add_topic(*l.flow, topics);
  }
  for (const auto& z : c.zones) {
    add_topic(z.air_temp, topics);
    for (const auto& h : z.humidity) add_topic(h, topics);
    for (const auto& s : z.surfaces) add_topic(s, topics);
    if (z.condensation_switch) add_topic(*z.condensation_switch, topics);
    if (z.window_contact) add_topic(*z.window_contact, topics);
  }
  for (const auto& d : c.dehumidifiers) {
    if (d.fault) add_topic(*d.fault, topics);
    if (d.supply_dew_point) add_topic(*d.supply_dew_point, topics);
  }
  return topics;
}

site_config with_start_settings_of(const site_config& running, site_config fresh) {
  fresh.broker = running.broker;
  fresh.storage = running.storage;
  fresh.publish.prefix = running.publish.prefix;
  fresh.clock.source = running.clock.source;
  fresh.http = running.http;
  return fresh;
}

std::vector<std::string> restart_needed(const site_config& old, const site_config& fresh) {
  differences d;
  const broker_config& ob = old.broker;
  const broker_config& nb = fresh.broker;
  d.compare("broker.uri", ob.uri, nb.uri);
  d.compare("broker.client_id", ob.client_id, nb.client_id);
  d.compare("broker.username", ob.username, nb.username);
  d.compare("broker.password_file", ob.password_file, nb.password_file);
  compare_tls(ob.tls, nb.tls, d);
  d.compare("broker.keepalive_s", ob.keepalive_s, nb.keepalive_s);
  d.compare("storage.path", old.storage.path, fresh.storage.path);
  d.compare("storage.keep_events_days", old.storage.keep_events_days, fresh.storage.keep_events_days);
  d.compare("storage.keep_samples_days", old.storage.keep_samples_days, fresh.storage.keep_samples_days);
  d.compare("storage.keep_minute_samples_days", old.storage.keep_minute_samples_days,
            fresh.storage.keep_minute_samples_days);
  d.compare("publish.prefix", old.publish.prefix, fresh.publish.prefix);
  d.compare("clock.source", old.clock.source, fresh.clock.source);
  compare_http(old.http, fresh.http, d);
  // Subscriptions are made at start: a new topic is not received until then. A topic no
  // longer read needs nothing (its messages are simply not routed).
  for (const auto& topic : new_input_topics(old, fresh)) d.add("input topic '" + topic + "' (new)");
  return d.take();
}

std::vector<std::string> new_input_topics(const site_config& old, const site_config& fresh) {
  const std::vector<std::string> subscribed = input_topics(old);
  std::vector<std::string> added;
  for (const auto& topic : input_topics(fresh)) {
    if (std::find(subscribed.begin(), subscribed.end(), topic) == subscribed.end()) added.push_back(topic);
  }
  return added;
}

}  // namespace dewmargin
