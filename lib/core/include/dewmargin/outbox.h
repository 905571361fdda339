#pragma once
// Outbound messages held until the broker has acknowledged them (QoS 1 PUBACK).
//
// QoS 1 alone loses what is published while the link is down or just before the
// client notices the loss, so every message stays here until its delivery completes.
// The outbox is pure bookkeeping: no clock, no threads, no I/O; the MQTT link drives it.
//
// Rules:
// - Order: entries are sent oldest first (ids increase with every push).
// - Keyed entries: `state` and `command` messages are keyed by topic; only the latest
//   matters. A newer one replaces a waiting (pending) older one and takes its place at the
//   end of the queue, so the order subscribers see still follows the order of the core.
//   If the older one is already in flight it is left alone, but marked superseded: should
//   its send fail it is discarded instead of being sent again.
// - Keyed entries are never dropped for lack of room and do not count against the
//   capacity: there is at most one waiting entry per topic (the newest), so their number is
//   bounded by the number of distinct keyed topics, which the config fixes (one state per
//   zone, loop and unit, one command topic per valve, setpoint and request, the status),
//   plus the superseded ones still in flight (at most max_in_flight). Size therefore stays
//   within keyed topics + capacity + max_in_flight whatever the traffic.
// - Capacity (in unkeyed messages, `event` and `alarm_event`, pending and in flight
//   together). When it is reached, one pending unkeyed entry is dropped to make room,
//   chosen by class, least important first, oldest first:
//     1. event       — history; the store keeps the event log anyway.
//     2. alarm_event — dropped only when no event is left.
//   The incoming message competes on the same terms: it is dropped itself (push returns
//   nullopt) when every pending unkeyed entry ranks higher (an event meeting only alarm
//   events) or when every unkeyed entry is in flight.
//   Entries in flight are never dropped: they are on the wire and their token decides.
// - Connection loss: entries in flight return to pending at their original place.
#include <array>
#include <cstddef>
#include <cstdint>
#include <map>
#include <optional>
#include <set>
#include <string>
#include <unordered_map>
#include <vector>

#include "dewmargin/engine_output.h"

namespace dewmargin {

using outbox_id = std::uint64_t;

struct outbox_entry {
  outbox_id id = 0;
  outbound_message message;
};

inline constexpr std::size_t k_message_class_count = 4;

// Index of a class in per-class counters (alarm_event, event, state, command).
constexpr std::size_t class_index(message_class cls) { return static_cast<std::size_t>(cls); }

// True for the classes keyed by topic (state, command).
constexpr bool is_keyed(message_class cls) { return cls == message_class::state || cls == message_class::command; }

// The capacity (unkeyed entries) for a site of `zones` zones: max(10,000, 8 x zones).
// Why: at start every zone makes a burst of events before the broker may have acknowledged
// any. With its sensors reporting, a band event (unknown to a band) and a valve event; with
// its sensors silent (a feed not running, or the broker down, since the sensors publish
// through it), an input event per sensor once stale_after_s has passed, and a band and a
// valve event: five for a zone of three sensors and a valve (tests/unit/test_outbox_startup).
// Eight per zone leaves room for zones of up to six sensors. The bound costs nothing until
// used; full, it holds roughly 0.5 kB per entry (payload about 300 bytes plus bookkeeping).
[[nodiscard]] std::size_t outbox_capacity_for_zones(std::size_t zones);

class outbox {
 public:
  // capacity_messages bounds the unkeyed entries; at least 1 (a smaller value is taken as 1).
  explicit outbox(std::size_t capacity_messages);

  // Queues a message. Returns its id, or nullopt when the message (unkeyed: an event or
  // alarm event) was dropped itself because the capacity is taken by more important or
  // in-flight unkeyed entries. A keyed message always gets an id.
  std::optional<outbox_id> push(outbound_message message);

  // Marks the oldest pending entries in flight and returns copies of them, so that no
  // more than max_in_flight entries are in flight in total.
  std::vector<outbox_entry> take_next_to_send(std::size_t max_in_flight);

  // The broker acknowledged the message: the entry is removed whatever its state
  // (a late acknowledgement of an entry already returned to pending still counts).
  // Returns false for an unknown id (already delivered, dropped or superseded).
  bool on_delivered(outbox_id id);

  // The client library refused or failed the send: back to pending at its place
  // (or discarded when superseded). Returns false unless the entry was in flight.
  bool on_send_failed(outbox_id id);

  // The client library refuses the message for good (an invalid topic): it is removed
  // and counted in rejected(). Returns false for an unknown id.
  bool on_rejected(outbox_id id);

  // Every entry in flight goes back to pending at its original place, to be sent again.
  // Returns how many went back.
  std::size_t on_connection_lost();

  // The bound of unkeyed() (keyed entries are bounded by their topics, see the rules).
  [[nodiscard]] std::size_t capacity() const { return capacity_; }
  [[nodiscard]] std::size_t size() const { return entries_.size(); }
  // Unkeyed entries (event, alarm_event), pending and in flight: never above capacity().
  [[nodiscard]] std::size_t unkeyed() const { return unkeyed_; }
  // Keyed entries (state, command), pending and in flight.
  [[nodiscard]] std::size_t keyed() const { return entries_.size() - unkeyed_; }
  [[nodiscard]] std::size_t pending() const { return pending_.size(); }
  [[nodiscard]] std::size_t in_flight() const { return entries_.size() - pending_.size(); }
  [[nodiscard]] bool empty() const { return entries_.empty(); }

  // Entries dropped for lack of room, per class (always 0 for the keyed classes).
  [[nodiscard]] std::uint64_t dropped(message_class cls) const { return dropped_[class_index(cls)]; }
  [[nodiscard]] std::uint64_t dropped_total() const;
  // Keyed entries replaced by a newer message for the same topic (not a loss).
  [[nodiscard]] std::uint64_t superseded() const { return superseded_; }
  [[nodiscard]] std::uint64_t delivered() const { return delivered_; }
  [[nodiscard]] std::uint64_t rejected() const { return rejected_; }

  // Copies of the pending entries in sending order (for tests and diagnostics).
  [[nodiscard]] std::vector<outbox_entry> pending_entries() const;

 private:
  struct slot {
    outbound_message message;
    bool in_flight = false;
    bool superseded = false;  // a newer keyed message for the same topic was pushed meanwhile
  };
  using slot_map = std::map<outbox_id, slot>;

  void erase(slot_map::iterator it);
  void mark_pending(outbox_id id, const slot& s);
  void unmark_pending(outbox_id id, const slot& s);
  // The pending entry to drop for an incoming message of class incoming, or nullopt
  // when the incoming message itself is the one to drop.
  [[nodiscard]] std::optional<outbox_id> choose_victim(message_class incoming) const;
  bool return_to_pending(slot_map::iterator it);

  std::size_t capacity_;
  std::size_t unkeyed_ = 0;  // entries of the unkeyed classes, pending and in flight
  outbox_id next_id_ = 1;
  slot_map entries_;
  std::set<outbox_id> pending_;  // sending order
  std::array<std::set<outbox_id>, k_message_class_count> pending_by_class_;
  std::unordered_map<std::string, outbox_id> newest_keyed_;  // topic -> newest keyed entry
  std::array<std::uint64_t, k_message_class_count> dropped_{};
  std::uint64_t superseded_ = 0;
  std::uint64_t delivered_ = 0;
  std::uint64_t rejected_ = 0;
};

}  // namespace dewmargin
