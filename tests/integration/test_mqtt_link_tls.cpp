// The MQTT link over TLS with user name and password file, against mosquitto with a CA
// and server certificate made by openssl for this test run.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>

#include "dewmargin/mqtt_link.h"
#include "link_test_helpers.h"
#include "mosquitto_fixture.h"
#include "mqtt_test_client.h"

namespace dewmargin {
namespace {

using namespace std::chrono_literals;
using test_support::eventually;
using test_support::k_stopped;
using test_support::mosquitto_broker;
using test_support::mqtt_test_client;
using test_support::report_log;

class MqttLinkTls : public ::testing::Test {
 protected:
  static test_support::broker_options tls_broker(const std::string& subject_alt_name = "IP:127.0.0.1,DNS:localhost") {
    test_support::broker_options o;
    o.tls = test_support::broker_tls_options{};
    o.tls->subject_alt_name = subject_alt_name;
    return o;
  }

  // A password file as an operator writes it: one line, with its newline.
  static std::string write_password_file(const mosquitto_broker& broker, const std::string& password) {
    const auto p = broker.dir() / "link.secret";
    std::ofstream(p) << password << "\n";
    std::filesystem::permissions(p, std::filesystem::perms::owner_read | std::filesystem::perms::owner_write);
    return p.string();
  }

  mqtt_link make_tls_link(const mosquitto_broker& broker, const std::string& uri, const std::string& password,
                          const std::string& ca_file) {
    mqtt_link_options o = test_support::test_link_options(uri, "link-tls", log_);
    o.broker.username = broker_tls_defaults_.username;
    o.broker.password_file = write_password_file(broker, password);
    o.broker.tls = tls_config{ca_file, "", ""};
    auto link = mqtt_link::create(o);
    if (!link.ok()) throw std::runtime_error(link.err().message);
    return std::move(link).value();
  }

