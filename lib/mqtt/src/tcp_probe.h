#pragma once
// Tells the causes of Paho's one "TCP/TLS connect failure" apart: does anything accept
// TCP connections at the broker's address? (Paho C++ 1.2.0 cannot report the TLS error
// text safely: see mqtt_link.cpp.)
#include <chrono>
#include <optional>
#include <string>

namespace dewmargin::detail {

struct host_port {
  std::string host;
  std::string port;
};

// "ssl://host:8883", "tcp://[::1]:1883"; the port defaults to 1883 (tcp, mqtt) or 8883 (ssl, mqtts).
std::optional<host_port> split_broker_uri(const std::string& uri);

// True when a TCP connection to host:port succeeds within timeout.
bool tcp_port_accepts(const host_port& where, std::chrono::milliseconds timeout);

}  // namespace dewmargin::detail
