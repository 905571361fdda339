#include <gtest/gtest.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <functional>

#include "dewmargin/mqtt_link.h"

namespace dewmargin {
namespace {

namespace fs = std::filesystem;

// Option checks happen in create(), before anything touches the network.
class MqttLinkCreate : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = fs::temp_directory_path() / ("dewmargin-link-options-" + std::to_string(getpid()));
    fs::create_directories(dir_);
    std::ofstream(dir_ / "password") << "pw\n";
    fs::permissions(dir_ / "password", fs::perms::owner_read | fs::perms::owner_write);  // the owner's alone
    std::ofstream(dir_ / "ca.crt") << "not really a certificate\n";
  }
  void TearDown() override { fs::remove_all(dir_); }

  mqtt_link_options valid() const {
    mqtt_link_options o;
    o.broker.uri = "tcp://127.0.0.1:1883";
    o.broker.client_id = "dewmargin-test";
    o.status_topic = "dewmargin/status";
    o.online_payload = R"({"state":"online"})";
    o.offline_will_payload = R"({"state":"offline"})";
    o.subscriptions = {"bldg/#", "dewmargin/cmd/#"};
    return o;
  }
  fs::path dir_;
};

struct bad_option_case {
  const char* name;
  std::function<void(mqtt_link_options&, const fs::path& dir)> spoil;
  std::function<std::string(const fs::path& dir)> message;
};

TEST_F(MqttLinkCreate, AcceptsValidOptions) {
  auto link = mqtt_link::create(valid());
  ASSERT_TRUE(link.ok()) << link.err().message;
  EXPECT_FALSE(link.value().connected());
  EXPECT_FALSE(link.value().ready());
  EXPECT_EQ(link.value().last_connect_error(), "");
}

// The link takes every scheme the config reader takes (tests/unit/test_broker_uri.cpp).
TEST_F(MqttLinkCreate, AcceptsEverySchemeTheConfigAccepts) {
  for (const char* uri : {"tcp://127.0.0.1:1883", "mqtt://127.0.0.1:1883"}) {
    mqtt_link_options o = valid();
    o.broker.uri = uri;
    auto link = mqtt_link::create(o);
    EXPECT_TRUE(link.ok()) << uri << ": " << link.err().message;
  }
  for (const char* uri : {"ssl://127.0.0.1:8883", "mqtts://127.0.0.1:8883"}) {
    mqtt_link_options o = valid();
    o.broker.uri = uri;
    o.broker.tls = tls_config{(dir_ / "ca.crt").string(), "", ""};
    auto link = mqtt_link::create(o);
    EXPECT_TRUE(link.ok()) << uri << ": " << link.err().message;
  }
}

TEST_F(MqttLinkCreate, AcceptsPasswordFileWithUsername) {
  mqtt_link_options o = valid();
  o.broker.username = "gateway";
  o.broker.password_file = (dir_ / "password").string();
  auto link = mqtt_link::create(o);
  EXPECT_TRUE(link.ok()) << link.err().message;
}