  const test_support::broker_tls_options broker_tls_defaults_{};
  std::shared_ptr<report_log> log_ = std::make_shared<report_log>();
};

TEST_F(MqttLinkTls, ConnectsWithCaUserAndPasswordFile) {
  mosquitto_broker broker(tls_broker());
  broker.start();
  mqtt_link link =
      make_tls_link(broker, broker.tls_uri("127.0.0.1"), broker_tls_defaults_.password, broker.tls().ca_cert.string());
  link.start();
  ASSERT_TRUE(eventually([&] { return link.ready(); }, 15s)) << link.last_connect_error() << "\n" << broker.log_text();

  // The plain listener shares the broker's topics: check the end-to-end path both ways.
  mqtt_test_client plain(broker.uri(), {"out/#"});
  link.publish(test_support::state_message("out/zone/a/state", "over-tls"));
  EXPECT_TRUE(plain.wait_for_payload("out/zone/a/state", "over-tls", 5s));
  plain.publish("in/zone-a/temp", "22.0");
  inbound_message m;
  bool got = false;
  const auto deadline = std::chrono::steady_clock::now() + 5s;
  while (!got && std::chrono::steady_clock::now() < deadline) {
    got = link.next_message(m, 100ms) && m.topic == "in/zone-a/temp";
  }
  EXPECT_TRUE(got);
  for (const auto& line : log_->lines()) {
    EXPECT_EQ(line.find(broker_tls_defaults_.password), std::string::npos) << "password in a report: " << line;
  }
  link.shutdown(k_stopped, 5s);
}

TEST_F(MqttLinkTls, ConnectsByHostName) {
  mosquitto_broker broker(tls_broker());
  broker.start();
  mqtt_link link =
      make_tls_link(broker, broker.tls_uri("localhost"), broker_tls_defaults_.password, broker.tls().ca_cert.string());
  link.start();
  EXPECT_TRUE(eventually([&] { return link.ready(); }, 15s)) << link.last_connect_error();
  link.shutdown(k_stopped, 5s);
}

// mqtts:// is the other spelling of ssl:// the config accepts: it must get the same TLS
// options (CA, verification), not a connect that fails for want of them.
TEST_F(MqttLinkTls, ConnectsWithTheMqttsScheme) {
  mosquitto_broker broker(tls_broker());
  broker.start();
  std::string uri = broker.tls_uri("127.0.0.1");
  ASSERT_EQ(uri.compare(0, 6, "ssl://"), 0) << uri;
  uri = "mqtts://" + uri.substr(6);
  mqtt_link link = make_tls_link(broker, uri, broker_tls_defaults_.password, broker.tls().ca_cert.string());
  link.start();
  ASSERT_TRUE(eventually([&] { return link.ready(); }, 15s)) << link.last_connect_error() << "\n" << broker.log_text();
  mqtt_test_client plain(broker.uri(), {"out/#"});
  link.publish(test_support::state_message("out/zone/a/state", "over-mqtts"));
  EXPECT_TRUE(plain.wait_for_payload("out/zone/a/state", "over-mqtts", 5s));
  link.shutdown(k_stopped, 5s);
}

TEST_F(MqttLinkTls, WrongPasswordFailsWithClearError) {
  mosquitto_broker broker(tls_broker());
  broker.start();
  const std::string wrong = "not-the-password";
  mqtt_link link = make_tls_link(broker, broker.tls_uri(), wrong, broker.tls().ca_cert.string());
  link.start();
  // The broker's refusal, at the first attempt or (on a loaded machine, where an attempt can
  // time out first) at a later one: the link retries on its back-off.
  ASSERT_TRUE(eventually([&] { return link.last_connect_error().find("not authorised") != std::string::npos; }, 20s))
      << link.last_connect_error();
  const std::string error = link.last_connect_error();
  EXPECT_FALSE(link.connected());
  EXPECT_TRUE(log_->any_contains("connect to " + broker.tls_uri() + " as link-tls failed: "));
  for (const auto& line : log_->lines()) {
    EXPECT_EQ(line.find(wrong), std::string::npos) << "password in a report: " << line;
  }
  std::fprintf(stderr, "measured: wrong password -> %s\n", error.c_str());
  link.shutdown(k_stopped, 1s);
}

// Host-name verification is on: a certificate valid for another name is refused even
// though it chains to the trusted CA.
TEST_F(MqttLinkTls, RefusesCertificateForAnotherName) {
  mosquitto_broker broker(tls_broker("DNS:broker.invalid"));
  broker.start();
  mqtt_link link =
      make_tls_link(broker, broker.tls_uri("127.0.0.1"), broker_tls_defaults_.password, broker.tls().ca_cert.string());
  link.start();
  ASSERT_TRUE(eventually([&] { return !link.last_connect_error().empty(); }, 10s));
  EXPECT_FALSE(link.connected());
  EXPECT_NE(link.last_connect_error().find("so the TLS handshake failed: the broker's certificate must chain to " +
                                           broker.tls().ca_cert.string() + " and name the host 127.0.0.1"),
            std::string::npos)
      << link.last_connect_error();
  std::fprintf(stderr, "measured: name mismatch -> %s\n", link.last_connect_error().c_str());
  link.shutdown(k_stopped, 1s);
}

TEST_F(MqttLinkTls, RefusesBrokerSignedByUnknownCa) {
  mosquitto_broker broker(tls_broker());
  broker.start();
  const test_support::temp_dir other("dewmargin-other-ca");
  const auto other_ca = test_support::make_test_pki(other.path(), "IP:127.0.0.1").ca_cert;
  mqtt_link link = make_tls_link(broker, broker.tls_uri(), broker_tls_defaults_.password, other_ca.string());
  link.start();
  ASSERT_TRUE(eventually([&] { return !link.last_connect_error().empty(); }, 10s));
  EXPECT_FALSE(link.connected());
  EXPECT_NE(link.last_connect_error().find("so the TLS handshake failed"), std::string::npos)
      << link.last_connect_error();
  std::fprintf(stderr, "measured: unknown CA -> %s\n", link.last_connect_error().c_str());
  link.shutdown(k_stopped, 1s);
}

}  // namespace
}  // namespace dewmargin
