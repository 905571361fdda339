#include "link_options_check.h"

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <memory>
#include <optional>
#include <utility>

#include "dewmargin/broker_uri.h"

namespace dewmargin::detail {
namespace {


std::string check_readable(const std::string& field, const std::string& path) {
  const std::unique_ptr<std::FILE, int (*)(std::FILE*)> f(std::fopen(path.c_str(), "rb"), &std::fclose);
  if (!f) {
    return field + " " + path + ": cannot read: " + std::strerror(errno);
  }
  return {};
}

}  // namespace

std::string invalid_publish_topic(const std::string& topic) {
  if (topic.empty()) {
    return "the topic is empty";
  }
  if (topic.find_first_of("+#") != std::string::npos) {
    return "a wildcard (+ or #) is not allowed in a publish topic";
  }
  if (topic.find('\0') != std::string::npos) {
    return "the topic holds a NUL character";
  }
  return {};
}

std::string check_link_options(const mqtt_link_options& o) {
  const broker_config& b = o.broker;
  const std::optional<broker_transport> transport = broker_transport_of(b.uri);
  if (!transport) {
    return "broker.uri \"" + b.uri + "\": must start with " + accepted_broker_schemes();
  }
  const bool tcp = transport == broker_transport::plain;
  if (b.uri.size() <= b.uri.find("://") + 3) {
    return "broker.uri \"" + b.uri + "\": names no host";
  }
  if (b.client_id.empty()) {
    return "broker.client_id is empty: a persistent session needs a stable client id";
  }
  if (!(b.keepalive_s >= 1.0 && b.keepalive_s <= 65535.0)) {
    return "broker.keepalive_s " + std::to_string(b.keepalive_s) + ": must lie in 1 ... 65535 s";
  }
  if (b.tls && tcp) {
    return "broker.tls is set but broker.uri " + b.uri + " is not encrypted: use ssl:// or mqtts://";
  }
  if (!b.password_file.empty() && b.username.empty()) {
    return "broker.password_file is set but broker.username is empty (MQTT 3.1.1 sends no password without a user)";
  }
  if (b.tls) {
    for (const auto& [field, path] : {std::pair<std::string, std::string>{"broker.tls.ca_file", b.tls->ca_file},
                                      {"broker.tls.cert_file", b.tls->cert_file},
                                      {"broker.tls.key_file", b.tls->key_file}}) {
      if (!path.empty()) {
        if (std::string why = check_readable(field, path); !why.empty()) {
          return why;
        }
      }
    }
    if (!b.tls->key_file.empty() && b.tls->cert_file.empty()) {
      return "broker.tls.key_file is set without broker.tls.cert_file";
    }
  }
  if (!o.status_topic.empty()) {
    if (std::string why = invalid_publish_topic(o.status_topic); !why.empty()) {
      return "status topic \"" + o.status_topic + "\": " + why;
    }
  }
  for (const std::string& filter : o.subscriptions) {
    if (filter.empty()) {
      return "an empty subscription topic filter";
    }
  }
  if (o.max_in_flight < 1 || o.max_in_flight > 1000) {
    return "max_in_flight " + std::to_string(o.max_in_flight) + ": must lie in 1 ... 1000";
  }
  if (o.reconnect_min.count() < 1 || o.reconnect_max < o.reconnect_min) {
    return "reconnect back-off: need 1 s <= reconnect_min <= reconnect_max";
  }
  if (o.connect_timeout.count() < 1) {
    return "connect_timeout must be at least 1 s";
  }
  return {};
}

}  // namespace dewmargin::detail
