// Retention on simulated time: old events and samples go in small transactions, then the
// free pages are handed back incrementally.
#include <atomic>
#include <thread>

#include "store_test_support.h"

namespace dewmargin {
namespace {

using store_test::error_sink;
using store_test::k_day_ms;
using store_test::k_t0_ms;
using store_test::k_wait;
using store_test::make_event;
using store_test::make_sample;
using store_test::raw_db;
using store_test::temp_dir;

class Retention : public ::testing::Test {
 protected:
  // Simulated wall clock for the cut-offs; the test moves it.
  std::atomic<std::int64_t> now_ms_{k_t0_ms + 10 * k_day_ms};
  temp_dir dir_;
  error_sink errors_;

  store_writer_options options() {
    auto o = store_test::test_options(dir_.file("h.db"), errors_);
    o.keep_events_days = 1;
    o.keep_samples_days = 2;
    o.retention_batch_rows = 1000;
    o.retention_batches_per_pass = 2;
    o.retention_now = [this] { return from_unix_ms(now_ms_.load()); };
    return o;
  }

  static void add_events(store_writer& w, std::int64_t ts_ms, int count, const std::string& zone) {
    engine_output out;
    for (int i = 0; i < count; ++i)
      out.events.push_back(
          make_event(ts_ms + i, zone, "input", R"(,"note":"padding padding padding padding padding")"));
    w.enqueue(out);
  }
  static void add_samples(store_writer& w, std::int64_t from_ms, int count, const std::string& zone) {
    engine_output out;
    for (int m = 0; m < count; ++m) out.samples.push_back(make_sample(from_ms + m * 60'000LL, zone, 1.0));
    w.enqueue(out);
  }
};

TEST_F(Retention, DeletesOldRowsInBatchesOfLimitedSize) {
  auto writer = store_test::open_writer(options());
  const std::int64_t now = now_ms_.load();
  add_events(writer, k_t0_ms, 3500, "old");                  // 10 days old
  add_events(writer, now - 3'600'000, 10, "recent");         // 1 hour old
  add_samples(writer, k_t0_ms, 2500, "old");                 // about 8–10 days old
  add_samples(writer, now - 24 * 3'600'000LL, 5, "recent");  // 1 day old, kept 2 days
  ASSERT_TRUE(writer.flush(k_wait));
  raw_db db(dir_.file("h.db"));
  ASSERT_EQ(db.integer("SELECT count(*) FROM events"), 3510);

  // One pass: at most 2 transactions of 1000 rows per table.
  ASSERT_TRUE(writer.run_maintenance(k_wait));
  EXPECT_EQ(writer.counters().events_deleted, 2000u);
  EXPECT_EQ(writer.counters().samples_deleted, 2000u);
  EXPECT_EQ(db.integer("SELECT count(*) FROM events"), 1510);
  EXPECT_EQ(db.integer("SELECT count(*) FROM zone_samples"), 505);
  EXPECT_EQ(db.integer("SELECT min(ts_ms) FROM events") - k_t0_ms, 2000) << "the oldest go first";

  ASSERT_TRUE(writer.run_maintenance(k_wait));
  EXPECT_EQ(writer.counters().events_deleted, 3500u);
  EXPECT_EQ(writer.counters().samples_deleted, 2500u);
  EXPECT_EQ(db.texts("SELECT DISTINCT subject_id FROM events"), (std::vector<std::string>{"recent"}));
  EXPECT_EQ(db.integer("SELECT count(*) FROM events"), 10);
  EXPECT_EQ(db.integer("SELECT count(*) FROM zone_samples"), 5);

  ASSERT_TRUE(writer.run_maintenance(k_wait));
  EXPECT_EQ(writer.counters().events_deleted, 3500u) << "nothing more to delete";
  EXPECT_EQ(writer.counters().errors, 0u);
}

TEST_F(Retention, CutOffFollowsTheInjectedNow) {
  auto writer = store_test::open_writer(options());
  const std::int64_t now = now_ms_.load();
  add_events(writer, now - 23 * 3'600'000LL, 1, "z1");  // 23 h old: kept for a day
  ASSERT_TRUE(writer.flush(k_wait));
  ASSERT_TRUE(writer.run_maintenance(k_wait));
  raw_db db(dir_.file("h.db"));
  EXPECT_EQ(db.integer("SELECT count(*) FROM events"), 1);
  now_ms_ += 2 * 3'600'000LL;  // two simulated hours later it is 25 h old
  ASSERT_TRUE(writer.run_maintenance(k_wait));
  EXPECT_EQ(db.integer("SELECT count(*) FROM events"), 0);
}

TEST_F(Retention, KeepsEverythingWhenTheDaysAreNotPositive) {
  auto o = options();
  o.keep_events_days = 0;
  o.keep_samples_days = -1;
  auto writer = store_test::open_writer(o);
  add_events(writer, k_t0_ms - 3650 * k_day_ms, 5, "z1");
  add_samples(writer, k_t0_ms - 3650 * k_day_ms, 5, "z1");
  ASSERT_TRUE(writer.flush(k_wait));
  ASSERT_TRUE(writer.run_maintenance(k_wait));
  raw_db db(dir_.file("h.db"));
  EXPECT_EQ(db.integer("SELECT count(*) FROM events"), 5);
  EXPECT_EQ(db.integer("SELECT count(*) FROM zone_samples"), 5);
}

TEST_F(Retention, HandsFreePagesBackIncrementally) {
  auto o = options();
  o.retention_batches_per_pass = 10;
  o.incremental_vacuum_pages = 5;  // a few pages per pass, never the whole file at once
  auto writer = store_test::open_writer(o);
  add_events(writer, k_t0_ms, 5000, "old");
  ASSERT_TRUE(writer.flush(k_wait));
  raw_db db(dir_.file("h.db"));
  const std::int64_t pages_full = db.integer("PRAGMA page_count");
  ASSERT_TRUE(writer.run_maintenance(k_wait));
  ASSERT_EQ(db.integer("SELECT count(*) FROM events"), 0);
  const std::int64_t free_after_one = db.integer("PRAGMA freelist_count");
  EXPECT_EQ(db.integer("PRAGMA page_count"), pages_full - 5) << "5 pages returned by the first pass";
  EXPECT_GT(free_after_one, 0) << "the rest waits for later passes";
  ASSERT_TRUE(writer.run_maintenance(k_wait));
  EXPECT_EQ(db.integer("PRAGMA freelist_count"), free_after_one - 5);
}

TEST_F(Retention, RunsWhenTheWriterStarts) {
  {
    auto writer = store_test::open_writer(options());
    add_events(writer, k_t0_ms, 10, "old");
    writer.stop();
  }
  auto writer = store_test::open_writer(options());
  const auto deadline = std::chrono::steady_clock::now() + k_wait;
  while (writer.counters().maintenance_passes == 0 && std::chrono::steady_clock::now() < deadline) {
    std::this_thread::yield();
  }
  EXPECT_EQ(writer.counters().maintenance_passes, 1u);
  EXPECT_EQ(writer.counters().events_deleted, 10u);
}

}  // namespace
}  // namespace dewmargin
