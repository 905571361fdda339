#pragma once
// The service's writer of the history database: batches rows in memory and commits them on
// its own thread, so the caller (the engine's thread) never waits for the disk.
// Design notes: see dewmargin/store.h.
#include <chrono>
#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <functional>
#include <memory>
#include <string>

#include "dewmargin/config.h"
#include "dewmargin/engine_output.h"
#include "dewmargin/store_error.h"
#include "dewmargin/timestamp.h"

namespace dewmargin {

struct store_writer_options {
  std::filesystem::path path;
  double keep_events_days = 730.0;   // <= 0: keep forever
  double keep_samples_days = 400.0;  // <= 0: keep forever (per-minute samples and hourly roll-ups)
  // Per-minute samples older than this become hourly rows (zone_hours) that keep min, max, mean,
  // minutes in each band and the mould figures; <= 0: never roll up. Config key to wire:
  // storage.keep_minute_samples_days (default 35: a month's report is drawn from minutes).
  double keep_minute_samples_days = 35.0;
  int rollup_hours_per_batch = 6;  // hours rolled up per transaction (all zones)
  std::chrono::milliseconds rollup_pass_budget{2000};  // a maintenance pass stops rolling up after this

  // Rows waiting in memory, at most. Beyond it the oldest samples go first, then the oldest
  // events that are not alarm-related, and only then the oldest alarm-related events.
  std::size_t max_pending_rows = 200'000;
  std::chrono::milliseconds commit_interval{1000};  // a row waits at most this long (disk permitting)
  std::size_t commit_early_rows = 10'000;           // ... or less, once this many rows wait

  std::chrono::milliseconds busy_timeout{5000};
  std::int64_t journal_size_limit_bytes = 64LL * 1024 * 1024;

  // Maintenance runs on the writer's thread at start and then every maintenance_interval
  // (steady clock): retention in small transactions, incremental vacuum, WAL checkpoint.
  std::chrono::milliseconds maintenance_interval{std::chrono::minutes{10}};
  std::size_t retention_batch_rows = 1000;  // rows deleted per transaction
  int retention_batches_per_pass = 5;       // per table and pass
  int incremental_vacuum_pages = 1000;      // free pages returned to the file system per pass
  int checkpoint_truncate_every = 6;        // every Nth pass truncates the WAL; the others are PASSIVE

  // After a failed commit the rows are kept and retried after a back-off that doubles up to the max.
  std::chrono::milliseconds retry_backoff_initial{250};
  std::chrono::milliseconds retry_backoff_max{std::chrono::seconds{30}};

  // "Now" for retention cut-offs; empty means the system clock. Tests inject simulated time.
  std::function<timestamp()> retention_now;

  // Required. Receives one line per problem (the file, what was being done, SQLite's message and
  // code, what happens next). Called from the writer's thread, never while a lock is held, and
  // from the caller of enqueue() only when rows arrive after stop().
  std::function<void(const std::string&)> report_error;
};

// The storage section of the config, as writer options (callbacks still to be set).
store_writer_options store_writer_options_from(const storage_config& storage);

struct store_writer_counters {
  std::uint64_t rows_enqueued = 0;
  std::uint64_t rows_written = 0;     // committed
  std::uint64_t commits = 0;          // successful write transactions of enqueued rows
  std::uint64_t errors = 0;           // failed commits and failed maintenance steps
  std::uint64_t dropped_rows = 0;     // discarded: pending list full, or still pending at stop()
  std::uint64_t pending_rows = 0;     // waiting in memory, including a batch being written
  std::uint64_t in_flight_rows = 0;   // of those, the batch a commit is writing right now
  std::uint64_t events_deleted = 0;   // by retention
  std::uint64_t samples_deleted = 0;  // by retention
  std::uint64_t hours_deleted = 0;    // hourly roll-ups deleted by retention
  std::uint64_t minutes_rolled_up = 0;  // per-minute samples turned into hourly rows
  std::uint64_t maintenance_passes = 0;
  std::uint64_t last_commit_us = 0;  // duration of the latest successful commit
  std::uint64_t max_commit_us = 0;
  std::uint64_t total_commit_us = 0;
};

class store_writer {
 public:
  // Opens (creating and migrating as needed) the database and starts the writer's thread.
  // Fails with a message naming the file when it cannot be opened, is foreign or too new.
  [[nodiscard]] static store_result<store_writer> open(store_writer_options options);

  store_writer(store_writer&&) noexcept;
  store_writer& operator=(store_writer&&) noexcept;
  store_writer(const store_writer&) = delete;
  store_writer& operator=(const store_writer&) = delete;
  ~store_writer();  // stop() with its default timeout

  // Copies the output's events, samples and snapshots into the pending list (messages are
  // ignored). Takes a short lock and never touches the disk. Rows of one call are committed
  // in one transaction (unless the pending list overflows and some are dropped).
  void enqueue(const engine_output& output);

  // Waits until every row enqueued before the call is committed (or was dropped by the overflow
  // policy, which the counters show); false on timeout or when the writer has stopped.
  [[nodiscard]] bool flush(std::chrono::milliseconds timeout);

  // Runs one maintenance pass now and waits for it; false on timeout.
  [[nodiscard]] bool run_maintenance(std::chrono::milliseconds timeout);

  // Writes what it can within the timeout, then ends the thread and closes the database.
  // Rows still pending are counted as dropped and reported. Idempotent.
  void stop(std::chrono::milliseconds timeout = std::chrono::seconds{5});

  [[nodiscard]] store_writer_counters counters() const;

  // Latest zone and loop snapshots as committed (read through a separate read-only
  // connection), for a restarted service. Call it before enqueueing new snapshots.
  [[nodiscard]] store_result<restored_state> load_restored_state() const;

  [[nodiscard]] const std::filesystem::path& path() const;

 private:
  class impl;
  explicit store_writer(std::unique_ptr<impl> p);
  std::unique_ptr<impl> impl_;
};

}  // namespace dewmargin
