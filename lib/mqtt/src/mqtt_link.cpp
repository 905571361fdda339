#include "dewmargin/mqtt_link.h"

#include <mqtt/async_client.h>

#include <algorithm>
#include <condition_variable>
#include <cstdint>
#include <exception>
#include <mutex>
#include <thread>
#include <utility>

#include "dewmargin/broker_uri.h"
#include "dewmargin/secret_file.h"
#include "dewmargin/tcp_nodelay.h"
#include "link_client_options.h"
#include "link_options_check.h"
#include "tcp_probe.h"

namespace dewmargin {
namespace {

using detail::k_qos;
// Slice in which the sender thread looks at the stop flag while it waits on the connect.
constexpr std::chrono::milliseconds k_wait_slice{100};
// After a refused send the sender waits this long (or for a delivery or connection event).
constexpr std::chrono::milliseconds k_send_retry_pause{200};
// How long shutdown waits for a handler still running on the library thread.
constexpr std::chrono::milliseconds k_handler_drain{2000};
constexpr std::chrono::milliseconds k_min_disconnect_timeout{200};
constexpr std::chrono::milliseconds k_destructor_shutdown_timeout{1000};
// A failed connect is explained by a TCP probe of the broker's address; this bounds it.
constexpr std::chrono::milliseconds k_tcp_probe_timeout{1000};

void* to_context(std::uint64_t value) { return reinterpret_cast<void*>(static_cast<std::uintptr_t>(value)); }
std::uint64_t from_context(void* context) {
  return static_cast<std::uint64_t>(reinterpret_cast<std::uintptr_t>(context));
}

// Return codes after which the same message will never be accepted.
bool is_permanent_publish_error(int rc) {
  return rc == MQTTASYNC_BAD_UTF8_STRING || rc == MQTTASYNC_NULL_PARAMETER || rc == MQTTASYNC_TOPICNAME_TRUNCATED ||
         rc == MQTTASYNC_BAD_STRUCTURE || rc == MQTTASYNC_BAD_QOS;
}

std::string describe(const ::mqtt::exception& e) {
  std::string text = e.what();
  // For MQTT 3.1.1 a refused CONNECT carries the CONNACK return code.
  switch (e.get_return_code()) {
    case 1:
      text += " (broker: unacceptable protocol version)";
      break;
    case 2:
      text += " (broker: client identifier rejected)";
      break;
    case 3:
      text += " (broker: server unavailable)";
      break;
    case 4:
      text += " (broker: bad user name or password)";
      break;
    case 5:
      text += " (broker: not authorised)";
      break;
    default:
      break;
  }
  return text;
}

// An iaction_listener that forwards to two functions (the library wants an object).
class forwarding_listener final : public ::mqtt::iaction_listener {
 public:
  using handler = std::function<void(const ::mqtt::token&)>;
  forwarding_listener(handler on_success, handler on_failure)
      : on_success_(std::move(on_success)), on_failure_(std::move(on_failure)) {}

  void on_success(const ::mqtt::token& tok) override { on_success_(tok); }
  void on_failure(const ::mqtt::token& tok) override { on_failure_(tok); }

 private:
  handler on_success_;
  handler on_failure_;
};

// One connection's client object and the listeners its tokens point to (declared first,
// so that they outlive the client when it is destroyed implicitly).
struct library_client {
  std::unique_ptr<forwarding_listener> delivery;
  std::unique_ptr<forwarding_listener> subscribe;
  std::unique_ptr<forwarding_listener> status;
  std::unique_ptr<::mqtt::async_client> client;
};

// The link's state machine, documented in mqtt_link.h ("States").
enum class link_phase { created, running, draining, stopping, closed };
enum class session_phase { down, subscribing, sending, paused };

}  // namespace

struct mqtt_link::impl {
  explicit impl(mqtt_link_options options)
      : options_(std::move(options)),
        broker_port_(broker_uri_port(options_.broker.uri)),
        box_(options_.outbox_capacity),
        inbound_(options_.inbound_capacity, options_.must_keep_prefixes) {}

  impl(const impl&) = delete;
  impl& operator=(const impl&) = delete;
  ~impl() { shutdown(options_.offline_will_payload, k_destructor_shutdown_timeout); }

