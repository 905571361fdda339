// The MQTT link against a real mosquitto broker on a loopback port.
#include <gtest/gtest.h>
#include <unistd.h>

#include <algorithm>
#include <filesystem>
#include <set>

#include "dewmargin/mqtt_link.h"
#include "link_test_helpers.h"
#include "mosquitto_fixture.h"
#include "mqtt_test_client.h"

namespace dewmargin {
namespace {

using namespace std::chrono_literals;
using test_support::eventually;
using test_support::k_offline;
using test_support::k_online;
using test_support::k_status_topic;
using test_support::k_stopped;
using test_support::mosquitto_broker;
using test_support::mqtt_test_client;
using test_support::report_log;

class MqttLink : public ::testing::Test {
 protected:
  mqtt_link make_link(mosquitto_broker& broker, const std::string& client_id,
                      const std::function<void(mqtt_link_options&)>& adjust = {}) {
    mqtt_link_options o = test_support::test_link_options(broker.uri(), client_id, log_);
    if (adjust) adjust(o);
    auto link = mqtt_link::create(o);
    if (!link.ok()) throw std::runtime_error(link.err().message);
    return std::move(link).value();
  }

  // Reads inbound messages until one on topic arrives (bounded).
  static std::optional<inbound_message> receive_on(mqtt_link& link, const std::string& topic,
                                                   std::chrono::milliseconds timeout) {
    const auto deadline = std::chrono::steady_clock::now() + timeout;
    inbound_message m;
    while (std::chrono::steady_clock::now() < deadline) {
      if (link.next_message(m, 100ms) && m.topic == topic) return m;
    }
    return std::nullopt;
  }