TEST_F(MqttLinkCreate, RejectsBadOptionsNamingTheField) {
  const std::vector<bad_option_case> cases{
      {"missing password file",
       [](mqtt_link_options& o, const fs::path& d) {
         o.broker.username = "gateway";
         o.broker.password_file = (d / "nope").string();
       },
       [](const fs::path& d) {
         return "broker.password_file " + (d / "nope").string() + ": cannot read: No such file or directory";
       }},
      {"password file without user",
       [](mqtt_link_options& o, const fs::path& d) { o.broker.password_file = (d / "password").string(); },
       [](const fs::path&) {
         return std::string(
             "broker.password_file is set but broker.username is empty (MQTT 3.1.1 sends no password without a user)");
       }},
      {"empty client id", [](mqtt_link_options& o, const fs::path&) { o.broker.client_id.clear(); },
       [](const fs::path&) {
         return std::string("broker.client_id is empty: a persistent session needs a stable client id");
       }},
      {"unknown scheme", [](mqtt_link_options& o, const fs::path&) { o.broker.uri = "http://127.0.0.1:1883"; },
       [](const fs::path&) {
         return std::string("broker.uri \"http://127.0.0.1:1883\": must start with tcp://, ssl://, mqtt:// or mqtts://");
       }},
      {"no host", [](mqtt_link_options& o, const fs::path&) { o.broker.uri = "tcp://"; },
       [](const fs::path&) { return std::string("broker.uri \"tcp://\": names no host"); }},
      {"tls over tcp",
       [](mqtt_link_options& o, const fs::path& d) {
         o.broker.tls = tls_config{(d / "ca.crt").string(), "", ""};
       },
       [](const fs::path&) {
         return std::string("broker.tls is set but broker.uri tcp://127.0.0.1:1883 is not encrypted: use ssl:// or mqtts://");
       }},
      {"missing ca file",
       [](mqtt_link_options& o, const fs::path& d) {
         o.broker.uri = "ssl://127.0.0.1:8883";
         o.broker.tls = tls_config{(d / "absent-ca.crt").string(), "", ""};
       },
       [](const fs::path& d) {
         return "broker.tls.ca_file " + (d / "absent-ca.crt").string() + ": cannot read: No such file or directory";
       }},
      {"key without certificate",
       [](mqtt_link_options& o, const fs::path& d) {
         o.broker.uri = "ssl://127.0.0.1:8883";
         o.broker.tls = tls_config{(d / "ca.crt").string(), "", (d / "ca.crt").string()};
       },
       [](const fs::path&) { return std::string("broker.tls.key_file is set without broker.tls.cert_file"); }},
      {"keepalive zero", [](mqtt_link_options& o, const fs::path&) { o.broker.keepalive_s = 0.0; },
       [](const fs::path&) { return std::string("broker.keepalive_s 0.000000: must lie in 1 ... 65535 s"); }},
      {"wildcard status topic", [](mqtt_link_options& o, const fs::path&) { o.status_topic = "dewmargin/#"; },
       [](const fs::path&) {
         return std::string("status topic \"dewmargin/#\": a wildcard (+ or #) is not allowed in a publish topic");
       }},
      {"empty subscription", [](mqtt_link_options& o, const fs::path&) { o.subscriptions.emplace_back(); },
       [](const fs::path&) { return std::string("an empty subscription topic filter"); }},
      {"no in-flight room", [](mqtt_link_options& o, const fs::path&) { o.max_in_flight = 0; },
       [](const fs::path&) { return std::string("max_in_flight 0: must lie in 1 ... 1000"); }},
      {"back-off inverted",
       [](mqtt_link_options& o, const fs::path&) {
         o.reconnect_min = std::chrono::seconds(10);
         o.reconnect_max = std::chrono::seconds(5);
       },
       [](const fs::path&) { return std::string("reconnect back-off: need 1 s <= reconnect_min <= reconnect_max"); }},
  };
  for (const auto& c : cases) {
    mqtt_link_options o = valid();
    c.spoil(o, dir_);
    auto link = mqtt_link::create(o);
    ASSERT_FALSE(link.ok()) << c.name;
    EXPECT_EQ(link.err().code, error_code::invalid_argument) << c.name;
    EXPECT_EQ(link.err().message, c.message(dir_)) << c.name;
  }
}

TEST_F(MqttLinkCreate, RefusesWildcardPublishWithoutQueueing) {
  std::vector<std::string> reports;
  mqtt_link_options o = valid();
  o.report = [&](link_report_level, const std::string& text) { reports.push_back(text); };
  auto link = mqtt_link::create(o);
  ASSERT_TRUE(link.ok()) << link.err().message;
  link.value().publish(outbound_message{"dewmargin/zone/+/state", "{}", true, message_class::state});
  link.value().publish(outbound_message{"", "{}", false, message_class::event});
  const mqtt_link_stats s = link.value().stats();
  EXPECT_EQ(s.rejected, 2U);
  EXPECT_EQ(s.outbox_size, 0U);
  ASSERT_EQ(reports.size(), 2U);
  EXPECT_EQ(reports[0],
            "publish refused, topic \"dewmargin/zone/+/state\": a wildcard (+ or #) is not allowed in a publish topic");
  EXPECT_EQ(reports[1], "publish refused, topic \"\": the topic is empty");
}

TEST_F(MqttLinkCreate, QueuesPublishesBeforeStart) {
  auto link = mqtt_link::create(valid());
  ASSERT_TRUE(link.ok()) << link.err().message;
  link.value().publish(outbound_message{"dewmargin/events", "{}", false, message_class::event});
  link.value().publish(outbound_message{"dewmargin/zone/a/state", "1", true, message_class::state});
  link.value().publish(outbound_message{"dewmargin/zone/a/state", "2", true, message_class::state});
  const mqtt_link_stats s = link.value().stats();
  EXPECT_EQ(s.outbox_size, 2U);
  EXPECT_EQ(s.superseded, 1U);
  EXPECT_EQ(s.published, 0U);
}

}  // namespace
}  // namespace dewmargin