  // ---- set-up -------------------------------------------------------------------------

  std::string build(const std::string& password) {
    connect_options_ = detail::make_connect_options(options_, password);
    return make_client();
  }

  // A client object for one connection, its handlers and listeners tagged with its
  // generation (see replace_client()).
  std::string make_client() {
    std::uint64_t generation = 0;
    {
      std::lock_guard<std::mutex> lock(mutex_);
      generation = client_generation_;
    }
    try {
      // No persistence object: Paho's file persistence would write into the working directory.
      current_.client = std::make_unique<::mqtt::async_client>(options_.broker.uri, options_.broker.client_id,
                                                               detail::make_create_options(options_), nullptr);
    } catch (const ::mqtt::exception& e) {
      return "broker.uri " + options_.broker.uri + ": the client library refused it: " + e.what();
    }
    current_.delivery = std::make_unique<forwarding_listener>(
        [this, generation](const ::mqtt::token& tok) {
          run_handler(generation, "delivery", [&] { on_delivery_success(tok); });
        },
        [this, generation](const ::mqtt::token& tok) {
          run_handler(generation, "delivery failure", [&] { on_delivery_failure(tok); });
        });
    current_.subscribe = std::make_unique<forwarding_listener>(
        [this, generation](const ::mqtt::token& tok) {
          run_handler(generation, "subscribe", [&] { on_subscribe_success(tok); });
        },
        [this, generation](const ::mqtt::token& tok) {
          run_handler(generation, "subscribe failure", [&] { on_subscribe_failure(tok); });
        });
    current_.status = std::make_unique<forwarding_listener>([](const ::mqtt::token&) {},
                                                            [this, generation](const ::mqtt::token& tok) {
                                                              run_handler(generation, "status failure",
                                                                          [&] { on_status_failure(tok); });
                                                            });
    current_.client->set_message_callback([this, generation](::mqtt::const_message_ptr m) {
      run_handler(generation, "message", [&] { on_message(m); });
    });
    current_.client->set_connected_handler([this, generation](const std::string& cause) {
      run_handler(generation, "connected", [&] { on_connected(cause); });
    });
    current_.client->set_connection_lost_handler([this, generation](const std::string& cause) {
      run_handler(generation, "connection lost", [&] { on_connection_lost(cause); });
    });
    return {};
  }

  // After a lost connection the client object is replaced, not reconnected. Paho C 1.3.12
  // keeps a QoS 1 publish whose socket write failed in its session after freeing its topic,
  // and resends it on the next connect: a use after free (ASan, MqttLink.ResendsMessages-
  // InFlightWhenTheBrokerDies) that could put a garbage topic on the wire. A fresh client
  // starts with no such state; the outbox resends what was unacknowledged, and the broker
  // keeps the persistent session (subscriptions, queued messages) for the same client id.
  //
  // The old client is retired, not destroyed at once: the library calls the connection-lost
  // handler on a thread of its own and still reads the client object after our handler has
  // returned (so do token completions refused at the gate). It is destroyed at the next
  // replacement (a connection later) or at shutdown. The new client is made by the next
  // connect_with_backoff(), after reconnect_min here (not at once: two clients with our id
  // taking the session from each other would loop tightly; Paho's own reconnect waited as
  // long). False when the link stops meanwhile.
  bool replace_client() {
    bool drained = true;
    {
      std::unique_lock<std::mutex> lock(mutex_);
      ++client_generation_;  // handlers of the old client are refused from here on
      drained = handlers_idle_.wait_for(lock, k_handler_drain, [&] { return handlers_active_ == 0; });
    }
    if (!drained) {
      report(link_report_level::error,
             "a client library handler did not return within 2 s after a lost connection; its client is left as is");
    }
    retire_client(drained);
    std::unique_lock<std::mutex> lock(mutex_);
    connection_lost_ = false;
    changed_.wait_for(lock, options_.reconnect_min, [&] { return stop_requested_locked(); });
    return !stop_requested_locked();
  }

