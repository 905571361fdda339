#pragma once
// TCP no-delay on the client library's broker connection.
//
// Paho MQTT C 1.3 never sets TCP_NODELAY and offers no socket hook. Without it a small
// publish that follows another one waits for the broker's delayed ACK (Nagle's rule):
// measured on loopback as a flat floor of about 40 ms on a reading's round trip. So after each
// connect the service finds its own TCP sockets whose peer port is the broker's and sets the
// option on them. A wrong match is harmless: no-delay only changes when small segments go out.
#include <string>

namespace dewmargin {

// Sets TCP_NODELAY on every TCP socket of this process connected to peer_port. Returns
// how many sockets were set (0 when none matched, or /proc/self/fd is not readable).
int set_tcp_nodelay_to_peer(int peer_port);

// The port of a broker URI (tcp://host:port, ssl://[v6]:port, mqtt:// and mqtts://), or the
// scheme's default (1883 plain, 8883 TLS) when the URI names none; 0 when it is not a URI.
int broker_uri_port(const std::string& uri);

}  // namespace dewmargin
