#include <gtest/gtest.h>

#include <optional>
#include <vector>

#include "dewmargin/change_gate.h"

namespace dewmargin {
namespace {

using gate = change_gate<2>;
constexpr double k_min_interval_s = 5.0;
const timestamp k_t0 = from_unix_ms(1'784'030'400'000);  // 2026-07-14T12:00:00Z

timestamp at_ms(std::int64_t ms) { return k_t0 + std::chrono::milliseconds(ms); }

gate committed(const gate::values& v) {
  gate g;
  g.commit(v, k_t0);
  return g;
}

TEST(ChangeGate, PublishesTheFirstStateAtOnce) {
  const gate g;
  EXPECT_TRUE(g.should_publish(false, {20.0, std::nullopt}, k_t0, k_min_interval_s));
  EXPECT_TRUE(g.should_publish(false, {std::nullopt, std::nullopt}, k_t0, k_min_interval_s));
}

TEST(ChangeGate, PublishesASignificantChangeAtOnce) {
  const gate g = committed({20.0, 1.0});
  EXPECT_TRUE(g.should_publish(true, {20.0, 1.0}, at_ms(1), k_min_interval_s)) << "even with no value moved";
}

TEST(ChangeGate, WaitsMinIntervalBetweenValueUpdates) {
  const gate g = committed({20.0, 1.0});
  EXPECT_FALSE(g.should_publish(false, {21.0, 1.0}, at_ms(1), k_min_interval_s));
  EXPECT_FALSE(g.should_publish(false, {21.0, 1.0}, at_ms(5'000 - 1), k_min_interval_s));
  EXPECT_TRUE(g.should_publish(false, {21.0, 1.0}, at_ms(5'000), k_min_interval_s));
}

TEST(ChangeGate, NeverRepublishesUnchangedValues) {
  const gate g = committed({20.0, 1.0});
  for (std::int64_t ms : {5'000, 60'000, 3'600'000}) {
    EXPECT_FALSE(g.should_publish(false, {20.0, 1.0}, at_ms(ms), k_min_interval_s)) << ms << " ms";
  }
}

struct move_case {
  const char* name;
  double from;
  double to;
  bool publish;
};

TEST(ChangeGate, NeedsAMoveOfAtLeastFiveHundredths) {
  const std::vector<move_case> cases = {
      {"up 0.05", 20.0, 20.05, true},      {"up 0.04", 20.0, 20.04, false},    {"up 0.049", 20.0, 20.049, false},
      {"down 0.05", 20.0, 19.95, true},    {"down 0.04", 20.0, 19.96, false},  {"up 0.05 from 0.1", 0.1, 0.15, true},
      {"down 0.05 to 0", 0.05, 0.0, true}, {"across zero", 0.02, -0.03, true}, {"up 1", 20.0, 21.0, true},
  };
  for (const auto& c : cases) {
    const gate g = committed({c.from, std::nullopt});
    EXPECT_EQ(g.should_publish(false, {c.to, std::nullopt}, at_ms(5'000), k_min_interval_s), c.publish) << c.name;
  }
}

TEST(ChangeGate, ComparesWithTheLastPublishedStateNotTheLastReading) {
  // Slow drift accumulates: 0.03 K twice is a move of 0.06 K since the last publish.
  gate g = committed({20.0, std::nullopt});
  EXPECT_FALSE(g.should_publish(false, {20.03, std::nullopt}, at_ms(5'000), k_min_interval_s));
  EXPECT_TRUE(g.should_publish(false, {20.06, std::nullopt}, at_ms(10'000), k_min_interval_s));
  g.commit({20.06, std::nullopt}, at_ms(10'000));
  EXPECT_FALSE(g.should_publish(false, {20.08, std::nullopt}, at_ms(15'000), k_min_interval_s));
}

TEST(ChangeGate, TreatsAValueAppearingOrDisappearingAsAMove) {
  const gate unknown = committed({std::nullopt, 1.0});
  EXPECT_TRUE(unknown.should_publish(false, {20.0, 1.0}, at_ms(5'000), k_min_interval_s)) << "appears";
  EXPECT_FALSE(unknown.should_publish(false, {20.0, 1.0}, at_ms(4'999), k_min_interval_s)) << "still rate-limited";
  EXPECT_FALSE(unknown.should_publish(false, {std::nullopt, 1.0}, at_ms(5'000), k_min_interval_s)) << "stays unknown";

  const gate known = committed({20.0, 1.0});
  EXPECT_TRUE(known.should_publish(false, {20.0, std::nullopt}, at_ms(5'000), k_min_interval_s)) << "disappears";
}

TEST(ChangeGate, LooksAtEveryValue) {
  const gate g = committed({20.0, 1.0});
  EXPECT_TRUE(g.should_publish(false, {20.0, 1.05}, at_ms(5'000), k_min_interval_s)) << "second value moved";
  EXPECT_FALSE(g.should_publish(false, {20.04, 1.04}, at_ms(5'000), k_min_interval_s)) << "moves do not add up";
}

TEST(ChangeGate, RestartsTheIntervalAtEachCommit) {
  gate g = committed({20.0, 1.0});
  g.commit({20.0, 1.0}, at_ms(3'000));  // e.g. a significant change went out
  EXPECT_FALSE(g.should_publish(false, {21.0, 1.0}, at_ms(7'999), k_min_interval_s));
  EXPECT_TRUE(g.should_publish(false, {21.0, 1.0}, at_ms(8'000), k_min_interval_s));
}

}  // namespace
}  // namespace dewmargin
