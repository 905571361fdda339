// Facts about Paho MQTT C++ 1.2.0 / C 1.3.12 that the link's design depends on, pinned
// so that a library upgrade which changes them shows up here first.
#include <gtest/gtest.h>
#include <mqtt/async_client.h>

#include "mosquitto_fixture.h"
#include "mqtt_test_client.h"

namespace dewmargin {
namespace {

using namespace std::chrono_literals;
using test_support::mosquitto_broker;
using test_support::mqtt_test_client;

// Why ~mqtt_link publishes the offline status itself: the client's destructor sends a
// DISCONNECT, and after a DISCONNECT the broker discards the will.
TEST(PahoClient, DestroyWithoutDisconnectSuppressesWill) {
  mosquitto_broker broker;
  broker.start();
  mqtt_test_client status(broker.uri(), {"facts/status"});
  {
    ::mqtt::async_client client(broker.uri(), "facts-destroy", ::mqtt::create_options(MQTTVERSION_3_1_1), nullptr);
    ::mqtt::connect_options options;
    options.set_mqtt_version(MQTTVERSION_3_1_1);
    options.set_will(::mqtt::will_options("facts/status", std::string("offline-by-will"), 1, true));
    ASSERT_TRUE(client.connect(options)->wait_for(10s));
    ASSERT_TRUE(client.publish(::mqtt::make_message("facts/status", "online", 1, true))->wait_for(5s));
    ASSERT_TRUE(status.wait_for_payload("facts/status", "online", 5s));
  }
  EXPECT_FALSE(status.wait_for_payload("facts/status", "offline-by-will", 1500ms));
  EXPECT_NE(broker.log_text().find("Client facts-destroy disconnected."), std::string::npos) << broker.log_text();
}

// Why the link retries its first connect itself.
TEST(PahoClient, FirstConnectFailsWhileBrokerIsDown) {
  mosquitto_broker broker;  // never started
  ::mqtt::async_client client(broker.uri(), "facts-first", ::mqtt::create_options(MQTTVERSION_3_1_1), nullptr);
  ::mqtt::connect_options options;
  options.set_mqtt_version(MQTTVERSION_3_1_1);
  options.set_automatic_reconnect(1, 2);
  try {
    (void)client.connect(options)->wait_for(10s);
    ADD_FAILURE() << "connect succeeded with no broker";
  } catch (const ::mqtt::exception& e) {
    EXPECT_EQ(e.get_return_code(), MQTTASYNC_FAILURE) << e.what();
  }
  broker.start();
  std::this_thread::sleep_for(3s);  // longer than the reconnect bounds
  EXPECT_FALSE(client.is_connected()) << "automatic reconnect does not cover a first connect that failed";
}

}  // namespace
}  // namespace dewmargin
