// Errors on the write path: reported with context, rows kept and retried, the caller never
// waits for the disk.
#include <thread>

#include "store_test_support.h"

namespace dewmargin {
namespace {

using store_test::contains;
using store_test::error_sink;
using store_test::k_t0_ms;
using store_test::eventually;
using store_test::k_wait;
using store_test::make_event;
using store_test::raw_db;
using store_test::temp_dir;

engine_output events(int first, int count) {
  engine_output out;
  for (int i = first; i < first + count; ++i) out.events.push_back(make_event(k_t0_ms + i, "z1", "input"));
  return out;
}

TEST(StoreErrors, ALockedDatabaseIsReportedAndTheRowsWrittenOnceItIsReleased) {
  temp_dir dir;
  const auto file = dir.file("h.db");
  error_sink errors;
  auto options = store_test::test_options(file, errors);
  options.busy_timeout = std::chrono::milliseconds{20};
  auto writer = store_test::open_writer(options);
  ASSERT_TRUE(writer.run_maintenance(k_wait));  // the start pass is done before the lock

  raw_db other(file);
  ASSERT_EQ(other.exec("BEGIN EXCLUSIVE"), SQLITE_OK);
  writer.enqueue(events(0, 100));
  EXPECT_FALSE(writer.flush(std::chrono::milliseconds{0}));  // asks for an attempt now
  ASSERT_TRUE(errors.wait_for(2)) << "the first failure and at least one retry";
  for (const auto& line : errors.lines()) {
    EXPECT_TRUE(contains(line, file.string() + ": commit of 100 rows (100 events, 0 samples, 0 snapshots) failed while "
                                               "beginning the transaction: database is locked (SQLITE_BUSY"))
        << line;
    EXPECT_TRUE(contains(line, "rolled back, rows kept, retry in")) << line;
  }
  writer.enqueue(events(100, 50));  // more rows while the database stays locked
  auto during = writer.counters();
  EXPECT_GE(during.errors, 2u);
  EXPECT_EQ(during.pending_rows, 150u);
  EXPECT_EQ(during.rows_written, 0u);

  ASSERT_EQ(other.exec("ROLLBACK"), SQLITE_OK);
  ASSERT_TRUE(writer.flush(k_wait));
  EXPECT_EQ(other.integer("SELECT count(*) FROM events"), 150) << "nothing lost";
  EXPECT_EQ(other.integer("SELECT count(DISTINCT ts_ms) FROM events"), 150) << "nothing twice";
  EXPECT_EQ(other.texts("SELECT ts_ms - " + std::to_string(k_t0_ms) + " FROM events ORDER BY id LIMIT 2"),
            (std::vector<std::string>{"0", "1"}))
      << "retried rows keep their place in front of later ones";
  const auto after = writer.counters();
  EXPECT_EQ(after.rows_written, 150u);
  EXPECT_EQ(after.dropped_rows, 0u);
  EXPECT_EQ(after.pending_rows, 0u);
}

TEST(StoreErrors, EnqueueReturnsWhileACommitIsBlocked) {
  temp_dir dir;
  const auto file = dir.file("h.db");
  error_sink errors;
  auto options = store_test::test_options(file, errors);
  options.busy_timeout = std::chrono::seconds{20};  // the commit waits on the lock that long
  auto writer = store_test::open_writer(options);
  ASSERT_TRUE(writer.run_maintenance(k_wait));

  raw_db other(file);
  ASSERT_EQ(other.exec("BEGIN EXCLUSIVE"), SQLITE_OK);
  writer.enqueue(events(0, 100));
  EXPECT_FALSE(writer.flush(std::chrono::milliseconds{0}));
  ASSERT_TRUE(eventually([&] { return writer.counters().in_flight_rows == 100; })) << "the commit started";

  // The writer's thread is now inside SQLite, waiting for the lock: enqueue must not wait for it.
  for (int i = 0; i < 1000; ++i) writer.enqueue(events(100 + i, 1));
  const auto c = writer.counters();
  EXPECT_EQ(c.in_flight_rows, 100u) << "the blocked commit is still running";
  EXPECT_EQ(c.pending_rows, 1100u);
  EXPECT_TRUE(errors.lines().empty());

  ASSERT_EQ(other.exec("ROLLBACK"), SQLITE_OK);
  ASSERT_TRUE(writer.flush(k_wait));
  EXPECT_EQ(other.integer("SELECT count(*) FROM events"), 1100);
}

TEST(StoreErrors, RowsThatCannotBeWrittenBeforeStopAreReportedAsLost) {
  temp_dir dir;
  const auto file = dir.file("h.db");
  error_sink errors;
  auto options = store_test::test_options(file, errors);
  options.busy_timeout = std::chrono::milliseconds{10};
  auto writer = store_test::open_writer(options);
  ASSERT_TRUE(writer.run_maintenance(k_wait));
  raw_db other(file);
  ASSERT_EQ(other.exec("BEGIN EXCLUSIVE"), SQLITE_OK);
  writer.enqueue(events(0, 10));
  writer.stop(std::chrono::milliseconds{50});
  const auto c = writer.counters();
  EXPECT_EQ(c.dropped_rows, 10u);
  EXPECT_EQ(c.rows_written, 0u);
  const auto lines = errors.lines();
  ASSERT_FALSE(lines.empty());
  EXPECT_EQ(lines.back(), file.string() + ": stopped with 10 rows not written (they are lost)");
  ASSERT_EQ(other.exec("ROLLBACK"), SQLITE_OK);
}

}  // namespace
}  // namespace dewmargin
