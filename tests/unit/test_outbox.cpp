#include <gtest/gtest.h>

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <ostream>
#include <string>
#include <vector>

#include "dewmargin/outbox.h"

namespace dewmargin {
namespace {

// A case is a script of operations on an outbox followed by what must hold afterwards.
// Messages are written "class:topic=payload" with class a (alarm_event), e (event),
// s (state) or c (command); the pending queue is compared as "topic=payload" in order.
enum class op_kind { push, take, deliver, fail, lost };

struct op {
  op_kind kind;
  std::string message;  // push: "s:zone/a=1"
  std::size_t n = 0;    // take: max in flight; deliver/fail: index of the push (0-based)
};

op push(std::string message) { return op{op_kind::push, std::move(message), 0}; }
op take(std::size_t max_in_flight) { return op{op_kind::take, {}, max_in_flight}; }
op deliver(std::size_t push_index) { return op{op_kind::deliver, {}, push_index}; }
op fail(std::size_t push_index) { return op{op_kind::fail, {}, push_index}; }
op lost() { return op{op_kind::lost, {}, 0}; }

struct dropped_counts {
  std::uint64_t alarm_event = 0;
  std::uint64_t event = 0;
  std::uint64_t state = 0;
  std::uint64_t command = 0;
};

struct outbox_case {
  const char* name;
  std::size_t capacity;
  std::vector<op> script;
  std::vector<std::string> pending;  // "topic=payload" in sending order
  std::size_t in_flight;
  dropped_counts dropped;
  std::uint64_t superseded;
};

// Failure messages name the case instead of dumping its bytes.
void PrintTo(const outbox_case& c, std::ostream* os) { *os << c.name; }

outbound_message parse_message(const std::string& text) {
  outbound_message m;
  switch (text.at(0)) {
    case 'a':
      m.cls = message_class::alarm_event;
      break;
    case 'e':
      m.cls = message_class::event;
      break;
    case 's':
      m.cls = message_class::state;
      break;
    case 'c':
      m.cls = message_class::command;
      break;
    default:
      ADD_FAILURE() << "bad class in " << text;
  }
  const auto eq = text.find('=');
  m.topic = text.substr(2, eq - 2);
  m.payload = text.substr(eq + 1);
  m.retained = is_keyed(m.cls);
  return m;
}

std::vector<std::string> describe(const std::vector<outbox_entry>& entries) {
  std::vector<std::string> out;
  for (const auto& e : entries) {
    out.push_back(e.message.topic + "=" + e.message.payload);
  }
  return out;
}

class OutboxScript : public ::testing::TestWithParam<outbox_case> {};

TEST_P(OutboxScript, EndsInExpectedState) {
  const outbox_case& c = GetParam();
  outbox box(c.capacity);
  std::vector<std::optional<outbox_id>> ids;
  for (const op& o : c.script) {
    switch (o.kind) {
      case op_kind::push:
        ids.push_back(box.push(parse_message(o.message)));
        break;
      case op_kind::take:
        (void)box.take_next_to_send(o.n);
        break;
      case op_kind::deliver:
        ASSERT_TRUE(ids.at(o.n).has_value()) << "push " << o.n << " was dropped";
        (void)box.on_delivered(*ids.at(o.n));
        break;
      case op_kind::fail:
        ASSERT_TRUE(ids.at(o.n).has_value()) << "push " << o.n << " was dropped";
        (void)box.on_send_failed(*ids.at(o.n));
        break;
      case op_kind::lost:
        (void)box.on_connection_lost();
        break;
    }
  }
  EXPECT_EQ(describe(box.pending_entries()), c.pending);
  EXPECT_EQ(box.in_flight(), c.in_flight);
  EXPECT_EQ(box.size(), c.pending.size() + c.in_flight);
  EXPECT_LE(box.unkeyed(), box.capacity());
  EXPECT_EQ(box.dropped(message_class::alarm_event), c.dropped.alarm_event);
  EXPECT_EQ(box.dropped(message_class::event), c.dropped.event);
  EXPECT_EQ(box.dropped(message_class::state), c.dropped.state);
  EXPECT_EQ(box.dropped(message_class::command), c.dropped.command);
  EXPECT_EQ(box.superseded(), c.superseded);
}

// clang-format off
INSTANTIATE_TEST_SUITE_P(Cases, OutboxScript, ::testing::Values(
    outbox_case{"KeepsPushOrder", 10,
                {push("e:ev=1"), push("s:z/a=1"), push("a:ev=2"), push("c:v/a=open")},
                {"ev=1", "z/a=1", "ev=2", "v/a=open"}, 0, {}, 0},
    outbox_case{"NewerStateReplacesWaitingOneAtTheEnd", 10,
                {push("s:z/a=1"), push("e:ev=1"), push("s:z/a=2")},
                {"ev=1", "z/a=2"}, 0, {}, 1},
    outbox_case{"NewerCommandReplacesWaitingOne", 10,
                {push("c:v/a=open"), push("c:v/b=open"), push("c:v/a=closed")},
                {"v/b=open", "v/a=closed"}, 0, {}, 1},
    outbox_case{"EventsAreNeverKeyed", 10,
                {push("e:ev=1"), push("e:ev=2"), push("a:al=1"), push("a:al=2")},
                {"ev=1", "ev=2", "al=1", "al=2"}, 0, {}, 0},
    outbox_case{"StateInFlightIsNotReplacedButNewerQueued", 10,
                {push("s:z/a=1"), take(5), push("s:z/a=2")},
                {"z/a=2"}, 1, {}, 0},
    outbox_case{"SupersededInFlightStateIsNotResentAfterLoss", 10,
                {push("s:z/a=1"), push("e:ev=1"), take(5), push("s:z/a=2"), lost()},
                {"ev=1", "z/a=2"}, 0, {}, 1},
    outbox_case{"SupersededInFlightStateIsDiscardedOnSendFailure", 10,
                {push("s:z/a=1"), take(5), push("s:z/a=2"), fail(0)},
                {"z/a=2"}, 0, {}, 1},
    outbox_case{"LateDeliveryOfSupersededStateKeepsNewer", 10,
                {push("s:z/a=1"), take(5), push("s:z/a=2"), deliver(0)},
                {"z/a=2"}, 0, {}, 0},
    outbox_case{"DeliveredStateFreesItsKey", 10,
                {push("s:z/a=1"), take(5), deliver(0), push("s:z/a=2"), push("s:z/a=3")},
                {"z/a=3"}, 0, {}, 1},
    outbox_case{"TakeRespectsInFlightCap", 10,
                {push("e:ev=1"), push("e:ev=2"), push("e:ev=3"), take(2)},
                {"ev=3"}, 2, {}, 0},
    outbox_case{"TakeCountsEntriesAlreadyInFlight", 10,
                {push("e:ev=1"), push("e:ev=2"), push("e:ev=3"), take(1), take(2)},
                {"ev=3"}, 2, {}, 0},
    outbox_case{"DeliveryRemovesEntry", 10,
                {push("e:ev=1"), push("e:ev=2"), take(5), deliver(0)},
                {}, 1, {}, 0},
    outbox_case{"LostReturnsInFlightInOriginalOrder", 10,
                {push("e:ev=1"), push("e:ev=2"), push("e:ev=3"), take(2), push("e:ev=4"), lost()},
                {"ev=1", "ev=2", "ev=3", "ev=4"}, 0, {}, 0},
    outbox_case{"LostAfterPartialDeliveryKeepsTheRest", 10,
                {push("e:ev=1"), push("e:ev=2"), push("e:ev=3"), take(3), deliver(1), lost()},
                {"ev=1", "ev=3"}, 0, {}, 0},
    outbox_case{"SendFailureReturnsOneEntryToItsPlace", 10,
                {push("e:ev=1"), push("e:ev=2"), push("e:ev=3"), take(3), fail(1)},
                {"ev=2"}, 2, {}, 0},
    outbox_case{"LateDeliveryAfterLossStillRemoves", 10,
                {push("e:ev=1"), push("e:ev=2"), take(2), lost(), deliver(0)},
                {"ev=2"}, 0, {}, 0},
    outbox_case{"FullDropsOldestEventFirst", 2,
                {push("e:ev=1"), push("s:z/a=1"), push("e:ev=2"), push("e:ev=3")},
                {"z/a=1", "ev=2", "ev=3"}, 0, {0, 1, 0, 0}, 0},
    outbox_case{"FullOfEventsDropsOldestEventForAlarm", 2,
                {push("e:ev=1"), push("e:ev=2"), push("a:al=1")},
                {"ev=2", "al=1"}, 0, {0, 1, 0, 0}, 0},
    outbox_case{"KeyedEntriesDoNotCountAgainstCapacity", 1,
                {push("a:al=1"), push("s:z/a=1"), push("c:v/a=open"), push("s:z/b=1")},
                {"al=1", "z/a=1", "v/a=open", "z/b=1"}, 0, {}, 0},
    outbox_case{"FullOfAlarmsKeepsCommandsAndDropsOldestAlarm", 2,
                {push("a:al=1"), push("c:v/a=open"), push("a:al=2"), push("a:al=3")},
                {"v/a=open", "al=2", "al=3"}, 0, {1, 0, 0, 0}, 0},
    outbox_case{"FullOfAlarmsDropsOldestAlarmForNewAlarm", 2,
                {push("a:al=1"), push("a:al=2"), push("a:al=3")},
                {"al=2", "al=3"}, 0, {1, 0, 0, 0}, 0},
    outbox_case{"FullOfAlarmsDropsIncomingEvent", 2,
                {push("a:al=1"), push("a:al=2"), push("e:ev=1")},
                {"al=1", "al=2"}, 0, {0, 1, 0, 0}, 0},
    outbox_case{"FullOfEventsStillQueuesStateAndCommand", 2,
                {push("e:ev=1"), push("e:ev=2"), push("s:z/a=1"), push("c:v/a=open")},
                {"ev=1", "ev=2", "z/a=1", "v/a=open"}, 0, {}, 0},
    outbox_case{"ReplacingWaitingStateNeedsNoRoom", 2,
                {push("e:ev=1"), push("s:z/a=1"), push("s:z/a=2")},
                {"ev=1", "z/a=2"}, 0, {}, 1},
    outbox_case{"InFlightEntriesAreNeverDropped", 2,
                {push("e:ev=1"), push("e:ev=2"), take(2), push("a:al=1")},
                {}, 2, {1, 0, 0, 0}, 0},
    outbox_case{"FullWithInFlightDropsPendingOnly", 3,
                {push("e:ev=1"), push("e:ev=2"), take(1), push("e:ev=3"), push("e:ev=4")},
                {"ev=3", "ev=4"}, 1, {0, 1, 0, 0}, 0},
    outbox_case{"InFlightEventsCountAgainstCapacity", 1,
                {push("e:ev=1"), take(1), push("e:ev=2"), push("s:z/a=1")},
                {"z/a=1"}, 1, {0, 1, 0, 0}, 0},
    outbox_case{"NewerStateAtCapacityIsQueuedAndInFlightOneDiscardedOnLoss", 1,
                {push("e:ev=1"), push("s:z/a=1"), take(2), push("s:z/a=2"), lost()},
                {"ev=1", "z/a=2"}, 0, {}, 1},
    outbox_case{"CapacityZeroIsTreatedAsOne", 0,
                {push("e:ev=1"), push("e:ev=2")},
                {"ev=2"}, 0, {0, 1, 0, 0}, 0}),
    [](const ::testing::TestParamInfo<outbox_case>& case_info) { return std::string(case_info.param.name); });
// clang-format on

TEST(Outbox, PushReturnsIncreasingIdsAndNulloptWhenDropped) {
  outbox box(1);
  const auto first = box.push(parse_message("a:al=1"));
  ASSERT_TRUE(first.has_value());
  EXPECT_FALSE(box.push(parse_message("e:ev=1")).has_value());
  const auto second = box.push(parse_message("a:al=2"));
  ASSERT_TRUE(second.has_value());
  EXPECT_GT(*second, *first);
}

TEST(Outbox, TakeReturnsCopiesWithIdsInOrder) {
  outbox box(10);
  const auto a = box.push(parse_message("e:ev=1"));
  const auto b = box.push(parse_message("s:z/a=1"));
  const auto taken = box.take_next_to_send(64);
  ASSERT_EQ(taken.size(), 2U);
  EXPECT_EQ(taken[0].id, *a);
  EXPECT_EQ(taken[1].id, *b);
  EXPECT_EQ(taken[1].message.cls, message_class::state);
  EXPECT_TRUE(taken[1].message.retained);
  EXPECT_TRUE(box.take_next_to_send(64).empty());
}

TEST(Outbox, CallbacksReportWhetherTheyChangedAnything) {
  outbox box(10);
  const auto a = box.push(parse_message("e:ev=1"));
  EXPECT_FALSE(box.on_send_failed(*a)) << "pending, not in flight";
  (void)box.take_next_to_send(1);
  EXPECT_TRUE(box.on_send_failed(*a));
  (void)box.take_next_to_send(1);
  EXPECT_EQ(box.on_connection_lost(), 1U);
  EXPECT_TRUE(box.on_delivered(*a));
  EXPECT_FALSE(box.on_delivered(*a)) << "second acknowledgement of the same entry";
  EXPECT_FALSE(box.on_delivered(12345));
  EXPECT_EQ(box.delivered(), 1U);
  EXPECT_TRUE(box.empty());
}

TEST(Outbox, RejectedEntryIsRemovedAndCountedApart) {
  outbox box(10);
  const auto a = box.push(parse_message("s:z/a=1"));
  (void)box.take_next_to_send(1);
  EXPECT_TRUE(box.on_rejected(*a));
  EXPECT_FALSE(box.on_rejected(*a));
  EXPECT_EQ(box.rejected(), 1U);
  EXPECT_EQ(box.delivered(), 0U);
  EXPECT_EQ(box.dropped_total(), 0U);
  EXPECT_TRUE(box.empty());
  // The key is free again: a new state for the topic is queued, not a replacement.
  (void)box.push(parse_message("s:z/a=2"));
  EXPECT_EQ(box.superseded(), 0U);
  EXPECT_EQ(box.pending(), 1U);
}

TEST(Outbox, CountsDropsPerClassUnderSustainedOverflow) {
  outbox box(100);
  for (int i = 0; i < 100; ++i) {
    (void)box.push(parse_message("a:al=" + std::to_string(i)));
  }
  for (int i = 0; i < 1000; ++i) {
    (void)box.push(parse_message("e:ev=" + std::to_string(i)));
  }
  EXPECT_EQ(box.size(), 100U);
  EXPECT_EQ(box.dropped(message_class::event), 1000U);
  EXPECT_EQ(box.dropped(message_class::alarm_event), 0U);
  EXPECT_EQ(box.dropped_total(), 1000U);
}

// Retained states are last-value-wins: a burst of them is coalesced by topic, never dropped,
// however small the capacity for events is.
TEST(Outbox, CoalescesKeyedBurstByTopicWithoutDrops) {
  constexpr int k_topics = 10'000;
  outbox box(100);
  for (int round = 0; round < 2; ++round) {
    for (int t = 0; t < k_topics; ++t) {
      const char cls = t % 2 == 0 ? 's' : 'c';
      ASSERT_TRUE(
          box.push(parse_message(std::string(1, cls) + ":zone/" + std::to_string(t) + "=" + std::to_string(round)))
              .has_value());
    }
  }
  EXPECT_EQ(box.dropped_total(), 0U);
  EXPECT_EQ(box.size(), static_cast<std::size_t>(k_topics));
  EXPECT_EQ(box.keyed(), static_cast<std::size_t>(k_topics));
  EXPECT_EQ(box.superseded(), static_cast<std::uint64_t>(k_topics));
  const std::vector<outbox_entry> pending = box.pending_entries();
  ASSERT_EQ(pending.size(), static_cast<std::size_t>(k_topics));
  EXPECT_EQ(pending.front().message.topic, "zone/0");
  EXPECT_EQ(pending.front().message.payload, "1") << "the newest value of each topic is kept";
  EXPECT_EQ(pending.back().message.topic, "zone/9999");
}

// Among keyed traffic the events stay bounded, dropped event first, alarm event last.
TEST(Outbox, BoundsEventsAmidKeyedTrafficInDropOrder) {
  outbox box(100);
  for (int t = 0; t < 1000; ++t) (void)box.push(parse_message("s:zone/" + std::to_string(t) + "=1"));
  for (int i = 0; i < 40; ++i) (void)box.push(parse_message("a:al=" + std::to_string(i)));
  for (int i = 0; i < 500; ++i) (void)box.push(parse_message("e:ev=" + std::to_string(i)));
  EXPECT_EQ(box.unkeyed(), 100U);
  EXPECT_EQ(box.keyed(), 1000U);
  // 40 alarms and the newest 60 events are left: 440 events dropped, the oldest first.
  EXPECT_EQ(box.dropped(message_class::event), 440U);
  EXPECT_EQ(box.dropped(message_class::alarm_event), 0U);
  std::vector<std::string> events_left;
  for (const outbox_entry& e : box.pending_entries()) {
    if (e.message.cls == message_class::event) events_left.push_back(e.message.payload);
  }
  ASSERT_EQ(events_left.size(), 60U);
  EXPECT_EQ(events_left.front(), "440");
  EXPECT_EQ(events_left.back(), "499");

  // Alarm events push out the remaining events, then the oldest alarm events.
  for (int i = 40; i < 200; ++i) (void)box.push(parse_message("a:al=" + std::to_string(i)));
  EXPECT_EQ(box.unkeyed(), 100U);
  EXPECT_EQ(box.dropped(message_class::event), 500U);
  EXPECT_EQ(box.dropped(message_class::alarm_event), 100U);
  EXPECT_EQ(box.pending_entries().back().message.payload, "199");
  // An event meeting only alarm events is the one dropped.
  EXPECT_FALSE(box.push(parse_message("e:ev=late")).has_value());
  EXPECT_EQ(box.dropped(message_class::event), 501U);
  EXPECT_EQ(box.dropped(message_class::state), 0U);
  EXPECT_EQ(box.dropped(message_class::command), 0U);
  EXPECT_EQ(box.keyed(), 1000U);
}

// Memory: whatever the traffic (sends, deliveries, failures, connection losses), the size
// stays within keyed topics + capacity + max_in_flight (superseded keyed entries in flight).
TEST(Outbox, SizeStaysWithinTopicsPlusCapacityUnderMixedTraffic) {
  constexpr std::size_t k_topics = 100;
  constexpr std::size_t k_capacity = 50;
  constexpr std::size_t k_max_in_flight = 16;
  outbox box(k_capacity);
  std::uint32_t seed = 12345;  // a fixed linear congruential sequence: the same run every time
  const auto next = [&seed](std::uint32_t bound) {
    seed = seed * 1664525U + 1013904223U;
    return (seed >> 8) % bound;
  };
  std::vector<outbox_id> in_flight;
  std::size_t largest = 0;
  for (int step = 0; step < 100'000; ++step) {
    const std::uint32_t what = next(100);
    if (what < 70) {
      const std::uint32_t cls = next(4);
      const std::string topic = "t/" + std::to_string(next(static_cast<std::uint32_t>(k_topics)));
      (void)box.push(parse_message(std::string(1, "aesc"[cls]) + ":" + topic + "=" + std::to_string(step)));
    } else if (what < 85) {
      for (const outbox_entry& e : box.take_next_to_send(k_max_in_flight)) in_flight.push_back(e.id);
    } else if (what < 97) {
      if (!in_flight.empty()) {
        const std::size_t i = next(static_cast<std::uint32_t>(in_flight.size()));
        if (next(4) == 0) {
          (void)box.on_send_failed(in_flight[i]);
        } else {
          (void)box.on_delivered(in_flight[i]);
        }
        in_flight.erase(in_flight.begin() + static_cast<std::ptrdiff_t>(i));
      }
    } else {
      (void)box.on_connection_lost();
      in_flight.clear();
    }
    ASSERT_LE(box.unkeyed(), k_capacity) << "step " << step;
    ASSERT_LE(box.in_flight(), k_max_in_flight) << "step " << step;
    ASSERT_LE(box.size(), k_topics + k_capacity + k_max_in_flight) << "step " << step;
    largest = std::max(largest, box.size());
  }
  EXPECT_GT(largest, k_topics + k_capacity / 2) << "the traffic did fill the outbox well beyond the topics";
  EXPECT_EQ(box.dropped(message_class::state), 0U);
  EXPECT_EQ(box.dropped(message_class::command), 0U);
  EXPECT_GT(box.dropped(message_class::event), 0U);
}

}  // namespace
}  // namespace dewmargin
