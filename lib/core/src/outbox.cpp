#include "dewmargin/outbox.h"

#include <algorithm>
#include <utility>

namespace dewmargin {
namespace {

// Drop order when the unkeyed entries fill the capacity, least important first (see
// outbox.h). Keyed classes are not in it: they are never dropped for lack of room.
constexpr std::array<message_class, 2> k_drop_order{message_class::event, message_class::alarm_event};

// See outbox_capacity_for_zones() in outbox.h for why these numbers.
constexpr std::size_t k_min_capacity = 10'000;
constexpr std::size_t k_unkeyed_per_zone = 8;

constexpr std::size_t drop_rank(message_class cls) {
  for (std::size_t rank = 0; rank < k_drop_order.size(); ++rank) {
    if (k_drop_order[rank] == cls) {
      return rank;
    }
  }
  return k_drop_order.size();
}

}  // namespace

std::size_t outbox_capacity_for_zones(std::size_t zones) {
  return std::max(k_min_capacity, k_unkeyed_per_zone * zones);
}

outbox::outbox(std::size_t capacity_messages) : capacity_(std::max<std::size_t>(capacity_messages, 1)) {}

std::optional<outbox_id> outbox::push(outbound_message message) {
  const message_class cls = message.cls;
  const bool keyed = is_keyed(cls);

  std::optional<slot_map::iterator> older_keyed;
  if (keyed) {
    if (const auto k = newest_keyed_.find(message.topic); k != newest_keyed_.end()) {
      older_keyed = entries_.find(k->second);
    }
  }

  if (older_keyed && !(*older_keyed)->second.in_flight) {
    // Replacing a waiting entry keeps one entry per topic.
    erase(*older_keyed);
    ++superseded_;
    older_keyed.reset();
  } else if (!keyed && unkeyed_ >= capacity_) {
    const std::optional<outbox_id> victim = choose_victim(cls);
    if (!victim) {
      ++dropped_[class_index(cls)];
      return std::nullopt;
    }
    const auto it = entries_.find(*victim);
    ++dropped_[class_index(it->second.message.cls)];
    erase(it);
  }

  if (older_keyed) {
    (*older_keyed)->second.superseded = true;
  }

  const outbox_id id = next_id_++;
  std::string topic = keyed ? message.topic : std::string{};
  const auto [it, inserted] = entries_.emplace(id, slot{std::move(message), false, false});
  (void)inserted;
  mark_pending(id, it->second);
  if (keyed) {
    newest_keyed_[std::move(topic)] = id;
  } else {
    ++unkeyed_;
  }
  return id;
}

std::optional<outbox_id> outbox::choose_victim(message_class incoming) const {
  for (const message_class cls : k_drop_order) {
    if (drop_rank(cls) > drop_rank(incoming)) {
      return std::nullopt;  // everything pending ranks higher than the newcomer
    }
    const auto& ids = pending_by_class_[class_index(cls)];
    if (!ids.empty()) {
      return *ids.begin();
    }
  }
  return std::nullopt;
}

std::vector<outbox_entry> outbox::take_next_to_send(std::size_t max_in_flight) {
  std::vector<outbox_entry> taken;
  const std::size_t busy = in_flight();
  if (busy >= max_in_flight) {
    return taken;
  }
  const std::size_t count = std::min(max_in_flight - busy, pending_.size());
  taken.reserve(count);
  for (std::size_t i = 0; i < count; ++i) {
    const outbox_id id = *pending_.begin();
    slot& s = entries_.at(id);
    unmark_pending(id, s);
    s.in_flight = true;
    taken.push_back(outbox_entry{id, s.message});
  }
  return taken;
}

bool outbox::on_delivered(outbox_id id) {
  const auto it = entries_.find(id);
  if (it == entries_.end()) {
    return false;
  }
  erase(it);
  ++delivered_;
  return true;
}

bool outbox::on_send_failed(outbox_id id) {
  const auto it = entries_.find(id);
  if (it == entries_.end() || !it->second.in_flight) {
    return false;
  }
  return return_to_pending(it);
}

bool outbox::on_rejected(outbox_id id) {
  const auto it = entries_.find(id);
  if (it == entries_.end()) {
    return false;
  }
  erase(it);
  ++rejected_;
  return true;
}

std::size_t outbox::on_connection_lost() {
  std::size_t returned = 0;
  for (auto it = entries_.begin(); it != entries_.end();) {
    const auto next = std::next(it);
    if (it->second.in_flight && return_to_pending(it)) {
      ++returned;
    }
    it = next;
  }
  return returned;
}

bool outbox::return_to_pending(slot_map::iterator it) {
  if (it->second.superseded) {
    erase(it);
    ++superseded_;
    return false;
  }
  it->second.in_flight = false;
  mark_pending(it->first, it->second);
  return true;
}

std::uint64_t outbox::dropped_total() const {
  std::uint64_t total = 0;
  for (const std::uint64_t n : dropped_) {
    total += n;
  }
  return total;
}

std::vector<outbox_entry> outbox::pending_entries() const {
  std::vector<outbox_entry> out;
  out.reserve(pending_.size());
  for (const outbox_id id : pending_) {
    out.push_back(outbox_entry{id, entries_.at(id).message});
  }
  return out;
}

void outbox::erase(slot_map::iterator it) {
  const outbox_id id = it->first;
  const slot& s = it->second;
  if (!s.in_flight) {
    unmark_pending(id, s);
  }
  if (is_keyed(s.message.cls)) {
    if (const auto k = newest_keyed_.find(s.message.topic); k != newest_keyed_.end() && k->second == id) {
      newest_keyed_.erase(k);
    }
  } else {
    --unkeyed_;
  }
  entries_.erase(it);
}

void outbox::mark_pending(outbox_id id, const slot& s) {
  pending_.insert(id);
  pending_by_class_[class_index(s.message.cls)].insert(id);
}

void outbox::unmark_pending(outbox_id id, const slot& s) {
  pending_.erase(id);
  pending_by_class_[class_index(s.message.cls)].erase(id);
}

}  // namespace dewmargin
