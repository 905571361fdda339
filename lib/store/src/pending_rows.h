#pragma once
// Internal: the writer's in-memory list of rows waiting for a commit, with the overflow policy.
// Pure data structure (no SQLite, no locking): the writer guards it with its mutex.
#include <cstddef>
#include <cstdint>
#include <deque>
#include <map>
#include <string>

#include "dewmargin/engine_output.h"

namespace dewmargin::store_detail {

// Alarm-related events (kept longest when the list overflows): band changes, ack, shelve, unshelve.
[[nodiscard]] bool is_alarm_related_kind(const std::string& kind);

class pending_rows {
 public:
  struct sequenced_event {
    std::uint64_t seq;  // arrival order across both event lists, so the insert order is kept
    event_record event;
  };

  // Copies the output's events, samples and snapshots (a later snapshot of the same id replaces
  // an earlier one: only the latest is stored).
  void add(const engine_output& output);

  // Puts rows taken earlier (a failed commit) back in front of the ones that arrived since.
  // Snapshots that arrived since are newer and win.
  void prepend(pending_rows&& older);

  // Drops rows until at most `max_rows` remain: oldest samples, then oldest events that are
  // not alarm-related, then oldest alarm-related events. Snapshots are never dropped (their
  // number is bounded by the number of zones and loops). Returns the number dropped.
  std::size_t enforce_limit(std::size_t max_rows);

  [[nodiscard]] std::size_t size() const {
    return alarm_events_.size() + other_events_.size() + samples_.size() + zone_snapshots_.size() +
           loop_snapshots_.size();
  }
  [[nodiscard]] bool empty() const { return size() == 0; }
  [[nodiscard]] std::size_t event_count() const { return alarm_events_.size() + other_events_.size(); }

  // Events in arrival order (merging the two lists by sequence number).
  template <typename Visit>
  void for_each_event(Visit&& visit) const {
    auto a = alarm_events_.begin();
    auto o = other_events_.begin();
    while (a != alarm_events_.end() || o != other_events_.end()) {
      if (o == other_events_.end() || (a != alarm_events_.end() && a->seq < o->seq)) {
        visit(a->event);
        ++a;
      } else {
        visit(o->event);
        ++o;
      }
    }
  }
  [[nodiscard]] const std::deque<zone_sample>& samples() const { return samples_; }
  [[nodiscard]] const std::map<std::string, zone_snapshot>& zone_snapshots() const { return zone_snapshots_; }
  [[nodiscard]] const std::map<std::string, loop_snapshot>& loop_snapshots() const { return loop_snapshots_; }

 private:
  std::uint64_t next_seq_ = 0;
  std::deque<sequenced_event> alarm_events_;
  std::deque<sequenced_event> other_events_;
  std::deque<zone_sample> samples_;
  std::map<std::string, zone_snapshot> zone_snapshots_;
  std::map<std::string, loop_snapshot> loop_snapshots_;
};

}  // namespace dewmargin::store_detail