  // The current client and its listeners become the retired set; the set retired before
  // is destroyed. With a handler still inside (drained false) the client is never
  // destroyed: it is left allocated, which a report has already said.
  void retire_client(bool drained) {
    library_client previous = std::move(retired_);
    retired_ = std::move(current_);
    current_ = library_client{};
    if (retired_.client) {
      try {
        retired_.client->disable_callbacks();
      } catch (const ::mqtt::exception&) {
        // Refused while the library still counts itself connected; the gate keeps handlers out.
      }
    }
    if (!drained) {
      (void)retired_.client.release();
      (void)retired_.delivery.release();
      (void)retired_.subscribe.release();
      (void)retired_.status.release();
    }
    destroy(previous);
  }

  // Callbacks off, then the client, then the listeners its tokens point to.
  static void destroy(library_client& c) {
    if (c.client) {
      try {
        c.client->disable_callbacks();
      } catch (const ::mqtt::exception&) {
        // Refused while the library still counts itself connected; the gate keeps handlers out.
      }
      c.client.reset();
    }
    c.delivery.reset();
    c.subscribe.reset();
    c.status.reset();
  }

  // Shutdown: the current client and the retired one.
  void dispose_client() {
    destroy(current_);
    destroy(retired_);
  }

  // ---- caller threads -----------------------------------------------------------------

  void start() {
    {
      std::lock_guard<std::mutex> lock(mutex_);
      if (phase_ != link_phase::created) {
        return;
      }
      phase_ = link_phase::running;
    }
    sender_ = std::thread([this] { run_sender(); });
  }

  void publish(outbound_message message) {
    if (const std::string why = detail::invalid_publish_topic(message.topic); !why.empty()) {
      {
        std::lock_guard<std::mutex> lock(mutex_);
        ++rejected_;
      }
      report(link_report_level::error, "publish refused, topic \"" + message.topic + "\": " + why);
      return;
    }
    bool closed = false;
    {
      std::lock_guard<std::mutex> lock(mutex_);
      closed = phase_ == link_phase::closed;
      if (closed) {
        ++rejected_;
      } else {
        queue_locked(std::move(message));
      }
    }
    if (closed) {
      report(link_report_level::error, "publish after shutdown refused, topic " + message.topic);
      return;
    }
    changed_.notify_all();
    report_outbox_drops();
  }

  bool next_message(inbound_message& out, std::chrono::milliseconds timeout) {
    if (inbound_.pop(out, timeout)) {
      return true;
    }
    std::lock_guard<std::mutex> lock(mutex_);
    reported_.inbound_drop = false;  // the queue ran empty: report the next overflow again
    return false;
  }

  std::size_t next_batch(std::vector<inbound_message>& out, std::size_t max_messages,
                         std::chrono::milliseconds timeout) {
    std::size_t taken = 0;
    if (gathering_ && options_.inbound_gather.count() > 0) {
      // The last call found messages: let more arrive before taking them (no wake per message).
      std::this_thread::sleep_for(std::min<std::chrono::microseconds>(options_.inbound_gather, timeout));
      taken = inbound_.pop_batch(out, max_messages, std::chrono::milliseconds(0));
    }
    if (taken == 0) taken = inbound_.pop_batch(out, max_messages, timeout);
    gathering_ = taken > 0;
    if (taken == 0) {
      std::lock_guard<std::mutex> lock(mutex_);
      reported_.inbound_drop = false;  // the queue ran empty: report the next overflow again
    }
    return taken;
  }

  bool connected() const {
    std::lock_guard<std::mutex> lock(mutex_);
    return session_ != session_phase::down;
  }

  bool ready() const {
    std::lock_guard<std::mutex> lock(mutex_);
    return session_ == session_phase::sending || session_ == session_phase::paused;
  }

  std::string last_connect_error() const {
    std::lock_guard<std::mutex> lock(mutex_);
    return last_connect_error_;
  }

  mqtt_link_stats stats() const {
    const inbound_queue_counters in = inbound_.counters();
    std::lock_guard<std::mutex> lock(mutex_);
    mqtt_link_stats s;
    s.received = in.received;
    s.dropped_inbound = in.dropped;
    s.kept_over_capacity = in.kept_over_capacity;
    s.inbound_queued = in.queued;
    s.published = published_;
    s.delivered = box_.delivered();
    s.send_failures = send_failures_;
    s.rejected = rejected_ + box_.rejected();
    for (std::size_t i = 0; i < k_message_class_count; ++i) {
      s.dropped_outbox[i] = box_.dropped(static_cast<message_class>(i));
    }
    s.superseded = box_.superseded();
    s.connections = connections_;
    s.reconnects = connections_ > 0 ? connections_ - 1 : 0;
    s.connection_losses = connection_losses_;
    s.outbox_size = box_.size();
    s.outbox_in_flight = box_.in_flight();
    return s;
  }

