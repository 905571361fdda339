#include <gtest/gtest.h>

#include <string>
#include <thread>
#include <vector>

#include "dewmargin/inbound_queue.h"

namespace dewmargin {
namespace {

using std::chrono::milliseconds;

std::vector<std::string> drain(inbound_queue& q) {
  std::vector<std::string> out;
  inbound_message m;
  while (q.pop(m, milliseconds(0))) out.push_back(m.topic + "=" + m.payload);
  return out;
}

void push_all(inbound_queue& q, const std::vector<std::string>& items) {
  for (const auto& item : items) {
    const auto eq = item.find('=');
    q.push(inbound_message{item.substr(0, eq), item.substr(eq + 1), false});
  }
}

struct overflow_case {
  const char* name;
  std::size_t capacity;
  std::vector<std::string> pushed;    // "topic=payload" in arrival order
  std::vector<std::string> expected;  // what the worker then reads, in order
  std::uint64_t dropped;
  std::uint64_t kept_over_capacity;
};

void PrintTo(const overflow_case& c, std::ostream* os) { *os << c.name; }

class InboundQueueOverflow : public ::testing::TestWithParam<overflow_case> {};

TEST_P(InboundQueueOverflow, KeepsCommandsAndNewestReadings) {
  const overflow_case& c = GetParam();
  inbound_queue q(c.capacity, {"svc/cmd/"});
  push_all(q, c.pushed);
  const inbound_queue_counters counters = q.counters();
  EXPECT_EQ(counters.received, c.pushed.size());
  EXPECT_EQ(counters.dropped, c.dropped);
  EXPECT_EQ(counters.kept_over_capacity, c.kept_over_capacity);
  EXPECT_EQ(drain(q), c.expected);
}

// clang-format off
INSTANTIATE_TEST_SUITE_P(Cases, InboundQueueOverflow, ::testing::Values(
    overflow_case{"BelowCapacityKeepsAllInOrder", 3,
                  {"s/t=1", "svc/cmd/ack=a", "s/t=2"}, {"s/t=1", "svc/cmd/ack=a", "s/t=2"}, 0, 0},
    overflow_case{"FullDropsOldestReading", 2,
                  {"s/t=1", "s/t=2", "s/t=3"}, {"s/t=2", "s/t=3"}, 1, 0},
    overflow_case{"CommandPushesOutOldestReading", 2,
                  {"s/t=1", "s/t=2", "svc/cmd/ack=a"}, {"s/t=2", "svc/cmd/ack=a"}, 1, 0},
    overflow_case{"ReadingNeverPushesOutCommand", 2,
                  {"svc/cmd/ack=a", "s/t=1", "s/t=2"}, {"svc/cmd/ack=a", "s/t=2"}, 1, 0},
    overflow_case{"CommandsGoPastCapacityWhenOnlyCommandsQueued", 2,
                  {"svc/cmd/ack=a", "svc/cmd/ack=b", "svc/cmd/shelve=c"},
                  {"svc/cmd/ack=a", "svc/cmd/ack=b", "svc/cmd/shelve=c"}, 0, 1},
    overflow_case{"ReadingDroppedWhenOnlyCommandsQueued", 1,
                  {"svc/cmd/ack=a", "s/t=1"}, {"svc/cmd/ack=a"}, 1, 0},
    overflow_case{"OrderAcrossLanesIsArrivalOrder", 4,
                  {"s/t=1", "svc/cmd/ack=a", "s/t=2", "svc/cmd/ack=b", "s/t=3"},
                  {"svc/cmd/ack=a", "s/t=2", "svc/cmd/ack=b", "s/t=3"}, 1, 0},
    overflow_case{"PrefixMustMatchFromTheStart", 1,
                  {"other/svc/cmd/x=1", "s/t=2"}, {"s/t=2"}, 1, 0}),
    [](const ::testing::TestParamInfo<overflow_case>& case_info) { return std::string(case_info.param.name); });
// clang-format on

TEST(InboundQueue, PushTellsWhenItCostAMessage) {
  inbound_queue q(1, {"svc/cmd/"});
  EXPECT_FALSE(q.push(inbound_message{"s/t", "1", false}));
  EXPECT_TRUE(q.push(inbound_message{"s/t", "2", false})) << "pushed out the older reading";
  EXPECT_TRUE(q.push(inbound_message{"svc/cmd/ack", "a", false})) << "pushed out the reading";
  EXPECT_FALSE(q.push(inbound_message{"svc/cmd/ack", "b", false})) << "over capacity, nothing lost";
  EXPECT_TRUE(q.push(inbound_message{"s/t", "3", false})) << "the newcomer itself";
}

TEST(InboundQueue, PopTimesOutWhenEmpty) {
  inbound_queue q(4, {});
  inbound_message m;
  EXPECT_FALSE(q.pop(m, milliseconds(0)));
  EXPECT_EQ(q.counters().queued, 0U);
}

TEST(InboundQueue, CarriesRetainedFlag) {
  inbound_queue q(4, {});
  q.push(inbound_message{"a", "1", true});
  inbound_message m;
  ASSERT_TRUE(q.pop(m, milliseconds(0)));
  EXPECT_TRUE(m.retained);
  EXPECT_EQ(m.payload, "1");
}

TEST(InboundQueue, MustKeepMatchesAnyPrefix) {
  const inbound_queue q(4, {"a/cmd/", "b/cmd/"});
  EXPECT_TRUE(q.must_keep("a/cmd/ack"));
  EXPECT_TRUE(q.must_keep("b/cmd/shelve"));
  EXPECT_FALSE(q.must_keep("a/cm"));
  EXPECT_FALSE(q.must_keep("c/cmd/ack"));
}

TEST(InboundQueue, SustainedOverflowStaysAtCapacity) {
  inbound_queue q(10, {"svc/cmd/"});
  for (int i = 0; i < 1000; ++i) {
    q.push(inbound_message{i % 100 == 0 ? "svc/cmd/ack" : "s/t", std::to_string(i), false});
  }
  const auto c = q.counters();
  EXPECT_EQ(c.queued, 10U);
  EXPECT_EQ(c.dropped, 990U);
  const auto out = drain(q);
  std::size_t commands = 0;
  for (const auto& s : out) commands += s.rfind("svc/cmd/", 0) == 0 ? 1 : 0;
  EXPECT_EQ(commands, 10U) << "all ten commands survive";
}

}  // namespace
}  // namespace dewmargin

