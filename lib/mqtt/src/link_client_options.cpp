#include "link_client_options.h"

#include <cmath>
#include <utility>

#include "dewmargin/broker_tls.h"
#include "dewmargin/broker_uri.h"

namespace dewmargin::detail {

::mqtt::create_options make_create_options(const mqtt_link_options& options) {
  ::mqtt::create_options create(MQTTVERSION_3_1_1);
  create.set_send_while_disconnected(false);  // the outbox buffers; a refused send goes back to it
  create.set_max_buffered_messages(static_cast<int>(options.max_in_flight) + k_library_headroom);
  return create;
}

::mqtt::connect_options make_connect_options(const mqtt_link_options& options, const std::string& password) {
  ::mqtt::connect_options c;
  c.set_mqtt_version(MQTTVERSION_3_1_1);
  c.set_clean_session(false);
  c.set_keep_alive_interval(static_cast<int>(std::lround(options.broker.keepalive_s)));
  c.set_connect_timeout(static_cast<int>(options.connect_timeout.count()));
  // No automatic reconnect: the link replaces the client after a loss (mqtt_link.cpp).
  c.set_max_inflight(static_cast<int>(options.max_in_flight) + k_library_headroom);
  if (!options.status_topic.empty()) {
    c.set_will(::mqtt::will_options(options.status_topic, options.offline_will_payload, k_qos, true));
  }
  if (!options.broker.username.empty()) {
    c.set_user_name(options.broker.username);
  }
  if (!password.empty()) {
    c.set_password(password);
  }
  if (broker_transport_of(options.broker.uri) == broker_transport::tls) {
    c.set_ssl(broker_ssl_options(options.broker.tls.value_or(tls_config{})));
  }
  return c;
}

}  // namespace dewmargin::detail