  void shutdown(const std::string& final_status_payload, std::chrono::milliseconds timeout) {
    const auto deadline = std::chrono::steady_clock::now() + timeout;
    bool was_running = false;
    {
      std::lock_guard<std::mutex> lock(mutex_);
      if (phase_ != link_phase::created && phase_ != link_phase::running) {
        return;
      }
      was_running = phase_ == link_phase::running;
      phase_ = link_phase::draining;  // from now on no "online" is published
      if (was_running && !options_.status_topic.empty() && !final_status_payload.empty()) {
        queue_locked(outbound_message{options_.status_topic, final_status_payload, true, message_class::state});
      }
    }
    changed_.notify_all();

    std::size_t undelivered = 0;
    if (was_running) {
      {
        std::unique_lock<std::mutex> lock(mutex_);
        changed_.wait_until(lock, deadline, [&] { return box_.empty(); });
        undelivered = box_.size();
        phase_ = link_phase::stopping;
      }
      changed_.notify_all();
      sender_.join();
    }

    if (current_.client && current_.client->is_connected()) {
      const auto left =
          std::chrono::duration_cast<std::chrono::milliseconds>(deadline - std::chrono::steady_clock::now());
      const auto disconnect_timeout = std::max(left, k_min_disconnect_timeout);
      try {
        if (!current_.client->disconnect(disconnect_timeout)->wait_for(disconnect_timeout + k_wait_slice)) {
          report(link_report_level::warning, "disconnect from " + options_.broker.uri + " timed out");
        }
      } catch (const ::mqtt::exception& e) {
        report(link_report_level::warning, "disconnect from " + options_.broker.uri + " failed: " + describe(e));
      }
    }

    {
      // No handler may run once the client is gone: close the gate, wait for those inside.
      std::unique_lock<std::mutex> lock(mutex_);
      phase_ = link_phase::closed;
      if (!handlers_idle_.wait_for(lock, k_handler_drain, [&] { return handlers_active_ == 0; })) {
        lock.unlock();
        report(link_report_level::error, "a client library handler did not return within 2 s at shutdown");
      }
    }
    dispose_client();
    {
      std::lock_guard<std::mutex> lock(mutex_);
      session_ = session_phase::down;
    }
    if (was_running) {
      report(
          undelivered == 0 ? link_report_level::info : link_report_level::warning,
          "link to " + options_.broker.uri + " shut down, " + std::to_string(undelivered) + " message(s) undelivered");
    }
  }

  // ---- sender thread ------------------------------------------------------------------

  // One client object per connection: connect, send until the connection is lost, replace.
  // The pause before the next connect is reconnect_min after every loss, as Paho's own
  // reconnect did: growing it for short connections was tried and made recovery from a
  // broker that restarts every few seconds take up to reconnect_max each time.
  void run_sender() {
    while (connect_with_backoff() && send_until_lost() && replace_client()) {
    }
  }

  // True when the connection was lost, false when the link stops.
  bool send_until_lost() {
    while (true) {
      std::vector<outbox_entry> batch;
      {
        std::unique_lock<std::mutex> lock(mutex_);
        const auto can_send = [&] {
          return session_ == session_phase::sending && box_.pending() > 0 && box_.in_flight() < options_.max_in_flight;
        };
        while (!stop_requested_locked() && !connection_lost_ && !can_send()) {
          if (session_ == session_phase::paused) {
            changed_.wait_for(lock, k_send_retry_pause);
            if (session_ == session_phase::paused) session_ = session_phase::sending;
          } else {
            changed_.wait(lock);
          }
        }
        if (stop_requested_locked()) {
          return false;
        }
        if (connection_lost_) {
          return true;
        }
        batch = box_.take_next_to_send(options_.max_in_flight);
      }
      send_batch(batch);
    }
  }

