#pragma once
// The service's one connection to the MQTT broker (Paho MQTT C++ 1.2.0, MQTT 3.1.1, QoS 1).
//
// What it guarantees:
// - Session: stable client id, persistent session (clean session off), so the broker
//   queues QoS 1 commands for us while we are away; still it subscribes again after every
//   (re)connect, because a broker that lost its state also lost our subscriptions.
// - Presence: Last Will `offline_will_payload`, retained, QoS 1, on status_topic; after each
//   subscribe acknowledgement it publishes `online_payload` retained; shutdown() publishes
//   a final status itself (a clean DISCONNECT suppresses the will).
// - Outbound: publish() never blocks. Messages wait in an outbox (dewmargin/outbox.h) until
//   their QoS 1 delivery completes (states and commands coalesced by topic, events and alarm
//   events bounded by outbox_capacity); on connection loss the ones in flight are sent again
//   (at least once: a subscriber may see a duplicate). The link keeps no copy of what it
//   delivered: a broker restarted without persistence has forgotten the retained messages,
//   and the caller, seeing stats().connections rise past 1, publishes them again from its
//   own state (the service: engine::republish), current rather than as last sent.
// - Inbound: a bounded queue (dewmargin/inbound_queue.h); overflow is counted, command
//   topics (must_keep_prefixes) are never dropped.
// - Connect: start() returns at once. Every connect is retried with bounded back-off
//   (reconnect_min doubling to reconnect_max) by the link's sender thread, each connection
//   on a fresh client object (see the Paho facts below).
//
// Threads:
// - Caller threads (the service's worker): publish(), next_message(), next_batch(), stats(), connected(),
//   ready(), last_connect_error(), shutdown(). All of them only take the link's lock briefly;
//   next_message() waits on the inbound queue alone.
// - The link's sender thread: makes every connect, moves messages from the outbox to the
//   client library (up to max_in_flight at a time), and replaces the client after a loss.
//   It is the only thread that waits on a library token (the connect token, bounded).
// - The library's threads run the handlers: message arrived, connected, subscribe/publish
//   completion on its callback thread, connection lost on a thread of its own. Handlers
//   never wait on a token; they take the link's lock briefly, and at most start an
//   asynchronous subscribe or publish.
// - `report` is called from any of these threads, never with the link's lock held: it must
//   be thread-safe. It never receives the password.
//
// States: one machine of two parts, both under the link's lock (no other state flags).
//   Life of the link (phase):
//     created --start()--> running --shutdown()--> draining --outbox empty or timeout--> stopping
//       --handlers drained, client destroyed--> closed
//     draining: the final status is queued and "online" is no longer published; sending goes on.
//     stopping: the sender thread ends (also its connect loop). closed: no handler runs
//     (the gate), publish() is refused. shutdown() before start() passes draining to closed.
//   Session on the current connection (session), in any phase before closed:
//     down --connected--> subscribing --subscribe acknowledged, online published--> sending
//     sending --the library refused a send--> paused --a delivery, or 200 ms--> sending
//     subscribing, sending, paused --connection lost--> down
//   One client object per connection: after a loss the sender thread shuts the gate on the
//   old client's handlers (a generation number), retires it (destroyed one connection
//   later, or at shutdown), makes a new one and connects it on the link's own back-off.
//   connected() is session != down; ready() is sending or paused. The sender takes from the
//   outbox only in sending. Warnings given once per episode (a refused send, inbound or
//   outbox overflow) are remembered apart: they are not states.
//
// Paho MQTT C++ 1.2.0 / C 1.3.12 facts that shaped this (see tests/integration):
// - Inbound goes through set_message_callback into our own bounded queue. The consume
//   queue cannot be bounded from async_client (its queue is private, no capacity setter),
//   and a bounded thread_queue::put() would block the library's only thread; set_callback
//   has a lock-order problem in this version.
// - No persistence object: the client writes nothing, least of all into the working
//   directory (tested). The outbox is the only buffer; it lives in memory.
// - A connect fails (throws from its token) while the broker is down; automatic reconnect
//   retries a failed first connect only about 4 s later. It is off: the sender thread
//   retries every connect on its own back-off.
// - A QoS 1 publish whose socket write fails as the connection dies stays in the C
//   library's session after its topic was freed, and is resent on reconnect (use after
//   free, found by ASan). Hence a fresh client per connection instead of a reconnect.
// - The library's default buffer of 100 messages also counts messages in flight (error
//   -12): max buffered messages and max in flight are set to max_in_flight + 16.
// - Clean session is off, so the broker keeps the subscriptions and queues QoS 1 messages
//   for the client id while the link is away. What the link sent and was not acknowledged
//   is resent from the outbox, so a subscriber may see a duplicate, never a gap.
// - ssl_options::set_error_handler is unusable: connect() takes its options by value and
//   the C library keeps a pointer to the handler inside that copy (use after scope, found
//   by ASan). A failed TLS connect is explained by probing the TCP port instead.
// - Host-name verification is ssl_options::set_verify(true), separate from
//   set_enable_server_cert_auth(true); both are on.
// - Destroying the client without a DISCONNECT would suppress the will too, so the
//   destructor publishes offline_will_payload itself (see ~mqtt_link).
#include <array>
#include <chrono>
#include <cstddef>
#include <cstdint>
#include <functional>
#include <memory>
#include <string>
#include <vector>

