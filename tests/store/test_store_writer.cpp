// The batching writer: few commits for many rows, counters, order, overflow, stop.
#include <thread>

#include "store_test_support.h"

namespace dewmargin {
namespace {

using store_test::error_sink;
using store_test::k_t0_ms;
using store_test::eventually;
using store_test::k_wait;
using store_test::make_event;
using store_test::make_sample;
using store_test::raw_db;
using store_test::temp_dir;

engine_output one_event(std::int64_t ts_ms, const char* kind = "band") {
  engine_output out;
  out.events.push_back(make_event(ts_ms, "z1", kind));
  return out;
}

TEST(StoreWriter, ManyRowsAreWrittenInOneCommit) {
  temp_dir dir;
  error_sink errors;
  auto writer = store_test::open_writer(store_test::test_options(dir.file("h.db"), errors));
  for (int i = 0; i < 10'000; ++i) writer.enqueue(one_event(k_t0_ms + i));
  auto before = writer.counters();
  EXPECT_EQ(before.rows_enqueued, 10'000u);
  EXPECT_EQ(before.pending_rows, 10'000u);
  EXPECT_EQ(before.commits, 0u) << "no commit before the interval or a flush";
  ASSERT_TRUE(writer.flush(k_wait));
  const auto c = writer.counters();
  EXPECT_EQ(c.commits, 1u);
  EXPECT_EQ(c.rows_written, 10'000u);
  EXPECT_EQ(c.pending_rows, 0u);
  EXPECT_EQ(c.errors, 0u);
  EXPECT_EQ(c.dropped_rows, 0u);
  EXPECT_GT(c.total_commit_us, 0u);
  EXPECT_EQ(c.max_commit_us, c.last_commit_us);
  raw_db db(dir.file("h.db"));
  EXPECT_EQ(db.integer("SELECT count(*) FROM events"), 10'000);
  EXPECT_TRUE(errors.lines().empty());
}

TEST(StoreWriter, CommitsEarlyWhenManyRowsWait) {
  temp_dir dir;
  error_sink errors;
  auto options = store_test::test_options(dir.file("h.db"), errors);
  options.commit_early_rows = 1000;
  auto writer = store_test::open_writer(options);
  for (int i = 0; i < 10'000; ++i) writer.enqueue(one_event(k_t0_ms + i));
  ASSERT_TRUE(writer.flush(k_wait));
  const auto c = writer.counters();
  EXPECT_EQ(c.rows_written, 10'000u);
  // Each early commit takes everything pending (at least 1000 rows), plus the flush.
  EXPECT_GE(c.commits, 1u);
  EXPECT_LE(c.commits, 11u);
}

TEST(StoreWriter, CommitsWithoutFlushOnceARowHasWaitedTheInterval) {
  temp_dir dir;
  error_sink errors;
  auto options = store_test::test_options(dir.file("h.db"), errors);
  options.commit_interval = std::chrono::milliseconds{10};
  auto writer = store_test::open_writer(options);
  writer.enqueue(one_event(k_t0_ms));
  EXPECT_TRUE(eventually([&] { return writer.counters().commits == 1; }));
  EXPECT_EQ(writer.counters().rows_written, 1u);
}

TEST(StoreWriter, StoresEveryFieldAndKeepsTheOrderOfEnqueue) {
  temp_dir dir;
  error_sink errors;
  auto writer = store_test::open_writer(store_test::test_options(dir.file("h.db"), errors));
  engine_output out;
  out.events.push_back(make_event(k_t0_ms, "z1", "valve", R"(,"from":"open","to":"closed")"));
  out.events.push_back(make_event(k_t0_ms, "z1", "band", R"(,"from":"safe","to":"condensing")"));
  event_record loop_event;
  loop_event.ts = from_unix_ms(k_t0_ms);
  loop_event.subject = subject_type::loop;
  loop_event.subject_id = "loop-a";
  loop_event.kind = "setpoint";
  loop_event.json = R"({"kind":"setpoint","from":17.5,"to":18})";
  out.events.push_back(loop_event);
  out.samples.push_back(make_sample(k_t0_ms, "z1", 0.5));
  writer.enqueue(out);
  ASSERT_TRUE(writer.flush(k_wait));
  raw_db db(dir.file("h.db"));
  EXPECT_EQ(db.texts("SELECT kind || ' ' || subject_type || ' ' || subject_id FROM events ORDER BY id"),
            (std::vector<std::string>{"valve zone z1", "band zone z1", "setpoint loop loop-a"}));
  EXPECT_EQ(db.text("SELECT json FROM events WHERE kind = 'setpoint'"), loop_event.json);
  EXPECT_EQ(db.integer("SELECT ts_ms FROM events WHERE kind = 'band'"), k_t0_ms);
  EXPECT_EQ(db.text("SELECT zone || ' ' || minute_ms || ' ' || min_margin_k || ' ' || worst_band || ' ' || "
                    "coalesce(surface_min_c, 'NULL') || ' ' || supply_c FROM zone_samples"),
            "z1 " + std::to_string(k_t0_ms) + " 0.5 tight NULL 17.5");
}

TEST(StoreWriter, ALaterSampleOfTheSameMinuteReplacesTheEarlier) {
  temp_dir dir;
  error_sink errors;
  auto writer = store_test::open_writer(store_test::test_options(dir.file("h.db"), errors));
  engine_output first;
  first.samples.push_back(make_sample(k_t0_ms, "z1", 3.0));
  writer.enqueue(first);
  ASSERT_TRUE(writer.flush(k_wait));
  engine_output second;
  second.samples.push_back(make_sample(k_t0_ms, "z1", 1.5));
  writer.enqueue(second);
  ASSERT_TRUE(writer.flush(k_wait));
  raw_db db(dir.file("h.db"));
  EXPECT_EQ(db.integer("SELECT count(*) FROM zone_samples"), 1);
  EXPECT_EQ(db.text("SELECT min_margin_k FROM zone_samples"), "1.5");
}

TEST(StoreWriter, OverflowDropsOldestSamplesThenOldestNonAlarmEvents) {
  temp_dir dir;
  error_sink errors;
  auto options = store_test::test_options(dir.file("h.db"), errors);
  options.max_pending_rows = 10;
  auto writer = store_test::open_writer(options);
  for (int i = 0; i < 4; ++i) writer.enqueue(one_event(k_t0_ms + i, "band"));
  for (int i = 0; i < 4; ++i) writer.enqueue(one_event(k_t0_ms + 10 + i, "input"));
  for (int m = 0; m < 6; ++m) {
    engine_output out;
    out.samples.push_back(make_sample(k_t0_ms + m * 60'000, "z1", m));
    writer.enqueue(out);
  }
  // 14 rows for 10 places: the 4 oldest samples go.
  EXPECT_EQ(writer.counters().dropped_rows, 4u);
  for (int i = 0; i < 3; ++i) writer.enqueue(one_event(k_t0_ms + 20 + i, "ack"));
  // 3 more: the last 2 samples, then the oldest input event.
  EXPECT_EQ(writer.counters().dropped_rows, 7u);
  EXPECT_EQ(writer.counters().pending_rows, 10u);
  ASSERT_TRUE(writer.flush(k_wait));
  raw_db db(dir.file("h.db"));
  EXPECT_EQ(db.integer("SELECT count(*) FROM zone_samples"), 0);
  EXPECT_EQ(db.texts("SELECT kind || '@' || (ts_ms - " + std::to_string(k_t0_ms) + ") FROM events ORDER BY id"),
            (std::vector<std::string>{"band@0", "band@1", "band@2", "band@3", "input@11", "input@12", "input@13",
                                      "ack@20", "ack@21", "ack@22"}));
}

TEST(StoreWriter, StopWritesWhatIsPending) {
  temp_dir dir;
  error_sink errors;
  {
    auto writer = store_test::open_writer(store_test::test_options(dir.file("h.db"), errors));
    for (int i = 0; i < 100; ++i) writer.enqueue(one_event(k_t0_ms + i));
    writer.stop();
    EXPECT_EQ(writer.counters().rows_written, 100u);
    EXPECT_EQ(writer.counters().dropped_rows, 0u);
  }
  raw_db db(dir.file("h.db"));
  EXPECT_EQ(db.integer("SELECT count(*) FROM events"), 100);
}

TEST(StoreWriter, RowsAfterStopAreCountedAsDroppedAndReportedOnce) {
  temp_dir dir;
  error_sink errors;
  auto writer = store_test::open_writer(store_test::test_options(dir.file("h.db"), errors));
  writer.stop();
  writer.enqueue(one_event(k_t0_ms));
  writer.enqueue(one_event(k_t0_ms + 1));
  EXPECT_EQ(writer.counters().dropped_rows, 2u);
  const auto lines = errors.lines();
  ASSERT_EQ(lines.size(), 1u);
  EXPECT_EQ(lines[0], dir.file("h.db").string() + ": rows enqueued after the writer stopped are dropped");
  EXPECT_FALSE(writer.flush(std::chrono::milliseconds{0}));
}

TEST(StoreWriter, RefusesOptionsThatCannotWork) {
  temp_dir dir;
  error_sink errors;
  struct options_case {
    const char* what;
    void (*change)(store_writer_options&);
    const char* expected;
  };
  const options_case cases[] = {
      {"no callback", [](store_writer_options& o) { o.report_error = nullptr; }, "needs a report_error callback"},
      {"no room", [](store_writer_options& o) { o.max_pending_rows = 0; }, "max_pending_rows must be at least 1"},
      {"no batch", [](store_writer_options& o) { o.retention_batch_rows = 0; }, "retention_batch_rows"},
      {"bad back-off", [](store_writer_options& o) { o.retry_backoff_max = std::chrono::milliseconds{1}; },
       "retry back-off"},
  };
  for (const auto& c : cases) {
    auto options = store_test::test_options(dir.file("h.db"), errors);
    c.change(options);
    auto w = store_writer::open(options);
    ASSERT_FALSE(w.ok()) << c.what;
    EXPECT_EQ(w.err().kind, store_error_kind::invalid_options) << c.what;
    EXPECT_TRUE(store_test::contains(w.err().message, c.expected)) << w.err().message;
  }
  EXPECT_FALSE(std::filesystem::exists(dir.file("h.db"))) << "nothing is created for bad options";
}

TEST(StoreWriter, OptionsFromTheStorageConfig) {
  storage_config storage;
  storage.path = "/tmp/x.db";
  storage.keep_events_days = 10;
  storage.keep_samples_days = 5;
  const auto o = store_writer_options_from(storage);
  EXPECT_EQ(o.path, "/tmp/x.db");
  EXPECT_EQ(o.keep_events_days, 10.0);
  EXPECT_EQ(o.keep_samples_days, 5.0);
  EXPECT_EQ(o.max_pending_rows, 200'000u);
  EXPECT_EQ(o.commit_interval, std::chrono::milliseconds{1000});
}

}  // namespace
}  // namespace dewmargin
