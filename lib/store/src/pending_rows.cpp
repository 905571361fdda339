#include "pending_rows.h"

#include <algorithm>
#include <iterator>
#include <utility>

namespace dewmargin::store_detail {
namespace {

// `older` goes in front of `newer`; the result is left in `newer`.
template <typename T>
void put_in_front(std::deque<T>& older, std::deque<T>& newer) {
  older.insert(older.end(), std::make_move_iterator(newer.begin()), std::make_move_iterator(newer.end()));
  newer.swap(older);
  older.clear();
}

template <typename T>
std::size_t drop_front(std::deque<T>& rows, std::size_t wanted) {
  const std::size_t n = std::min(wanted, rows.size());
  rows.erase(rows.begin(), rows.begin() + static_cast<std::ptrdiff_t>(n));
  return n;
}

}  // namespace

bool is_alarm_related_kind(const std::string& kind) {
  return kind == "band" || kind == "ack" || kind == "shelve" || kind == "unshelve";
}

void pending_rows::add(const engine_output& output) {
  for (const auto& e : output.events) {
    auto& list = is_alarm_related_kind(e.kind) ? alarm_events_ : other_events_;
    list.push_back(sequenced_event{next_seq_++, e});
  }
  samples_.insert(samples_.end(), output.samples.begin(), output.samples.end());
  for (const auto& z : output.zone_snapshots) zone_snapshots_.insert_or_assign(z.zone, z);
  for (const auto& l : output.loop_snapshots) loop_snapshots_.insert_or_assign(l.loop, l);
}

void pending_rows::prepend(pending_rows&& older) {
  // Sequence numbers of the newer rows must stay above the older ones: renumber the newer
  // rows after the older list's last number.
  std::uint64_t seq = older.next_seq_;
  auto renumber = [&seq](std::deque<sequenced_event>& a, std::deque<sequenced_event>& b) {
    // Merge-walk a and b in their current order and give them increasing numbers from `seq`.
    auto ia = a.begin();
    auto ib = b.begin();
    while (ia != a.end() || ib != b.end()) {
      if (ib == b.end() || (ia != a.end() && ia->seq < ib->seq)) {
        (ia++)->seq = seq++;
      } else {
        (ib++)->seq = seq++;
      }
    }
  };
  renumber(alarm_events_, other_events_);
  next_seq_ = seq;
  put_in_front(older.alarm_events_, alarm_events_);
  put_in_front(older.other_events_, other_events_);
  put_in_front(older.samples_, samples_);
  for (auto& [zone, snapshot] : older.zone_snapshots_) zone_snapshots_.try_emplace(zone, std::move(snapshot));
  for (auto& [loop, snapshot] : older.loop_snapshots_) loop_snapshots_.try_emplace(loop, std::move(snapshot));
  older = pending_rows{};
}

std::size_t pending_rows::enforce_limit(std::size_t max_rows) {
  const std::size_t rows = size();
  if (rows <= max_rows) return 0;
  std::size_t excess = rows - max_rows;
  std::size_t dropped = drop_front(samples_, excess);
  dropped += drop_front(other_events_, excess - dropped);
  dropped += drop_front(alarm_events_, excess - dropped);
  return dropped;
}

}  // namespace dewmargin::store_detail
