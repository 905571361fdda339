#pragma once
// A small Paho-based MQTT client for tests: subscribes, collects every message it gets,
// and lets a test wait (bounded) for one that matches, or publish one at QoS 1.
// Its handlers only append to a list; waiting happens on the test's thread.
#include <chrono>
#include <condition_variable>
#include <functional>
#include <memory>
#include <mutex>
#include <optional>
#include <string>
#include <vector>

namespace mqtt {
class async_client;
}

namespace dewmargin::test_support {

struct received_message {
  std::string topic;
  std::string payload;
  bool retained = false;
};

struct test_client_options {
  std::string client_id;      // empty: a unique one
  bool clean_session = true;  // false with a fixed client_id: a session that outlives reconnects
  std::string ca_file;        // set for ssl:// URIs
  std::string username;
  std::string password;
};

class mqtt_test_client {
 public:
  // Connects and subscribes (QoS 1) within 10 s, or throws std::runtime_error.
  mqtt_test_client(const std::string& uri, std::vector<std::string> filters, test_client_options options = {});
  mqtt_test_client(const mqtt_test_client&) = delete;
  mqtt_test_client& operator=(const mqtt_test_client&) = delete;
  ~mqtt_test_client();  // disconnects (bounded)

  using predicate = std::function<bool(const received_message&)>;

  // The first message on topic (received at index >= from) that satisfies accept,
  // waiting up to timeout for it.
  std::optional<received_message> wait_for(const std::string& topic, const predicate& accept,
                                           std::chrono::milliseconds timeout, std::size_t from = 0);
  std::optional<received_message> wait_for_payload(const std::string& topic, const std::string& payload,
                                                   std::chrono::milliseconds timeout, std::size_t from = 0);
  // Waits until at least n messages on topic have arrived.
  bool wait_for_count(const std::string& topic, std::size_t n, std::chrono::milliseconds timeout);

  [[nodiscard]] std::vector<received_message> messages() const;
  [[nodiscard]] std::vector<received_message> messages_on(const std::string& topic) const;
  [[nodiscard]] std::size_t size() const;  // messages received so far (an index for `from`)

  // QoS 1, waits up to 5 s for the acknowledgement; throws on failure.
  void publish(const std::string& topic, const std::string& payload, bool retained = false);

  // QoS 1 without waiting for each acknowledgement: one message every `interval` (a flood at
  // a known rate; at most 50 unacknowledged at a time), then waits up to 10 s for the
  // remaining acknowledgements. Throws on failure; returns the time it took.
  std::chrono::steady_clock::duration publish_paced(const std::string& topic, const std::vector<std::string>& payloads,
                                                    std::chrono::microseconds interval);

  [[nodiscard]] bool connected() const;

 private:
  std::vector<std::string> filters_;
  mutable std::mutex mutex_;
  std::condition_variable arrived_;
  std::vector<received_message> messages_;
  std::unique_ptr<::mqtt::async_client> client_;  // last: destroyed first, before what its handlers use
};

// A client id no other test client uses ("<stem>-<pid>-<random>").
std::string unique_client_id(const std::string& stem = "test");

}  // namespace dewmargin::test_support