  // Retries on the link's back-off until a connect succeeds (true) or the link is stopped
  // (false). The library's automatic reconnect is off: this is the only retry. After a loss
  // it first makes the new client; should the library refuse one (the same URI made a
  // client at create()), that counts as a failed attempt.
  bool connect_with_backoff() {
    auto backoff = options_.reconnect_min;
    while (true) {
      {
        std::lock_guard<std::mutex> lock(mutex_);
        if (stop_requested_locked()) {
          return false;
        }
      }
      std::string failure = current_.client ? std::string{} : make_client();
      if (failure.empty()) {
        switch (attempt_connect(failure)) {
          case attempt::connected:
            return true;  // the connected handler subscribes and sets the session up
          case attempt::stopped:
            return false;  // shutdown destroys the client with the attempt pending (tested)
          case attempt::failed:
            break;
        }
      }
      {
        std::lock_guard<std::mutex> lock(mutex_);
        last_connect_error_ = failure;
      }
      report(link_report_level::warning, "connect to " + options_.broker.uri + " as " + options_.broker.client_id +
                                             " failed: " + failure + "; next attempt in " +
                                             std::to_string(backoff.count()) + " s");
      {
        std::unique_lock<std::mutex> lock(mutex_);
        changed_.wait_for(lock, backoff, [&] { return stop_requested_locked(); });
      }
      backoff = std::min(backoff * 2, options_.reconnect_max);
    }
  }

  enum class attempt { connected, stopped, failed };

  // One connect of the current client, waited for in slices so that a stop is seen; on
  // failure `failure` says why.
  attempt attempt_connect(std::string& failure) {
    try {
      const ::mqtt::token_ptr tok = current_.client->connect(connect_options_);
      const auto give_up = std::chrono::steady_clock::now() + options_.connect_timeout + std::chrono::seconds(2);
      bool done = false;
      while (!(done = tok->wait_for(k_wait_slice))) {
        if (stopping() || std::chrono::steady_clock::now() > give_up) {
          break;
        }
      }
      if (done) return attempt::connected;
      if (stopping()) return attempt::stopped;
      failure = "no answer within " + std::to_string(options_.connect_timeout.count()) + " s";
    } catch (const ::mqtt::exception& e) {
      failure = describe(e) + explain_connect_failure(e.get_return_code());
    }
    return attempt::failed;
  }

  // Paho says "TCP/TLS connect failure" for a refused port and a failed handshake alike.
  std::string explain_connect_failure(int rc) const {
    if (rc != MQTTASYNC_FAILURE) {
      return {};
    }
    const auto where = detail::split_broker_uri(options_.broker.uri);
    if (!where) {
      return {};
    }
    if (!detail::tcp_port_accepts(*where, k_tcp_probe_timeout)) {
      return " (nothing accepts TCP connections at " + where->host + ":" + where->port + ")";
    }
    if (broker_transport_of(options_.broker.uri) != broker_transport::tls) {
      return " (the port accepts TCP connections now)";
    }
    return " (the port accepts TCP, so the TLS handshake failed: the broker's certificate must chain to " +
           (options_.broker.tls && !options_.broker.tls->ca_file.empty() ? options_.broker.tls->ca_file
                                                                         : std::string("the system's CAs")) +
           " and name the host " + where->host + ")";
  }

  bool stopping() const {
    std::lock_guard<std::mutex> lock(mutex_);
    return stop_requested_locked();
  }

  bool stop_requested_locked() const { return phase_ == link_phase::stopping || phase_ == link_phase::closed; }

  void send_batch(const std::vector<outbox_entry>& batch) {
    for (std::size_t i = 0; i < batch.size(); ++i) {
      const outbox_entry& e = batch[i];
      try {
        (void)current_.client->publish(
            ::mqtt::make_message(e.message.topic, e.message.payload, k_qos, e.message.retained), to_context(e.id),
            *current_.delivery);
        std::lock_guard<std::mutex> lock(mutex_);
        ++published_;
      } catch (const ::mqtt::exception& ex) {
        const int rc = ex.get_return_code();
        if (is_permanent_publish_error(rc)) {
          {
            std::lock_guard<std::mutex> lock(mutex_);
            (void)box_.on_rejected(e.id);
          }
          report(link_report_level::error, "publish to " + e.message.topic + " refused for good: " + describe(ex));
          continue;
        }
        // Not sent (not connected, library buffer full): this one and the rest of the
        // batch go back to pending, in order, and the sender pauses briefly.
        bool first_in_connection = false;
        {
          std::lock_guard<std::mutex> lock(mutex_);
          for (std::size_t j = i; j < batch.size(); ++j) {
            (void)box_.on_send_failed(batch[j].id);
          }
          ++send_failures_;
          if (session_ == session_phase::sending) session_ = session_phase::paused;
          first_in_connection = !reported_.send_failure;
          reported_.send_failure = true;
        }
        if (first_in_connection) {
          report(link_report_level::warning,
                 "publish to " + e.message.topic + " not accepted, will retry: " + describe(ex));
        }
        return;
      }
    }
  }

