// A batch commits or rolls back whole: on an SQLite error in the middle of it, and when the
// process is killed at an arbitrary moment.
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include "store_test_support.h"

namespace dewmargin {
namespace {

using store_test::contains;
using store_test::error_sink;
using store_test::k_t0_ms;
using store_test::k_wait;
using store_test::make_event;
using store_test::make_sample;
using store_test::raw_db;
using store_test::temp_dir;

TEST(CrashSafety, AFailedBatchRollsBackWholeAndIsRetriedLater) {
  temp_dir dir;
  const auto file = dir.file("h.db");
  error_sink errors;
  auto writer = store_test::open_writer(store_test::test_options(file, errors));
  raw_db other(file);
  // A trigger makes the 51st insert of the batch fail after 50 rows went in.
  ASSERT_EQ(other.exec("CREATE TRIGGER poison BEFORE INSERT ON events WHEN NEW.kind = 'rejected' "
                       "BEGIN SELECT RAISE(ABORT, 'poisoned row'); END;"),
            SQLITE_OK);
  engine_output out;
  for (int i = 0; i < 50; ++i) out.events.push_back(make_event(k_t0_ms + i, "z1", "input"));
  out.events.push_back(make_event(k_t0_ms + 50, "z1", "rejected"));
  for (int i = 51; i < 100; ++i) out.events.push_back(make_event(k_t0_ms + i, "z1", "input"));
  out.samples.push_back(make_sample(k_t0_ms, "z1", 1.0));
  out.zone_snapshots.push_back(
      zone_snapshot{"z1", "alarm", true, false, std::nullopt, "closed", from_unix_ms(k_t0_ms)});
  writer.enqueue(out);
  EXPECT_FALSE(writer.flush(std::chrono::milliseconds{0}));  // asks for an attempt now
  ASSERT_TRUE(errors.wait_for(1));

  const std::string first = errors.lines().front();
  EXPECT_TRUE(contains(first, file.string() + ": commit of 102 rows (100 events, 1 samples, 1 snapshots) failed while "
                                              "inserting event 51 (rejected of zone 'z1' at 2026-07-14T13:00:00.050Z)"))
      << first;
  EXPECT_TRUE(contains(first, "poisoned row (SQLITE_CONSTRAINT")) << first;
  EXPECT_TRUE(contains(first, "rolled back, rows kept, retry in")) << first;
  EXPECT_EQ(other.integer("SELECT count(*) FROM events"), 0) << "none of the 50 rows before the failure stayed";
  EXPECT_EQ(other.integer("SELECT count(*) FROM zone_samples"), 0);
  EXPECT_EQ(other.integer("SELECT count(*) FROM zone_state"), 0);

  ASSERT_EQ(other.exec("DROP TRIGGER poison"), SQLITE_OK);
  ASSERT_TRUE(writer.flush(k_wait));
  EXPECT_EQ(other.integer("SELECT count(*) FROM events"), 100) << "every row once, none twice";
  EXPECT_EQ(other.integer("SELECT count(DISTINCT ts_ms) FROM events"), 100);
  EXPECT_EQ(other.integer("SELECT count(*) FROM zone_samples"), 1);
  EXPECT_EQ(other.integer("SELECT count(*) FROM zone_state"), 1);
  const auto c = writer.counters();
  EXPECT_GE(c.errors, 1u);
  EXPECT_EQ(c.dropped_rows, 0u);
  EXPECT_EQ(c.rows_written, 102u);
}

// A child process writes batches of 100 events + 10 samples as fast as it can and is killed
// with SIGKILL after some commits; every batch is then either complete or absent.
TEST(CrashSafety, AKilledWriterLeavesOnlyWholeBatches) {
  temp_dir dir;
  const auto file = dir.file("h.db");
  int ready[2];
  ASSERT_EQ(pipe(ready), 0);
  const pid_t child = fork();
  ASSERT_GE(child, 0);
  if (child == 0) {
    close(ready[0]);
    error_sink errors;
    auto options = store_test::test_options(file, errors);
    options.commit_interval = std::chrono::milliseconds{1};
    options.commit_early_rows = 500;
    auto opened = store_writer::open(options);
    if (!opened.ok()) _exit(3);
    store_writer& writer = opened.value();
    const auto give_up = std::chrono::steady_clock::now() + std::chrono::seconds{20};
    for (int batch = 0; std::chrono::steady_clock::now() < give_up; ++batch) {
      engine_output out;
      const std::string zone = "batch-" + std::to_string(batch);
      for (int i = 0; i < 100; ++i) out.events.push_back(make_event(k_t0_ms + batch * 1000 + i, zone, "band"));
      for (int m = 0; m < 10; ++m) out.samples.push_back(make_sample(k_t0_ms + m * 60'000, zone, m));
      writer.enqueue(out);
      if (batch % 20 == 19 && writer.flush(std::chrono::seconds{10})) {
        if (write(ready[1], "x", 1) != 1) _exit(4);
      }
    }
    _exit(0);  // not reached in the test: the parent kills it first
  }
  close(ready[1]);
  char buf[3];
  std::size_t got = 0;
  while (got < sizeof buf) {
    const ssize_t n = read(ready[0], buf + got, sizeof buf - got);
    if (n <= 0) break;
    got += static_cast<std::size_t>(n);
  }
  close(ready[0]);
  kill(child, SIGKILL);
  int status = 0;
  ASSERT_EQ(waitpid(child, &status, 0), child);
  ASSERT_EQ(got, sizeof buf) << "the child did not get three flushes done (exit status " << status << ")";
  ASSERT_TRUE(WIFSIGNALED(status)) << "the child ended on its own (status " << status << ")";

  raw_db db(file);  // read-write: recovers the WAL like the service's next start
  EXPECT_EQ(db.text("PRAGMA integrity_check"), "ok");
  const std::int64_t events = db.integer("SELECT count(*) FROM events");
  EXPECT_GE(events, 3 * 20 * 100) << "at least the flushed batches";
  EXPECT_EQ(events % 100, 0);
  EXPECT_EQ(
      db.integer("SELECT count(*) FROM (SELECT subject_id FROM events GROUP BY subject_id HAVING count(*) != 100)"), 0);
  EXPECT_EQ(db.integer("SELECT count(*) FROM (SELECT zone FROM zone_samples GROUP BY zone HAVING count(*) != 10)"), 0);
  EXPECT_EQ(db.integer("SELECT count(DISTINCT subject_id) FROM events"),
            db.integer("SELECT count(DISTINCT zone) FROM zone_samples"))
      << "events and samples of a batch are committed together";

  error_sink errors;
  auto reopened = store_writer::open(store_test::test_options(file, errors));
  EXPECT_TRUE(reopened.ok()) << reopened.err().message;
}

}  // namespace
}  // namespace dewmargin
