// The one reader of broker URI schemes (common practice, no source: the scheme names are
// the ones the Paho C client takes for MQTT over TCP and over TLS).
#include <gtest/gtest.h>

#include <mqtt/connect_options.h>

#include "dewmargin/broker_uri.h"
#include "dewmargin/mqtt_link.h"
#include "link_client_options.h"

namespace dewmargin {
namespace {

TEST(BrokerUri, TellsPlainFromTls) {
  EXPECT_EQ(broker_transport_of("tcp://127.0.0.1:1883"), broker_transport::plain);
  EXPECT_EQ(broker_transport_of("mqtt://broker.local"), broker_transport::plain);
  EXPECT_EQ(broker_transport_of("ssl://broker.local:8883"), broker_transport::tls);
  EXPECT_EQ(broker_transport_of("mqtts://[::1]:8883"), broker_transport::tls);
}

TEST(BrokerUri, RefusesOtherSchemes) {
  for (const char* uri : {"", "tcp:/x", "http://x", "ws://x:80", "wss://x:443", "unix:///run/mqtt.sock", "TCP://x",
                          " tcp://x", "mqttss://x"}) {
    EXPECT_FALSE(broker_transport_of(uri)) << uri;
  }
}

// mqtts:// once passed the config check and was then refused by the link, and would have
// connected without the TLS options: every accepted spelling must reach the same options.
TEST(BrokerUri, EveryAcceptedTlsSchemeGetsTheTlsOptions) {
  for (const char* uri : {"ssl://127.0.0.1:8883", "mqtts://127.0.0.1:8883"}) {
    mqtt_link_options o;
    o.broker.uri = uri;
    o.broker.client_id = "dewmargin-test";
    o.broker.tls = tls_config{"/etc/ssl/site-ca.crt", "", ""};
    const ::mqtt::connect_options c = detail::make_connect_options(o, "");
    EXPECT_EQ(c.get_ssl_options().get_trust_store(), "/etc/ssl/site-ca.crt") << uri;
  }
  mqtt_link_options plain;
  plain.broker.uri = "mqtt://127.0.0.1:1883";
  plain.broker.client_id = "dewmargin-test";
  EXPECT_EQ(detail::make_connect_options(plain, "").get_ssl_options().get_trust_store(), "");
}

}  // namespace
}  // namespace dewmargin
