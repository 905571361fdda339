// The latest states of one or several sites, worst first (lib/live/live_book.h).
#include <gtest/gtest.h>

#include "dewmargin/live_book.h"

namespace dewmargin::live {
namespace {

std::string zone_state(const std::string& zone, const std::string& band, const char* margin) {
  return R"({"site":"s","zone":")" + zone + R"(","ts":"2026-07-14T13:00:00Z","band":")" + band + R"(","margin_k":)" +
         margin + R"(,"alarm":{"active":false,"acknowledged":true,"shelved_until":null}})";
}

std::vector<std::string> order(const live_book& b) {
  std::vector<std::string> out;
  for (const auto* z : b.zones_worst_first()) out.push_back(b.sites()[z->site].prefix + "/" + z->view.zone);
  return out;
}

TEST(LiveBook, OrdersWorstBandFirstThenLowestMarginThenName) {
  live_book b({"dm"});
  const struct {
    const char* zone;
    const char* band;
    const char* margin;
  } zones[] = {
      {"safe-wide", "safe", "6.0"},   {"tight-b", "tight", "1.8"},    {"tight-a", "tight", "1.5"},
      {"wet", "condensing", "-0.2"},  {"lost", "unknown", "null"},    {"alarm-1", "alarm", "0.7"},
      {"safe-narrow", "safe", "2.4"}, {"tight-same", "tight", "1.5"}, {"odd", "tight", "null"},
  };
  for (const auto& z : zones) {
    const auto r = b.ingest(std::string("dm/zone/") + z.zone + "/state", zone_state(z.zone, z.band, z.margin));
    EXPECT_TRUE(r.error.empty()) << r.error;
    EXPECT_TRUE(r.changed);
  }
  EXPECT_EQ(order(b), (std::vector<std::string>{"dm/lost", "dm/wet", "dm/alarm-1", "dm/tight-a", "dm/tight-same",
                                                "dm/tight-b", "dm/odd", "dm/safe-narrow", "dm/safe-wide"}));
  const band_counts c = b.counts();
  EXPECT_EQ(c[0], 2);  // safe
  EXPECT_EQ(c[1], 4);  // tight
  EXPECT_EQ(c[2], 1);
  EXPECT_EQ(c[3], 1);
  EXPECT_EQ(c[4], 1);
}

TEST(LiveBook, GroupsSitesInPrefixOrderAndMatchesTheLongestPrefix) {
  live_book b({"bldg-b/dm", "bldg-a/dm", "bldg-a/dm/annex"});
  (void)b.ingest("bldg-a/dm/zone/a1/state", zone_state("a1", "condensing", "-0.1"));
  (void)b.ingest("bldg-b/dm/zone/b1/state", zone_state("b1", "safe", "4"));
  (void)b.ingest("bldg-b/dm/zone/b2/state", zone_state("b2", "alarm", "0.5"));
  (void)b.ingest("bldg-a/dm/annex/zone/x/state", zone_state("x", "tight", "1.0"));
  EXPECT_EQ(order(b), (std::vector<std::string>{"bldg-b/dm/b2", "bldg-b/dm/b1", "bldg-a/dm/a1", "bldg-a/dm/annex/x"}));
  EXPECT_EQ(b.counts(std::size_t{0})[2], 1);
  EXPECT_EQ(b.counts(std::size_t{1})[3], 1);
}

TEST(LiveBook, AnEmptyRetainedPayloadRemovesTheZone) {
  live_book b({"dm"});
  (void)b.ingest("dm/zone/a/state", zone_state("a", "safe", "3"));
  EXPECT_EQ(b.zone_count(), 1u);
  const auto r = b.ingest("dm/zone/a/state", "");
  EXPECT_TRUE(r.changed);
  EXPECT_EQ(b.zone_count(), 0u);
}

TEST(LiveBook, ABadPayloadIsReportedWithItsTopicAndTheLastGoodStateStays) {
  live_book b({"dm"});
  (void)b.ingest("dm/zone/a/state", zone_state("a", "safe", "3"));
  const auto r = b.ingest("dm/zone/a/state", "{\"zone\":\"a\"}");
  EXPECT_EQ(r.error, "dm/zone/a/state: zone state: 'band' is not a non-empty string");
  EXPECT_FALSE(r.changed);
  ASSERT_EQ(b.zone_count(), 1u);
  EXPECT_EQ(b.zones_worst_first().front()->view.band, "safe");
  const auto wrong = b.ingest("dm/zone/b/state", zone_state("a", "safe", "3"));
  EXPECT_EQ(wrong.error, "dm/zone/b/state: zone state names zone 'a'");
}

TEST(LiveBook, KeepsTheNewestStateTimeOfEachSite) {
  live_book b({"a", "b"});
  (void)b.ingest("a/zone/z1/state", zone_state("z1", "safe", "3"));
  (void)b.ingest("a/zone/z2/state", R"({"zone":"z2","band":"safe","ts":"2026-07-14T13:05:00Z","margin_k":3})");
  (void)b.ingest("a/zone/z3/state", R"({"zone":"z3","band":"safe","ts":"2026-07-14T12:00:00Z"})");
  EXPECT_EQ(format_iso8601_utc(*b.newest_ts(0)), "2026-07-14T13:05:00Z");
  EXPECT_FALSE(b.newest_ts(1));
}

TEST(LiveBook, FindsZonesByIdOrBySiteWhenTheIdIsShared) {
  live_book b({"a/dm", "b/dm"});
  (void)b.ingest("a/dm/zone/lobby/state", zone_state("lobby", "safe", "3"));
  (void)b.ingest("b/dm/zone/lobby/state", zone_state("lobby", "safe", "3"));
  (void)b.ingest("b/dm/zone/hall/state", zone_state("hall", "safe", "3"));
  EXPECT_TRUE(b.find_zone("hall"));
  auto shared = b.find_zone("lobby");
  ASSERT_FALSE(shared);
  EXPECT_EQ(shared.err().message, "zone 'lobby' is in several sites; name one of a/dm/lobby, b/dm/lobby");
  auto qualified = b.find_zone("b/dm/lobby");
  ASSERT_TRUE(qualified);
  EXPECT_EQ(qualified.value()->site, 1u);
  EXPECT_EQ(b.find_zone("nowhere").err().message, "no zone 'nowhere'");
}

TEST(LiveBook, SubscribesToStatesStatusAndOptionallyEvents) {
  live_book b({"dm"});
  EXPECT_EQ(b.subscriptions(true), (std::vector<std::string>{"dm/status", "dm/zone/+/state", "dm/loop/+/state",
                                                             "dm/dehumidifier/+/state", "dm/events"}));
  EXPECT_EQ(b.subscriptions(false).size(), 4u);
  const auto e = b.ingest("dm/events", R"({"ts":"t","kind":"ack","zone":"a","by":"JK"})");
  EXPECT_EQ(e.kind, topic_kind::events);
  ASSERT_TRUE(e.event);
  EXPECT_EQ(e.event->zone, "a");
}

}  // namespace
}  // namespace dewmargin::live
