#include "dewmargin/inbound_queue.h"

#include <algorithm>

namespace dewmargin {

inbound_queue::inbound_queue(std::size_t capacity_messages, std::vector<std::string> must_keep_prefixes)
    : capacity_(std::max<std::size_t>(capacity_messages, 1)), must_keep_prefixes_(std::move(must_keep_prefixes)) {}

bool inbound_queue::must_keep(const std::string& topic) const {
  return std::any_of(must_keep_prefixes_.begin(), must_keep_prefixes_.end(),
                     [&](const std::string& prefix) { return topic.compare(0, prefix.size(), prefix) == 0; });
}

bool inbound_queue::push(inbound_message message) {
  const bool keep = must_keep(message.topic);
  bool lost = false;
  {
    std::lock_guard<std::mutex> lock(mutex_);
    ++counters_.received;
    if (size_locked() >= capacity_) {
      if (!droppable_.empty()) {
        droppable_.pop_front();
        ++counters_.dropped;
        lost = true;
      } else if (keep) {
        ++counters_.kept_over_capacity;
      } else {
        ++counters_.dropped;  // only must-keep messages queued: the newcomer goes
        return true;
      }
    }
    (keep ? kept_ : droppable_).push_back(numbered{next_seq_++, std::move(message)});
  }
  not_empty_.notify_one();
  return lost;
}

bool inbound_queue::pop(inbound_message& out, std::chrono::milliseconds timeout) {
  std::unique_lock<std::mutex> lock(mutex_);
  if (!not_empty_.wait_for(lock, timeout, [&] { return size_locked() > 0; })) {
    return false;
  }
  take_front_locked(out);
  return true;
}

std::size_t inbound_queue::pop_batch(std::vector<inbound_message>& out, std::size_t max_messages,
                                     std::chrono::milliseconds timeout) {
  std::unique_lock<std::mutex> lock(mutex_);
  if (timeout.count() > 0) {
    (void)not_empty_.wait_for(lock, timeout, [&] { return size_locked() > 0; });
  }
  std::size_t moved = 0;
  for (; moved < max_messages && size_locked() > 0; ++moved) {
    out.emplace_back();
    take_front_locked(out.back());
  }
  return moved;
}

void inbound_queue::take_front_locked(inbound_message& out) {
  const bool from_kept = droppable_.empty() || (!kept_.empty() && kept_.front().seq < droppable_.front().seq);
  auto& lane = from_kept ? kept_ : droppable_;
  out = std::move(lane.front().message);
  lane.pop_front();
}

inbound_queue_counters inbound_queue::counters() const {
  std::lock_guard<std::mutex> lock(mutex_);
  inbound_queue_counters c = counters_;
  c.queued = size_locked();
  return c;
}

}  // namespace dewmargin
