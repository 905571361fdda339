#pragma once
// Bounded queue between the MQTT client library's callback thread (producer) and the
// service's worker thread (consumer).
//
// push() never blocks beyond a short lock: the library has one thread for all handlers,
// and a blocked handler would stall keep-alive, acknowledgements and reconnects.
// When the queue is full the oldest droppable message goes (the freshest readings are
// the useful ones), and the loss is counted. Messages whose topic starts with one of the
// must-keep prefixes (operator commands) are never dropped: they push out the oldest
// droppable message, or, when only must-keep messages are queued, go past the capacity
// (counted in kept_over_capacity).
#include <chrono>
#include <condition_variable>
#include <cstddef>
#include <cstdint>
#include <deque>
#include <mutex>
#include <string>
#include <utility>
#include <vector>

namespace dewmargin {

struct inbound_message {
  std::string topic;
  std::string payload;
  bool retained = false;  // delivered from the broker's retained store, not live
};

struct inbound_queue_counters {
  std::uint64_t received = 0;            // every push
  std::uint64_t dropped = 0;             // lost to overflow (never a must-keep message)
  std::uint64_t kept_over_capacity = 0;  // must-keep messages queued past the capacity
  std::size_t queued = 0;
};

class inbound_queue {
 public:
  // capacity_messages is at least 1 (a smaller value is taken as 1).
  inbound_queue(std::size_t capacity_messages, std::vector<std::string> must_keep_prefixes);

  // Queues the message; true when the push cost a message (dropped, this or an older one).
  bool push(inbound_message message);

  // Waits up to timeout for a message; false when none came. Messages come out in
  // arrival order.
  bool pop(inbound_message& out, std::chrono::milliseconds timeout);

  // Waits up to timeout for a message, then moves up to max_messages of those queued, in
  // arrival order, to the end of out under one lock (the consumer takes a burst at the cost
  // of one hand-over). Returns how many it moved.
  std::size_t pop_batch(std::vector<inbound_message>& out, std::size_t max_messages, std::chrono::milliseconds timeout);

  [[nodiscard]] bool must_keep(const std::string& topic) const;
  [[nodiscard]] inbound_queue_counters counters() const;

 private:
  struct numbered {
    std::uint64_t seq;
    inbound_message message;
  };

  void take_front_locked(inbound_message& out);
  [[nodiscard]] std::size_t size_locked() const { return droppable_.size() + kept_.size(); }

  const std::size_t capacity_;
  const std::vector<std::string> must_keep_prefixes_;
  mutable std::mutex mutex_;
  std::condition_variable not_empty_;
  // Two lanes merged by sequence number on pop: the oldest droppable message is then
  // always at the front of its lane, so an overflow costs O(1).
  std::deque<numbered> droppable_;
  std::deque<numbered> kept_;
  std::uint64_t next_seq_ = 0;
  inbound_queue_counters counters_;
};

}  // namespace dewmargin