  // ---- library thread (handlers) ------------------------------------------------------

  // Handlers run only while the gate is open, and shutdown waits for those inside.
  class handler_scope {
   public:
    handler_scope(impl& owner, std::uint64_t generation) : owner_(owner) {
      std::lock_guard<std::mutex> lock(owner_.mutex_);
      entered_ = owner_.phase_ != link_phase::closed && generation == owner_.client_generation_;
      if (entered_) ++owner_.handlers_active_;
    }
    ~handler_scope() {
      if (!entered_) return;
      std::lock_guard<std::mutex> lock(owner_.mutex_);
      if (--owner_.handlers_active_ == 0) owner_.handlers_idle_.notify_all();
    }
    handler_scope(const handler_scope&) = delete;
    handler_scope& operator=(const handler_scope&) = delete;
    explicit operator bool() const { return entered_; }

   private:
    impl& owner_;
    bool entered_ = false;
  };

  // Every handler the library calls goes through here: the gate (open only for the
  // current client, and not once closed), and no exception may propagate into the
  // library's thread.
  template <typename Body>
  void run_handler(std::uint64_t generation, const char* what, Body&& body) noexcept {
    const handler_scope scope(*this, generation);
    if (!scope) {
      return;
    }
    try {
      body();
    } catch (const std::exception& e) {
      report(link_report_level::error, std::string("client library handler (") + what + ") failed: " + e.what());
    } catch (...) {
      report(link_report_level::error, std::string("client library handler (") + what + ") failed");
    }
  }

  void on_message(const ::mqtt::const_message_ptr& m) {
    if (!m) {
      return;
    }
    if (!inbound_.push(inbound_message{m->get_topic(), m->to_string(), m->is_retained()})) {
      return;
    }
    bool first = false;
    {
      std::lock_guard<std::mutex> lock(mutex_);
      first = !reported_.inbound_drop;
      reported_.inbound_drop = true;
    }
    if (first) {
      report(link_report_level::warning, "inbound queue full (" + std::to_string(options_.inbound_capacity) +
                                             " messages): dropping the oldest non-command messages");
    }
  }

  void on_connected(const std::string& /*cause*/) {
    // Before anything is published on the new connection (tcp_nodelay.h: the 40 ms floor).
    if (set_tcp_nodelay_to_peer(broker_port_) == 0) {
      report(link_report_level::info, "TCP no-delay could not be set on the connection to " + options_.broker.uri +
                                          " (/proc/self/fd unreadable?): small messages may wait up to 40 ms");
    }
    std::uint64_t epoch = 0;
    std::uint64_t connection_number = 0;
    {
      std::lock_guard<std::mutex> lock(mutex_);
      session_ = session_phase::subscribing;
      reported_.send_failure = false;
      last_connect_error_.clear();
      epoch = ++epoch_;
      connection_number = ++connections_;
      (void)box_.on_connection_lost();  // anything still in flight belongs to the old connection
    }
    changed_.notify_all();
    report(link_report_level::info,
           "connected to " + options_.broker.uri + " as " + options_.broker.client_id +
               (connection_number > 1 ? " (reconnect " + std::to_string(connection_number - 1) + ")" : std::string{}));
    if (options_.subscriptions.empty()) {
      finish_session(epoch);
      return;
    }
    try {
      const auto filters = ::mqtt::string_collection::create(options_.subscriptions);
      const ::mqtt::iasync_client::qos_collection qos(options_.subscriptions.size(), k_qos);
      (void)current_.client->subscribe(filters, qos, to_context(epoch), *current_.subscribe);
    } catch (const ::mqtt::exception& e) {
      report(link_report_level::error, "subscribe request failed: " + describe(e));
    }
  }