#include "dewmargin/config.h"
#include "dewmargin/engine_output.h"
#include "dewmargin/inbound_queue.h"
#include "dewmargin/outbox.h"
#include "dewmargin/result.h"

namespace dewmargin {

enum class link_report_level { info, warning, error };

struct mqtt_link_options {
  broker_config broker;                         // uri tcp://, mqtt://, ssl:// or mqtts://; client_id required
  std::string status_topic;                     // <prefix>/status; empty: no will, no status
  std::string online_payload;                   // retained on status_topic after each subscribe
  std::string offline_will_payload;             // the Last Will, retained, QoS 1
  std::vector<std::string> subscriptions;       // topic filters, subscribed at QoS 1
  std::vector<std::string> must_keep_prefixes;  // inbound topics never dropped ("<prefix>/cmd/")
  std::size_t inbound_capacity = 10000;         // messages
  std::size_t outbox_capacity = 10000;          // events and alarm events; states and commands: one per topic
  // After a call of next_batch() that returned messages, the next call first lets up to this
  // long pass, so that at high rates the worker takes messages in bursts instead of being
  // woken once per message (a wake costs more than handling a reading). The delay it adds
  // to a reading is at most this, and only while messages keep coming.
  std::chrono::microseconds inbound_gather{1000};
  std::size_t max_in_flight = 64;         // about 100 QoS 1 in flight gives Paho error -12
  std::chrono::seconds reconnect_min{1};  // back-off bounds; the library counts whole seconds
  std::chrono::seconds reconnect_max{30};
  std::chrono::seconds connect_timeout{10};
  std::function<void(link_report_level, const std::string&)> report;  // may be empty
};

struct mqtt_link_stats {
  std::uint64_t received = 0;            // inbound messages from the broker
  std::uint64_t dropped_inbound = 0;     // lost to inbound overflow
  std::uint64_t kept_over_capacity = 0;  // must-keep inbound messages queued past the capacity
  std::uint64_t published = 0;           // outbox sends accepted by the library (resends included)
  std::uint64_t delivered = 0;           // outbox entries acknowledged by the broker
  std::uint64_t send_failures = 0;       // sends the library refused or failed (sent again later)
  std::uint64_t rejected = 0;            // messages refused for good (invalid topic)
  std::array<std::uint64_t, k_message_class_count> dropped_outbox{};  // by class_index(message_class)
  std::uint64_t superseded = 0;   // keyed messages replaced by a newer one (not a loss)
  std::uint64_t connections = 0;  // successful connects, the first included
  std::uint64_t reconnects = 0;   // connections after the first
  std::uint64_t connection_losses = 0;
  std::size_t inbound_queued = 0;
  std::size_t outbox_size = 0;
  std::size_t outbox_in_flight = 0;

  [[nodiscard]] std::uint64_t dropped_outbox_of(message_class cls) const { return dropped_outbox[class_index(cls)]; }
};

class mqtt_link {
 public:
  // Validates the options, reads the password file and creates the client; nothing
  // touches the network yet. Errors name the field and, for files, the path.
  [[nodiscard]] static result<mqtt_link> create(mqtt_link_options options);

  mqtt_link(mqtt_link&&) noexcept;
  mqtt_link& operator=(mqtt_link&&) noexcept;
  mqtt_link(const mqtt_link&) = delete;
  mqtt_link& operator=(const mqtt_link&) = delete;
  // Without a prior shutdown(): shutdown(offline_will_payload, 1 s), so the retained
  // status does not stay "online" (the destructor's DISCONNECT would suppress the will).
  ~mqtt_link();

  // Starts the sender thread, which connects in the background. Returns at once.
  void start();

  // Worker thread: waits up to timeout for the next inbound message.
  bool next_message(inbound_message& out, std::chrono::milliseconds timeout);

  // Worker thread: waits up to timeout for inbound messages and appends up to max_messages
  // of them to out, in arrival order (see inbound_gather). Returns how many.
  std::size_t next_batch(std::vector<inbound_message>& out, std::size_t max_messages,
                         std::chrono::milliseconds timeout);

  // Queues a message for QoS 1 delivery. Never blocks on the network. A topic that is
  // empty or holds a wildcard is refused (reported, counted in `rejected`).
  void publish(outbound_message message);

  [[nodiscard]] bool connected() const;
  // Connected, subscribed (acknowledged) on the current connection and online published.
  [[nodiscard]] bool ready() const;
  // Why the last connect attempt failed; empty once connected.
  [[nodiscard]] std::string last_connect_error() const;
  [[nodiscard]] mqtt_link_stats stats() const;

  // Publishes final_status_payload retained on status_topic (unless empty), waits up to
  // timeout for the outbox to drain, then disconnects (only if connected), stops the
  // sender thread and destroys the client. Idempotent; the link is dead afterwards.
  void shutdown(const std::string& final_status_payload, std::chrono::milliseconds timeout);

 private:
  struct impl;
  explicit mqtt_link(std::unique_ptr<impl> state);
  std::unique_ptr<impl> impl_;
};

}  // namespace dewmargin