namespace dewmargin {
namespace {

TEST(InboundQueue, PopBatchTakesUpToMaxInArrivalOrderAcrossBothLanes) {
  inbound_queue q(100, {"dm/cmd/"});
  push_all(q, {"r/a=1", "dm/cmd/ack=x", "r/b=2", "r/c=3"});
  std::vector<inbound_message> got;
  EXPECT_EQ(q.pop_batch(got, 3, std::chrono::milliseconds(0)), 3u);
  ASSERT_EQ(got.size(), 3u);
  EXPECT_EQ(got[0].topic, "r/a");
  EXPECT_EQ(got[1].topic, "dm/cmd/ack");  // a command keeps its place in the arrival order
  EXPECT_EQ(got[2].topic, "r/b");
  EXPECT_EQ(q.pop_batch(got, 3, std::chrono::milliseconds(0)), 1u);  // appended, not replaced
  ASSERT_EQ(got.size(), 4u);
  EXPECT_EQ(got[3].payload, "3");
  EXPECT_EQ(q.counters().queued, 0u);
}

TEST(InboundQueue, PopBatchReturnsNothingWhenEmptyAndWaitsForAPush) {
  inbound_queue q(10, {});
  std::vector<inbound_message> got;
  EXPECT_EQ(q.pop_batch(got, 5, std::chrono::milliseconds(0)), 0u);
  EXPECT_EQ(q.pop_batch(got, 5, std::chrono::milliseconds(20)), 0u);
  std::thread producer([&] {
    std::this_thread::sleep_for(std::chrono::milliseconds(20));
    q.push(inbound_message{"r/a", "24.0", false});
  });
  // Bounded: a generous timeout that a working queue never reaches.
  EXPECT_EQ(q.pop_batch(got, 5, std::chrono::milliseconds(5000)), 1u);
  producer.join();
  ASSERT_EQ(got.size(), 1u);
  EXPECT_EQ(got[0].payload, "24.0");
}

}  // namespace
}  // namespace dewmargin
