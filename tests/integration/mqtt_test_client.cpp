#include "mqtt_test_client.h"

#include <mqtt/async_client.h>
#include <unistd.h>

#include <deque>
#include <random>
#include <stdexcept>
#include <thread>

namespace dewmargin::test_support {
namespace {

constexpr std::chrono::seconds k_connect_timeout{10};
constexpr std::chrono::seconds k_ack_timeout{5};

}  // namespace

std::string unique_client_id(const std::string& stem) {
  std::random_device random;
  return stem + "-" + std::to_string(getpid()) + "-" + std::to_string(random());
}

mqtt_test_client::mqtt_test_client(const std::string& uri, std::vector<std::string> filters,
                                   test_client_options options)
    : filters_(std::move(filters)) {
  const std::string id = options.client_id.empty() ? unique_client_id() : options.client_id;
  client_ = std::make_unique<::mqtt::async_client>(uri, id, ::mqtt::create_options(MQTTVERSION_3_1_1), nullptr);

  client_->set_message_callback([this](::mqtt::const_message_ptr m) {
    {
      std::lock_guard<std::mutex> lock(mutex_);
      messages_.push_back(received_message{m->get_topic(), m->to_string(), m->is_retained()});
    }
    arrived_.notify_all();
  });
  // Subscribe again after every reconnect; never wait inside a handler.
  client_->set_connected_handler([this](const std::string&) {
    if (!filters_.empty()) {
      try {
        (void)client_->subscribe(::mqtt::string_collection::create(filters_),
                                 ::mqtt::iasync_client::qos_collection(filters_.size(), 1));
      } catch (const ::mqtt::exception&) {
        // The next reconnect tries again; a test that needs the subscription times out clearly.
      }
    }
  });

  ::mqtt::connect_options opts;
  opts.set_mqtt_version(MQTTVERSION_3_1_1);
  opts.set_clean_session(options.clean_session);
  opts.set_keep_alive_interval(5);
  opts.set_connect_timeout(static_cast<int>(k_connect_timeout.count()));
  opts.set_automatic_reconnect(1, 2);
  if (!options.username.empty()) opts.set_user_name(options.username);
  if (!options.password.empty()) opts.set_password(options.password);
  if (!options.ca_file.empty()) {
    ::mqtt::ssl_options ssl;
    ssl.set_trust_store(options.ca_file);
    ssl.set_enable_server_cert_auth(true);
    ssl.set_verify(true);
    opts.set_ssl(std::move(ssl));
  }
  try {
    if (!client_->connect(opts)->wait_for(k_connect_timeout)) {
      throw std::runtime_error("test client " + id + ": no connect within 10 s to " + uri);
    }
    if (!filters_.empty() && !client_
                                  ->subscribe(::mqtt::string_collection::create(filters_),
                                              ::mqtt::iasync_client::qos_collection(filters_.size(), 1))
                                  ->wait_for(k_connect_timeout)) {
      throw std::runtime_error("test client " + id + ": no subscribe acknowledgement within 10 s");
    }
  } catch (const ::mqtt::exception& e) {
    throw std::runtime_error("test client " + id + " on " + uri + ": " + e.what());
  }
}

mqtt_test_client::~mqtt_test_client() {
  try {
    if (client_->is_connected()) (void)client_->disconnect(1000)->wait_for(std::chrono::seconds(2));
  } catch (const ::mqtt::exception&) {
    // Going away anyway.
  }
}

std::optional<received_message> mqtt_test_client::wait_for(const std::string& topic, const predicate& accept,
                                                           std::chrono::milliseconds timeout, std::size_t from) {
  const auto deadline = std::chrono::steady_clock::now() + timeout;
  std::unique_lock<std::mutex> lock(mutex_);
  std::size_t next = from;
  while (true) {
    for (; next < messages_.size(); ++next) {
      if (messages_[next].topic == topic && accept(messages_[next])) return messages_[next];
    }
    if (arrived_.wait_until(lock, deadline) == std::cv_status::timeout) {
      for (; next < messages_.size(); ++next) {
        if (messages_[next].topic == topic && accept(messages_[next])) return messages_[next];
      }
      return std::nullopt;
    }
  }
}

std::optional<received_message> mqtt_test_client::wait_for_payload(const std::string& topic, const std::string& payload,
                                                                   std::chrono::milliseconds timeout,
                                                                   std::size_t from) {
  return wait_for(
      topic, [&](const received_message& m) { return m.payload == payload; }, timeout, from);
}

bool mqtt_test_client::wait_for_count(const std::string& topic, std::size_t n, std::chrono::milliseconds timeout) {
  std::unique_lock<std::mutex> lock(mutex_);
  return arrived_.wait_for(lock, timeout, [&] {
    std::size_t count = 0;
    for (const auto& m : messages_) count += m.topic == topic ? 1 : 0;
    return count >= n;
  });
}

std::vector<received_message> mqtt_test_client::messages() const {
  std::lock_guard<std::mutex> lock(mutex_);
  return messages_;
}

std::vector<received_message> mqtt_test_client::messages_on(const std::string& topic) const {
  std::lock_guard<std::mutex> lock(mutex_);
  std::vector<received_message> out;
  for (const auto& m : messages_) {
    if (m.topic == topic) out.push_back(m);
  }
  return out;
}

std::size_t mqtt_test_client::size() const {
  std::lock_guard<std::mutex> lock(mutex_);
  return messages_.size();
}

std::chrono::steady_clock::duration mqtt_test_client::publish_paced(const std::string& topic,
                                                                    const std::vector<std::string>& payloads,
                                                                    std::chrono::microseconds interval) {
  constexpr std::size_t k_max_unacknowledged = 50;
  const auto t0 = std::chrono::steady_clock::now();
  std::deque<::mqtt::delivery_token_ptr> pending;
  const auto settle_oldest = [&] {
    if (!pending.front()->wait_for(k_ack_timeout)) {
      throw std::runtime_error("test client: no acknowledgement within 5 s for " + topic);
    }
    pending.pop_front();
  };
  try {
    for (std::size_t i = 0; i < payloads.size(); ++i) {
      std::this_thread::sleep_until(t0 + interval * static_cast<long>(i));
      while (pending.size() >= k_max_unacknowledged) settle_oldest();
      pending.push_back(client_->publish(::mqtt::make_message(topic, payloads[i], 1, false)));
    }
    while (!pending.empty()) settle_oldest();
  } catch (const ::mqtt::exception& e) {
    throw std::runtime_error("test client: publish to " + topic + ": " + e.what());
  }
  return std::chrono::steady_clock::now() - t0;
}

void mqtt_test_client::publish(const std::string& topic, const std::string& payload, bool retained) {
  try {
    if (!client_->publish(::mqtt::make_message(topic, payload, 1, retained))->wait_for(k_ack_timeout)) {
      throw std::runtime_error("test client: no acknowledgement within 5 s for " + topic);
    }
  } catch (const ::mqtt::exception& e) {
    throw std::runtime_error("test client: publish to " + topic + ": " + e.what());
  }
}

bool mqtt_test_client::connected() const { return client_->is_connected(); }

}  // namespace dewmargin::test_support