  void on_subscribe_success(const ::mqtt::token& tok) {
    std::string refused;
    try {
      const auto codes = tok.get_subscribe_response().get_reason_codes();
      for (std::size_t i = 0; i < codes.size() && i < options_.subscriptions.size(); ++i) {
        if (codes[i] >= ::mqtt::ReasonCode::UNSPECIFIED_ERROR) {
          refused += (refused.empty() ? "" : ", ") + options_.subscriptions[i];
        }
      }
    } catch (const std::exception&) {
      // No per-topic codes in this response: the acknowledgement itself is the success.
    }
    if (!refused.empty()) {
      report(link_report_level::error, "broker refused the subscription to: " + refused + "; link stays not ready");
      return;
    }
    finish_session(from_context(tok.get_user_context()));
  }

  void on_subscribe_failure(const ::mqtt::token& tok) {
    report(link_report_level::error, "subscribe failed (return code " + std::to_string(tok.get_return_code()) +
                                         "); link stays not ready until the next connect");
  }

  // Subscribed (or nothing to subscribe): announce online, then let the sender go.
  void finish_session(std::uint64_t epoch) {
    bool announce = false;
    {
      std::lock_guard<std::mutex> lock(mutex_);
      if (epoch != epoch_ || session_ == session_phase::down) {
        return;  // an answer from an older connection
      }
      announce = phase_ == link_phase::running && !options_.status_topic.empty();
    }
    if (announce) {
      try {
        (void)current_.client->publish(
            ::mqtt::make_message(options_.status_topic, options_.online_payload, k_qos, true), nullptr,
            *current_.status);
      } catch (const ::mqtt::exception& e) {
        report(link_report_level::error, "publish of the online status failed: " + describe(e));
      }
    }
    {
      std::lock_guard<std::mutex> lock(mutex_);
      if (epoch == epoch_ && session_ == session_phase::subscribing) {
        session_ = session_phase::sending;
      }
    }
    changed_.notify_all();
  }

  void on_status_failure(const ::mqtt::token& tok) {
    report(link_report_level::warning, "online status not acknowledged (return code " +
                                           std::to_string(tok.get_return_code()) + "); sent again on reconnect");
  }

  void on_connection_lost(const std::string& cause) {
    std::size_t returned = 0;
    {
      std::lock_guard<std::mutex> lock(mutex_);
      session_ = session_phase::down;
      connection_lost_ = true;
      ++connection_losses_;
      returned = box_.on_connection_lost();
    }
    changed_.notify_all();
    report(link_report_level::warning,
           "connection to " + options_.broker.uri + " lost" + (cause.empty() ? std::string{} : ": " + cause) + "; " +
               std::to_string(returned) + " unacknowledged message(s) will be sent again; reconnecting");
  }

  void on_delivery_success(const ::mqtt::token& tok) {
    {
      std::lock_guard<std::mutex> lock(mutex_);
      (void)box_.on_delivered(from_context(tok.get_user_context()));
      if (session_ == session_phase::paused) {
        session_ = session_phase::sending;
      }
      if (box_.empty()) {
        reported_.outbox_drop = false;
      }
    }
    changed_.notify_all();
  }

  void on_delivery_failure(const ::mqtt::token& tok) {
    {
      std::lock_guard<std::mutex> lock(mutex_);
      if (box_.on_send_failed(from_context(tok.get_user_context()))) {
        ++send_failures_;
      }
    }
    changed_.notify_all();
  }

  // ---- helpers ------------------------------------------------------------------------

  void queue_locked(outbound_message message) { (void)box_.push(std::move(message)); }

  void report_outbox_drops() {
    std::uint64_t dropped = 0;
    {
      std::lock_guard<std::mutex> lock(mutex_);
      dropped = box_.dropped_total();
      if (dropped == outbox_drops_seen_ || reported_.outbox_drop) {
        outbox_drops_seen_ = dropped;
        return;
      }
      outbox_drops_seen_ = dropped;
      reported_.outbox_drop = true;
    }
    report(link_report_level::warning,
           "outbox full (" + std::to_string(options_.outbox_capacity) +
               " events and alarm events waiting; states and commands are kept, the latest per topic): dropping "
               "events first, alarm events last, " +
               std::to_string(dropped) + " dropped so far");
  }

