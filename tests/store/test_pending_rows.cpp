// The writer's in-memory pending list: order, coalescing and the overflow policy.
#include "pending_rows.h"
#include "store_test_support.h"

namespace dewmargin {
namespace {

using store_detail::is_alarm_related_kind;
using store_detail::pending_rows;
using store_test::k_t0_ms;
using store_test::make_event;
using store_test::make_sample;

std::vector<std::string> event_kinds(const pending_rows& p) {
  std::vector<std::string> kinds;
  p.for_each_event(
      [&](const event_record& e) { kinds.push_back(e.kind + "@" + std::to_string(to_unix_ms(e.ts) - k_t0_ms)); });
  return kinds;
}

engine_output events_of(std::initializer_list<std::pair<const char*, int>> kind_and_offset_ms) {
  engine_output out;
  for (const auto& [kind, offset] : kind_and_offset_ms) out.events.push_back(make_event(k_t0_ms + offset, "z1", kind));
  return out;
}

TEST(PendingRows, AlarmRelatedKindsAreBandAckShelveUnshelve) {
  for (const char* kind : {"band", "ack", "shelve", "unshelve"}) EXPECT_TRUE(is_alarm_related_kind(kind)) << kind;
  for (const char* kind : {"valve", "setpoint", "dehumidify", "input", "rejected", "service"}) {
    EXPECT_FALSE(is_alarm_related_kind(kind)) << kind;
  }
}

TEST(PendingRows, KeepsArrivalOrderAcrossKinds) {
  pending_rows p;
  p.add(events_of({{"band", 1}, {"valve", 2}, {"ack", 3}}));
  p.add(events_of({{"setpoint", 4}, {"shelve", 5}}));
  EXPECT_EQ(event_kinds(p), (std::vector<std::string>{"band@1", "valve@2", "ack@3", "setpoint@4", "shelve@5"}));
  EXPECT_EQ(p.size(), 5u);
}

TEST(PendingRows, DropsOldestSamplesFirstThenOtherEventsThenAlarmEvents) {
  struct drop_case {
    std::size_t limit;
    std::size_t dropped;
    std::size_t samples_left;
    std::vector<std::string> events_left;
  };
  // 2 band + 2 valve events and 3 samples = 7 rows.
  const drop_case cases[] = {
      {7, 0, 3, {"band@1", "valve@2", "band@3", "valve@4"}},
      {5, 2, 1, {"band@1", "valve@2", "band@3", "valve@4"}},
      {4, 3, 0, {"band@1", "valve@2", "band@3", "valve@4"}},
      {3, 4, 0, {"band@1", "band@3", "valve@4"}},
      {2, 5, 0, {"band@1", "band@3"}},
      {1, 6, 0, {"band@3"}},
  };
  for (const auto& c : cases) {
    pending_rows p;
    engine_output out = events_of({{"band", 1}, {"valve", 2}, {"band", 3}, {"valve", 4}});
    for (int m = 0; m < 3; ++m) out.samples.push_back(make_sample(k_t0_ms + m * 60'000, "z1", 1.0 + m));
    p.add(out);
    EXPECT_EQ(p.enforce_limit(c.limit), c.dropped) << "limit " << c.limit;
    EXPECT_EQ(p.samples().size(), c.samples_left) << "limit " << c.limit;
    EXPECT_EQ(event_kinds(p), c.events_left) << "limit " << c.limit;
    if (!p.samples().empty()) {
      EXPECT_EQ(p.samples().back().min_margin_k, 3.0) << "the newest sample stays";
    }
  }
}

TEST(PendingRows, CoalescesSnapshotsToTheLatestAndNeverDropsThem) {
  pending_rows p;
  engine_output a;
  a.zone_snapshots.push_back(zone_snapshot{"z1", "alarm", true, false, std::nullopt, "closed", from_unix_ms(k_t0_ms)});
  a.loop_snapshots.push_back(loop_snapshot{"loop-a", 17.0, from_unix_ms(k_t0_ms)});
  p.add(a);
  engine_output b;
  b.zone_snapshots.push_back(
      zone_snapshot{"z1", "alarm", true, true, std::nullopt, "closed", from_unix_ms(k_t0_ms + 1)});
  b.zone_snapshots.push_back(zone_snapshot{"z2", "safe", false, true, std::nullopt, "open", from_unix_ms(k_t0_ms + 1)});
  p.add(b);
  ASSERT_EQ(p.zone_snapshots().size(), 2u);
  EXPECT_TRUE(p.zone_snapshots().at("z1").acknowledged) << "the later snapshot replaced the earlier";
  EXPECT_EQ(p.enforce_limit(0), 0u) << "snapshots are never dropped";
  EXPECT_EQ(p.size(), 3u);
}

TEST(PendingRows, PrependPutsAFailedBatchBackInFront) {
  pending_rows failed;
  failed.add(events_of({{"valve", 1}, {"band", 2}}));
  engine_output old_state;
  old_state.zone_snapshots.push_back(
      zone_snapshot{"z1", "alarm", true, false, std::nullopt, "closed", from_unix_ms(k_t0_ms)});
  old_state.zone_snapshots.push_back(
      zone_snapshot{"z2", "safe", false, true, std::nullopt, "open", from_unix_ms(k_t0_ms)});
  old_state.samples.push_back(make_sample(k_t0_ms, "z1", 1.0));
  failed.add(old_state);

  pending_rows newer;  // what arrived while the failed commit ran
  newer.add(events_of({{"band", 3}, {"input", 4}}));
  engine_output new_state;
  new_state.zone_snapshots.push_back(
      zone_snapshot{"z1", "alarm", true, true, std::nullopt, "closed", from_unix_ms(k_t0_ms + 9)});
  new_state.samples.push_back(make_sample(k_t0_ms + 60'000, "z1", 2.0));
  newer.add(new_state);

  newer.prepend(std::move(failed));
  EXPECT_EQ(event_kinds(newer), (std::vector<std::string>{"valve@1", "band@2", "band@3", "input@4"}));
  ASSERT_EQ(newer.samples().size(), 2u);
  EXPECT_EQ(newer.samples().front().min_margin_k, 1.0);
  EXPECT_TRUE(newer.zone_snapshots().at("z1").acknowledged) << "the newer snapshot wins over the failed one";
  EXPECT_EQ(newer.zone_snapshots().count("z2"), 1u) << "a snapshot only the failed batch had is kept";

  // Later additions still come after everything that is there.
  newer.add(events_of({{"ack", 5}}));
  EXPECT_EQ(event_kinds(newer).back(), "ack@5");
  // And the overflow policy still sees the oldest first.
  EXPECT_EQ(newer.enforce_limit(newer.size() - 3), 3u);
  EXPECT_EQ(event_kinds(newer), (std::vector<std::string>{"band@2", "band@3", "input@4", "ack@5"}))
      << "the two samples went first, then the oldest non-alarm event (valve@1)";
}

}  // namespace
}  // namespace dewmargin
