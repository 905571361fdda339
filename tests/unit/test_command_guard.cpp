#include <gtest/gtest.h>

#include "dewmargin/command_guard.h"

namespace dewmargin {
namespace {

timestamp at_ms(std::int64_t ms) { return from_unix_ms(1'800'000'000'000 + ms); }

TEST(TokenBucket, TakesABurstThenRefillsAtItsRate) {
  token_bucket b(10.0, 20.0);
  int taken = 0;
  for (int i = 0; i < 100; ++i) taken += b.take(at_ms(0)) ? 1 : 0;
  EXPECT_EQ(taken, 20);
  EXPECT_FALSE(b.take(at_ms(99)));  // 0.99 tokens
  EXPECT_TRUE(b.take(at_ms(100)));  // 1 token after 100 ms
  EXPECT_FALSE(b.take(at_ms(100)));
  // A long pause refills only up to the burst.
  taken = 0;
  for (int i = 0; i < 100; ++i) taken += b.take(at_ms(3'600'000)) ? 1 : 0;
  EXPECT_EQ(taken, 20);
}

TEST(TokenBucket, TimeGoingBackwardsAddsNothing) {
  token_bucket b(10.0, 1.0);
  EXPECT_TRUE(b.take(at_ms(10'000)));
  EXPECT_FALSE(b.take(at_ms(0)));
}

TEST(CommandGuard, AdmitsAtTheCommandRateAndCountsTheRest) {
  command_guard g;
  int admitted = 0;
  for (int i = 0; i <= 1000; ++i) admitted += g.admit(at_ms(i)) ? 1 : 0;  // 1,000 a second
  EXPECT_EQ(admitted, 20 + 10);                                           // the burst, then 10 a second
  EXPECT_EQ(g.dropped(), 971u);
}

TEST(CommandGuard, ReportsTheRateLimitAtMostOnceASecond) {
  command_guard g;
  EXPECT_TRUE(g.report_rate_limit(at_ms(0)));
  EXPECT_FALSE(g.report_rate_limit(at_ms(999)));
  EXPECT_TRUE(g.report_rate_limit(at_ms(1000)));
}

TEST(CommandGuard, ReportsEachChangeOfTopicKindOrReasonAndRepeatsOnlyAfterTheWindow) {
  command_guard g;
  struct step {
    std::int64_t ms;
    const char* topic;
    rejection_kind kind;
    const char* reason;
    bool reported;
  };
  const step steps[] = {
      {0, "dm/cmd/ack", rejection_kind::refused, "nothing to acknowledge", true},
      {1000, "dm/cmd/ack", rejection_kind::refused, "nothing to acknowledge", false},
      {2000, "dm/cmd/ack", rejection_kind::malformed, "not JSON", true},
      // The operator corrects one mistake and makes another: told again at once.
      {2500, "dm/cmd/ack", rejection_kind::malformed, "by is required", true},
      {3000, "dm/cmd/shelve", rejection_kind::malformed, "minutes out of range", true},
      {4000, "dm/cmd/shelve", rejection_kind::malformed, "minutes out of range", false},
      {12999, "dm/cmd/shelve", rejection_kind::malformed, "minutes out of range", false},
      {13000, "dm/cmd/shelve", rejection_kind::malformed, "minutes out of range", true},
  };
  for (const auto& s : steps) {
    EXPECT_EQ(g.report_rejection(s.topic, s.kind, s.reason, at_ms(s.ms)), s.reported)
        << s.ms << " " << s.topic << " " << rejection_kind_name(s.kind) << " " << s.reason;
  }
}

}  // namespace
}  // namespace dewmargin
