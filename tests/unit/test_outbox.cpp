#include <gtest/gtest.h>

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
  EXPECT_LE(box.size(), box.capacity());
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
    outbox_case{"FullDropsOldestEventFirst", 3,
                {push("e:ev=1"), push("s:z/a=1"), push("e:ev=2"), push("e:ev=3")},
                {"z/a=1", "ev=2", "ev=3"}, 0, {0, 1, 0, 0}, 0},
    outbox_case{"FullDropsStateWhenNoEventLeft", 3,
                {push("a:al=1"), push("s:z/a=1"), push("c:v/a=open"), push("s:z/b=1")},
                {"al=1", "v/a=open", "z/b=1"}, 0, {0, 0, 1, 0}, 0},
    outbox_case{"FullDropsCommandBeforeAlarm", 3,
                {push("a:al=1"), push("c:v/a=open"), push("a:al=2"), push("a:al=3")},
                {"al=1", "al=2", "al=3"}, 0, {0, 0, 0, 1}, 0},
    outbox_case{"FullOfAlarmsDropsOldestAlarmForNewAlarm", 2,
                {push("a:al=1"), push("a:al=2"), push("a:al=3")},
                {"al=2", "al=3"}, 0, {1, 0, 0, 0}, 0},
    outbox_case{"FullOfAlarmsDropsIncomingEvent", 2,
                {push("a:al=1"), push("a:al=2"), push("e:ev=1")},
                {"al=1", "al=2"}, 0, {0, 1, 0, 0}, 0},
    outbox_case{"FullOfCommandsDropsIncomingState", 2,
                {push("c:v/a=open"), push("c:v/b=open"), push("s:z/a=1")},
                {"v/a=open", "v/b=open"}, 0, {0, 0, 1, 0}, 0},
    outbox_case{"ReplacingWaitingStateNeedsNoRoom", 2,
                {push("e:ev=1"), push("s:z/a=1"), push("s:z/a=2")},
                {"ev=1", "z/a=2"}, 0, {}, 1},
    outbox_case{"InFlightEntriesAreNeverDropped", 2,
                {push("e:ev=1"), push("e:ev=2"), take(2), push("a:al=1")},
                {}, 2, {1, 0, 0, 0}, 0},
    outbox_case{"FullWithInFlightDropsPendingOnly", 3,
                {push("e:ev=1"), push("e:ev=2"), take(1), push("e:ev=3"), push("e:ev=4")},
                {"ev=3", "ev=4"}, 1, {0, 1, 0, 0}, 0},
    outbox_case{"DroppedIncomingStateLeavesInFlightOneIntact", 1,
                {push("s:z/a=1"), take(1), push("s:z/a=2"), lost()},
                {"z/a=1"}, 0, {0, 0, 1, 0}, 0},
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

}  // namespace
}  // namespace dewmargin
