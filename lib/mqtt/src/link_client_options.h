#pragma once
// The client library's options built from the link's options: what the MQTT session is
// (3.1.1, persistent, QoS 1, Last Will, back-off, TLS with host-name check). Kept apart from
// the link's threads and state so that each can be read on its own.
#include <mqtt/connect_options.h>
#include <mqtt/create_options.h>

#include <string>

#include "dewmargin/mqtt_link.h"

namespace dewmargin::detail {

constexpr int k_qos = 1;
// The library buffers the online status and subscribe requests beside our own publishes:
// its buffer and in-flight limits get this much room above max_in_flight.
constexpr int k_library_headroom = 16;

::mqtt::create_options make_create_options(const mqtt_link_options& options);

// The password is only passed through (never logged, never kept elsewhere).
::mqtt::connect_options make_connect_options(const mqtt_link_options& options, const std::string& password);

}  // namespace dewmargin::detail