  // A sink that throws is ignored: nothing may propagate into the library's thread, and
  // there is nowhere else to report the failure of the reporter.
  void report(link_report_level level, const std::string& text) const noexcept {
    if (!options_.report) {
      return;
    }
    try {
      options_.report(level, text);
    } catch (...) {
    }
  }

  const mqtt_link_options options_;
  const int broker_port_;
  bool gathering_ = false;  // worker thread only: the last next_batch() found messages
  ::mqtt::connect_options connect_options_;

  mutable std::mutex mutex_;
  std::condition_variable changed_;        // outbox, connection or stop changed
  std::condition_variable handlers_idle_;  // handlers_active_ fell to 0
  outbox box_;
  // The state machine (see mqtt_link.h): where the link is in its life, and the session
  // on the current connection.
  link_phase phase_ = link_phase::created;
  session_phase session_ = session_phase::down;
  // Warnings given once per episode, not states: set when reported, cleared when the
  // episode ends (a new connection; the inbound queue ran empty; the outbox drained).
  struct {
    bool send_failure = false;
    bool inbound_drop = false;
    bool outbox_drop = false;
  } reported_;
  std::uint64_t outbox_drops_seen_ = 0;
  int handlers_active_ = 0;
  std::uint64_t client_generation_ = 0;  // which client's handlers may run (replace_client())
  bool connection_lost_ = false;         // the current client lost its connection
  std::uint64_t epoch_ = 0;
  std::uint64_t connections_ = 0;
  std::uint64_t connection_losses_ = 0;
  std::uint64_t published_ = 0;
  std::uint64_t send_failures_ = 0;
  std::uint64_t rejected_ = 0;
  std::string last_connect_error_;

  inbound_queue inbound_;
  std::thread sender_;
  // The current client with the listeners its tokens point to, and the previous one (see
  // replace_client()). Last members: destroyed first, while everything their handlers touch
  // exists.
  library_client current_;
  library_client retired_;
};

// ---- mqtt_link ------------------------------------------------------------------------

result<mqtt_link> mqtt_link::create(mqtt_link_options options) {
  if (std::string why = detail::check_link_options(options); !why.empty()) {
    return make_error(error_code::invalid_argument, why);
  }
  std::string password;
  if (!options.broker.password_file.empty()) {
    auto secret = read_secret_file(options.broker.password_file);
    if (!secret.ok()) {
      return make_error(error_code::invalid_argument, "broker.password_file " + secret.err().message);
    }
    password = std::move(secret).value();
  }
  auto state = std::make_unique<impl>(std::move(options));
  if (std::string why = state->build(password); !why.empty()) {
    return make_error(error_code::invalid_argument, why);
  }
  return mqtt_link(std::move(state));
}

mqtt_link::mqtt_link(std::unique_ptr<impl> state) : impl_(std::move(state)) {}
mqtt_link::mqtt_link(mqtt_link&&) noexcept = default;
mqtt_link& mqtt_link::operator=(mqtt_link&&) noexcept = default;
mqtt_link::~mqtt_link() = default;

void mqtt_link::start() { impl_->start(); }
bool mqtt_link::next_message(inbound_message& out, std::chrono::milliseconds timeout) {
  return impl_->next_message(out, timeout);
}
std::size_t mqtt_link::next_batch(std::vector<inbound_message>& out, std::size_t max_messages,
                                  std::chrono::milliseconds timeout) {
  return impl_->next_batch(out, max_messages, timeout);
}
void mqtt_link::publish(outbound_message message) { impl_->publish(std::move(message)); }
bool mqtt_link::connected() const { return impl_->connected(); }
bool mqtt_link::ready() const { return impl_->ready(); }
std::string mqtt_link::last_connect_error() const { return impl_->last_connect_error(); }
mqtt_link_stats mqtt_link::stats() const { return impl_->stats(); }
void mqtt_link::shutdown(const std::string& final_status_payload, std::chrono::milliseconds timeout) {
  impl_->shutdown(final_status_payload, timeout);
}

}  // namespace dewmargin