  std::shared_ptr<report_log> log_ = std::make_shared<report_log>();
};

TEST_F(MqttLink, ConnectsSubscribesAndReceives) {
  mosquitto_broker broker;
  broker.start();
  mqtt_link link = make_link(broker, "link-receive");
  link.start();
  ASSERT_TRUE(eventually([&] { return link.ready(); }, 10s)) << link.last_connect_error();

  mqtt_test_client status(broker.uri(), {k_status_topic});
  EXPECT_TRUE(status.wait_for_payload(k_status_topic, k_online, 5s)) << "online status after subscribing";

  mqtt_test_client sensor(broker.uri(), {});
  sensor.publish("in/zone-a/temp", "21.5");
  const auto m = receive_on(link, "in/zone-a/temp", 5s);
  ASSERT_TRUE(m);
  EXPECT_EQ(m->payload, "21.5");
  EXPECT_FALSE(m->retained);
  const mqtt_link_stats s = link.stats();
  EXPECT_EQ(s.connections, 1U);
  EXPECT_EQ(s.reconnects, 0U);
  EXPECT_GE(s.received, 1U);
  link.shutdown(k_stopped, 5s);
}

TEST_F(MqttLink, PublishesRetainedStateSeenByLateSubscriber) {
  mosquitto_broker broker;
  broker.start();
  mqtt_link link = make_link(broker, "link-retained");
  link.start();
  link.publish(test_support::state_message("out/zone/a/state", R"({"band":"safe"})"));
  ASSERT_TRUE(eventually([&] { return link.stats().delivered >= 1 && link.stats().outbox_size == 0; }, 10s));

  mqtt_test_client late(broker.uri(), {"out/zone/#"});
  const auto m = late.wait_for_payload("out/zone/a/state", R"({"band":"safe"})", 5s);
  ASSERT_TRUE(m);
  EXPECT_TRUE(m->retained) << "a fresh subscriber gets it from the broker's retained store";
  link.shutdown(k_stopped, 5s);
}

TEST_F(MqttLink, ConnectsWhenBrokerAppearsLater) {
  mosquitto_broker broker;  // port chosen, not started
  mqtt_link link = make_link(broker, "link-late-broker");
  link.start();
  link.publish(test_support::state_message("out/zone/a/state", "queued-before-connect"));
  ASSERT_TRUE(eventually([&] { return !link.last_connect_error().empty(); }, 5s));
  EXPECT_FALSE(link.connected());
  EXPECT_EQ(link.last_connect_error(),
            "MQTT error [-1]: TCP/TLS connect failure (nothing accepts TCP connections at "
            "127.0.0.1:" +
                std::to_string(broker.port()) + ")");
  EXPECT_TRUE(
      eventually([&] { return log_->any_contains("connect to " + broker.uri() + " as link-late-broker failed"); }, 2s));

  broker.start();
  ASSERT_TRUE(eventually([&] { return link.ready(); }, 15s)) << link.last_connect_error();
  EXPECT_EQ(link.last_connect_error(), "");
  ASSERT_TRUE(eventually([&] { return link.stats().outbox_size == 0; }, 5s));
  mqtt_test_client watcher(broker.uri(), {"out/#"});  // retained: it need not be there first
  EXPECT_TRUE(watcher.wait_for_payload("out/zone/a/state", "queued-before-connect", 5s));

  mqtt_test_client sensor(broker.uri(), {});
  sensor.publish("in/zone-a/rh", "55");
  EXPECT_TRUE(receive_on(link, "in/zone-a/rh", 5s)) << "subscribed after the late first connect";
  link.shutdown(k_stopped, 5s);
}

// While the broker stays away, the link's own first-connect retries and the library's
// automatic reconnect (which, measured, also retries a failed first connect) overlap.
// They must end in one connection: two with the same client id would throw each other out.
TEST_F(MqttLink, OverlappingFirstConnectRetriesEndInOneConnection) {
  mosquitto_broker broker;  // not started yet
  mqtt_link link = make_link(broker, "link-overlap");
  link.start();
  std::this_thread::sleep_for(7s);  // several attempts of both kinds
  EXPECT_FALSE(link.connected());
  broker.start();
  ASSERT_TRUE(eventually([&] { return link.ready(); }, 15s)) << link.last_connect_error();
  std::this_thread::sleep_for(5s);  // long enough for a second connection to show
  const mqtt_link_stats s = link.stats();
  EXPECT_EQ(s.connections, 1U);
  EXPECT_EQ(s.connection_losses, 0U);
  EXPECT_TRUE(link.ready());
  link.shutdown(k_stopped, 5s);
  const std::string log = broker.log_text();
  std::size_t connects = 0;
  for (auto at = log.find("as link-overlap"); at != std::string::npos; at = log.find("as link-overlap", at + 1)) {
    ++connects;
  }
  EXPECT_EQ(connects, 1U) << log;
}

// Broker with persistence and a subscriber with a persistent session: every message the
// link sends after the restart reaches the subscriber, whichever reconnects first.
TEST_F(MqttLink, DeliversEverythingPublishedWhileBrokerIsDown) {
  test_support::broker_options persistent;
  persistent.persistence = true;
  mosquitto_broker broker(persistent);
  broker.start();
  test_support::test_client_options session;
  session.client_id = "collector";
  session.clean_session = false;
  auto collector = std::make_unique<mqtt_test_client>(broker.uri(), std::vector<std::string>{"out/#"}, session);

  mqtt_link link = make_link(broker, "link-outage");
  link.start();
  ASSERT_TRUE(eventually([&] { return link.ready(); }, 10s));
  link.publish(test_support::state_message("out/zone/a/state", "s1"));
  ASSERT_TRUE(collector->wait_for_payload("out/zone/a/state", "s1", 5s));

  broker.stop();
  // Some before the link notices the loss, some after.
  const auto t0 = std::chrono::steady_clock::now();
  for (int i = 0; i < 50; ++i) link.publish(test_support::event_message("out/events", "e" + std::to_string(i)));
  for (int i = 0; i < 10; ++i) {
    link.publish(outbound_message{"out/alarms", "a" + std::to_string(i), false, message_class::alarm_event});
  }
  link.publish(test_support::state_message("out/zone/a/state", "s2"));
  EXPECT_LT(std::chrono::steady_clock::now() - t0, 1s) << "publish never blocks on the network";
  ASSERT_TRUE(eventually([&] { return !link.connected(); }, 10s));
  for (int i = 50; i < 100; ++i) link.publish(test_support::event_message("out/events", "e" + std::to_string(i)));

  broker.start();
  ASSERT_TRUE(collector->wait_for_count("out/events", 100, 30s))
      << "got " << collector->messages_on("out/events").size() << " events";
  ASSERT_TRUE(collector->wait_for_count("out/alarms", 10, 10s));
  EXPECT_TRUE(collector->wait_for_payload("out/zone/a/state", "s2", 10s));

  // Nothing lost, first copies in publish order (a resend may add a duplicate).
  std::vector<std::string> first_seen;
  std::set<std::string> seen;
  for (const auto& m : collector->messages_on("out/events")) {
    if (seen.insert(m.payload).second) first_seen.push_back(m.payload);
  }
  std::vector<std::string> expected;
  for (int i = 0; i < 100; ++i) expected.push_back("e" + std::to_string(i));
  EXPECT_EQ(first_seen, expected);

  ASSERT_TRUE(eventually([&] { return link.stats().outbox_size == 0; }, 10s));
  const mqtt_link_stats s = link.stats();
  EXPECT_GE(s.reconnects, 1U);
  EXPECT_GE(s.connection_losses, 1U);
  EXPECT_EQ(s.dropped_outbox_of(message_class::event), 0U);
  EXPECT_EQ(s.dropped_outbox_of(message_class::alarm_event), 0U);
  std::fprintf(stderr, "measured: %zu event copies for 100 events; published %llu, send failures %llu\n",
               collector->messages_on("out/events").size(), static_cast<unsigned long long>(s.published),
               static_cast<unsigned long long>(s.send_failures));
  link.shutdown(k_stopped, 5s);
}

// The broker hangs (messages go out, no PUBACK comes back), then dies: what was in flight
// goes back to the outbox and is sent again after the restart.
TEST_F(MqttLink, ResendsMessagesInFlightWhenTheBrokerDies) {
  test_support::broker_options persistent;
  persistent.persistence = true;
  mosquitto_broker broker(persistent);
  broker.start();
  test_support::test_client_options session;
  session.client_id = "collector";
  session.clean_session = false;
  mqtt_test_client collector(broker.uri(), {"out/#"}, session);
  mqtt_link link = make_link(broker, "link-in-flight");
  link.start();
  ASSERT_TRUE(eventually([&] { return link.ready(); }, 10s));
  // The broker saves sessions every second; a kill loses what was not saved yet.
  const auto db = broker.dir() / "data" / "mosquitto.db";
  const auto subscribed_at = std::filesystem::file_time_type::clock::now();
  ASSERT_TRUE(eventually(
      [&] {
        std::error_code ec;
        return std::filesystem::exists(db, ec) && std::filesystem::last_write_time(db, ec) > subscribed_at;
      },
      10s));

  broker.freeze();
  for (int i = 0; i < 30; ++i) link.publish(test_support::event_message("out/events", "f" + std::to_string(i)));
  ASSERT_TRUE(eventually([&] { return link.stats().outbox_in_flight == 30; }, 5s))
      << "in flight: " << link.stats().outbox_in_flight;
  EXPECT_TRUE(link.connected()) << "a hung broker is not noticed at once";
  broker.kill();
  ASSERT_TRUE(eventually([&] { return !link.connected(); }, 10s));
  // How many the loss handler counts depends on whether Paho reports a send failure for
  // one of them first (seen under load); delivery of all 30 is what is asserted below.
  EXPECT_TRUE(log_->any_contains("unacknowledged message(s) will be sent again"));

  broker.start();
  ASSERT_TRUE(collector.wait_for_count("out/events", 30, 30s)) << "got " << collector.messages_on("out/events").size();
  std::vector<std::string> first_seen;
  std::set<std::string> seen;
  for (const auto& m : collector.messages_on("out/events")) {
    if (seen.insert(m.payload).second) first_seen.push_back(m.payload);
  }
  std::vector<std::string> expected;
  for (int i = 0; i < 30; ++i) expected.push_back("f" + std::to_string(i));
  EXPECT_EQ(first_seen, expected);
  ASSERT_TRUE(eventually([&] { return link.stats().outbox_size == 0; }, 10s));
  std::fprintf(stderr, "measured: %zu copies of 30 events after the hang; published %llu\n",
               collector.messages_on("out/events").size(), static_cast<unsigned long long>(link.stats().published));
  link.shutdown(k_stopped, 5s);
}

// A broker restarted without persistence has lost every retained message. The link keeps
// no copies: it counts the new connection (stats().connections), which tells its user to
// publish its retained messages again (the service does, from the engine: tests/service),
// and it announces itself online again on its own.
TEST_F(MqttLink, CountsTheConnectionAfterABrokerLostItsRetainedMessages) {
  mosquitto_broker broker;
  broker.start();
  mqtt_link link = make_link(broker, "link-republish");
  link.start();
  link.publish(test_support::state_message("out/zone/a/state", "before"));
  ASSERT_TRUE(eventually([&] { return link.ready() && link.stats().outbox_size == 0; }, 10s));
  EXPECT_EQ(link.stats().connections, 1u);

  broker.stop();
  broker.start();
  {
    mqtt_test_client empty(broker.uri(), {"out/#"});
    EXPECT_FALSE(empty.wait_for_payload("out/zone/a/state", "before", 300ms)) << "the broker really forgot";
  }
  ASSERT_TRUE(eventually([&] { return link.stats().connections >= 2 && link.ready(); }, 20s));
  EXPECT_GE(link.stats().reconnects, 1u);
  link.publish(test_support::state_message("out/zone/a/state", "again"));
  ASSERT_TRUE(eventually([&] { return link.stats().outbox_size == 0; }, 10s));
  mqtt_test_client fresh(broker.uri(), {"out/#", k_status_topic});
  EXPECT_TRUE(fresh.wait_for_payload("out/zone/a/state", "again", 5s));
  EXPECT_TRUE(fresh.wait_for_payload(k_status_topic, k_online, 5s));
  link.shutdown(k_stopped, 5s);
}

TEST_F(MqttLink, ResubscribesAfterBrokerRestart) {
  mosquitto_broker broker;  // no persistence: the restarted broker knows no subscriptions
  broker.start();
  mqtt_link link = make_link(broker, "link-resubscribe");
  link.start();
  ASSERT_TRUE(eventually([&] { return link.ready(); }, 10s));
  broker.stop();
  ASSERT_TRUE(eventually([&] { return !link.ready(); }, 10s));
  broker.start();
  ASSERT_TRUE(eventually([&] { return link.ready(); }, 20s));

  mqtt_test_client sensor(broker.uri(), {});
  sensor.publish("in/zone-a/temp", "after-restart");
  const auto m = receive_on(link, "in/zone-a/temp", 5s);
  ASSERT_TRUE(m);
  EXPECT_EQ(m->payload, "after-restart");
  EXPECT_EQ(link.stats().reconnects, 1U);
  link.shutdown(k_stopped, 5s);
}

TEST_F(MqttLink, LastWillMarksKilledServiceOffline) {
  mosquitto_broker broker;
  broker.start();
  mqtt_test_client status(broker.uri(), {k_status_topic});
  test_support::child_process service = test_support::child_process::spawn(
      {DEWMARGIN_LINK_CHILD, broker.uri(), "link-will-child", k_status_topic, k_online, k_offline},
      broker.dir() / "child.log");
  const auto online = status.wait_for_payload(k_status_topic, k_online, 15s);
  ASSERT_TRUE(online) << test_support::read_text_file(broker.dir() / "child.log");
  const std::size_t after_online = status.size();

  EXPECT_EQ(service.kill_now(), 128 + SIGKILL);
  const auto will = status.wait_for_payload(k_status_topic, k_offline, 10s, after_online);
  ASSERT_TRUE(will) << "the broker publishes the will when the connection drops without DISCONNECT";

  mqtt_test_client fresh(broker.uri(), {k_status_topic});
  const auto retained = fresh.wait_for_payload(k_status_topic, k_offline, 5s);
  ASSERT_TRUE(retained);
  EXPECT_TRUE(retained->retained);
}

TEST_F(MqttLink, GracefulShutdownPublishesFinalStatusAndNoWill) {
  mosquitto_broker broker;
  broker.start();
  mqtt_test_client status(broker.uri(), {k_status_topic, "out/#"});
  mqtt_link link = make_link(broker, "link-graceful");
  link.start();
  ASSERT_TRUE(status.wait_for_payload(k_status_topic, k_online, 10s));
  for (int i = 0; i < 20; ++i) link.publish(test_support::event_message("out/events", "last-" + std::to_string(i)));

  const auto t0 = std::chrono::steady_clock::now();
  link.shutdown(k_stopped, 5s);
  EXPECT_LT(std::chrono::steady_clock::now() - t0, 6s);
  EXPECT_FALSE(link.connected());
  EXPECT_EQ(link.stats().outbox_size, 0U) << "the outbox drained before the disconnect";
  EXPECT_TRUE(status.wait_for_count("out/events", 20, 5s));

  const auto stopped = status.wait_for_payload(k_status_topic, k_stopped, 5s);
  ASSERT_TRUE(stopped);
  // The broker would publish the will at once on an unclean close; 1.5 s is ample.
  EXPECT_FALSE(status.wait_for_payload(k_status_topic, k_offline, 1500ms)) << "a clean DISCONNECT leaves no will";

  mqtt_test_client fresh(broker.uri(), {k_status_topic});
  const auto retained = fresh.wait_for_payload(k_status_topic, k_stopped, 5s);
  ASSERT_TRUE(retained);
  EXPECT_TRUE(retained->retained);

  link.shutdown(k_stopped, 5s);  // a second call does nothing
  link.publish(test_support::event_message("out/events", "too-late"));
  EXPECT_EQ(link.stats().rejected, 1U);
}

// Without shutdown(), the destructor still leaves the status offline (it does not
// rely on the will: the client library's own teardown would suppress it).
TEST_F(MqttLink, DestructorWithoutShutdownLeavesStatusOffline) {
  mosquitto_broker broker;
  broker.start();
  mqtt_test_client status(broker.uri(), {k_status_topic});
  {
    mqtt_link link = make_link(broker, "link-destructor");
    link.start();
    ASSERT_TRUE(status.wait_for_payload(k_status_topic, k_online, 10s));
  }
  mqtt_test_client fresh(broker.uri(), {k_status_topic});
  EXPECT_TRUE(fresh.wait_for_payload(k_status_topic, k_offline, 5s));
}

TEST_F(MqttLink, NeverDropsCommandsOnInboundOverflow) {
  mosquitto_broker broker;
  broker.start();
  mqtt_link link = make_link(broker, "link-overflow", [](mqtt_link_options& o) { o.inbound_capacity = 5; });
  link.start();
  ASSERT_TRUE(eventually([&] { return link.ready(); }, 10s));

  // Nobody reads the link while 300 messages arrive, every tenth a command.
  mqtt_test_client sender(broker.uri(), {});
  std::vector<std::string> commands;
  for (int i = 0; i < 300; ++i) {
    if (i % 10 == 0) {
      commands.push_back("c" + std::to_string(i));
      sender.publish("in/cmd/ack", commands.back());
    } else {
      sender.publish("in/zone-a/temp", std::to_string(i));
    }
  }
  ASSERT_TRUE(eventually([&] { return link.stats().received == 300; }, 15s)) << link.stats().received;

  std::vector<std::string> got_commands;
  std::size_t drained = 0;
  inbound_message m;
  while (link.next_message(m, 0ms)) {
    ++drained;
    if (m.topic == "in/cmd/ack") got_commands.push_back(m.payload);
  }
  EXPECT_EQ(got_commands, commands) << "every command, in order";
  const mqtt_link_stats s = link.stats();
  EXPECT_EQ(s.dropped_inbound, 300U - drained);
  EXPECT_EQ(s.dropped_inbound, 270U) << "once only commands are queued, every reading is dropped";
  EXPECT_EQ(s.kept_over_capacity, 25U);
  EXPECT_TRUE(log_->any_contains("inbound queue full (5 messages)"));
  link.shutdown(k_stopped, 5s);
}

TEST_F(MqttLink, WritesNothingIntoTheWorkingDirectory) {
  mosquitto_broker broker;
  broker.start();
  test_support::temp_dir cwd("dewmargin-cwd");
  const auto previous = std::filesystem::current_path();
  std::filesystem::current_path(cwd.path());
  {
    mqtt_link link = make_link(broker, "link-cwd");
    link.start();
    for (int i = 0; i < 10; ++i) link.publish(test_support::event_message("out/events", std::to_string(i)));
    EXPECT_TRUE(eventually([&] { return link.stats().delivered == 10; }, 10s));
    link.shutdown(k_stopped, 5s);
  }
  std::filesystem::current_path(previous);
  EXPECT_TRUE(std::filesystem::is_empty(cwd.path())) << "no Paho persistence files in the working directory";
}

TEST_F(MqttLink, ShutdownWhileBrokerDownIsBounded) {
  mosquitto_broker broker;  // never started
  mqtt_link link = make_link(broker, "link-no-broker");
  link.start();
  link.publish(test_support::event_message("out/events", "never-delivered"));
  ASSERT_TRUE(eventually([&] { return !link.last_connect_error().empty(); }, 5s));
  const auto t0 = std::chrono::steady_clock::now();
  link.shutdown(k_stopped, 500ms);
  EXPECT_LT(std::chrono::steady_clock::now() - t0, 3s);
  EXPECT_TRUE(log_->any_contains("shut down, 2 message(s) undelivered")) << "the event and the final status";
}

// The broker accepts TCP (the kernel does) but never answers CONNECT: shutdown must not
// wait for the connect timeout.
TEST_F(MqttLink, ShutdownDuringHangingConnectIsBounded) {
  mosquitto_broker broker;
  broker.start();
  broker.freeze();
  mqtt_link link = make_link(broker, "link-hanging-connect");
  link.start();
  std::this_thread::sleep_for(300ms);  // let the connect get under way
  EXPECT_FALSE(link.connected());
  const auto t0 = std::chrono::steady_clock::now();
  link.shutdown(k_stopped, 500ms);
  EXPECT_LT(std::chrono::steady_clock::now() - t0, 2s);
  broker.thaw();
}

TEST_F(MqttLink, KeepsOutboxBoundedWhileDown) {
  mosquitto_broker broker;  // never started
  mqtt_link link = make_link(broker, "link-bounded", [](mqtt_link_options& o) { o.outbox_capacity = 20; });
  link.start();
  for (int i = 0; i < 5; ++i) {
    link.publish(outbound_message{"out/alarms", "a" + std::to_string(i), false, message_class::alarm_event});
  }
  for (int i = 0; i < 100; ++i) link.publish(test_support::event_message("out/events", std::to_string(i)));
  // Retained states do not count against the capacity: each topic keeps its latest.
  for (int round = 0; round < 3; ++round) {
    for (int z = 0; z < 50; ++z) {
      link.publish(outbound_message{"out/zone/" + std::to_string(z) + "/state", std::to_string(round), true,
                                    message_class::state});
    }
  }
  const mqtt_link_stats s = link.stats();
  EXPECT_EQ(s.outbox_size, 20U + 50U);
  EXPECT_EQ(s.dropped_outbox_of(message_class::event), 85U);
  EXPECT_EQ(s.dropped_outbox_of(message_class::alarm_event), 0U);
  EXPECT_EQ(s.dropped_outbox_of(message_class::state), 0U);
  EXPECT_EQ(s.superseded, 100U);
  EXPECT_TRUE(log_->any_contains("outbox full (20 events and alarm events waiting; states and commands are kept"));
  EXPECT_TRUE(log_->any_contains("dropping events first, alarm events last"));
  link.shutdown(k_stopped, 200ms);
}

}  // namespace
}  // namespace dewmargin
