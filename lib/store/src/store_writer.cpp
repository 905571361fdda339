#include "dewmargin/store_writer.h"

#include <algorithm>
#include <cmath>
#include <condition_variable>
#include <cstdio>
#include <exception>
#include <limits>
#include <map>
#include <mutex>
#include <optional>
#include <set>
#include <thread>
#include <utility>
#include <vector>

#include "dewmargin/history_reader.h"
#include "migrations.h"
#include "pending_rows.h"
#include "period_rows.h"
#include "sqlite_handle.h"

namespace dewmargin {

using store_detail::connection;
using store_detail::describe;
using store_detail::exec;
using store_detail::pending_rows;
using store_detail::statement;
using steady = std::chrono::steady_clock;

namespace {

constexpr double k_ms_per_day = 86'400'000.0;

constexpr const char* k_insert_event_sql =
    "INSERT INTO events (ts_ms, subject_type, subject_id, kind, json) VALUES (?1, ?2, ?3, ?4, ?5)";
// A later sample of the same minute (a restart within the minute) replaces the earlier one.
constexpr const char* k_upsert_sample_sql =
    "INSERT OR REPLACE INTO zone_samples (minute_ms, zone, min_margin_k, max_dew_point_c, worst_band, air_temp_c, "
    "rh_pct, surface_min_c, supply_c, surface_rh_pct) VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9, ?10)";
constexpr const char* k_upsert_zone_sql =
    "INSERT INTO zone_state (zone, band, alarm_active, acknowledged, shelved_until_ms, valve, ts_ms) "
    "VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7) ON CONFLICT (zone) DO UPDATE SET band = excluded.band, "
    "alarm_active = excluded.alarm_active, acknowledged = excluded.acknowledged, "
    "shelved_until_ms = excluded.shelved_until_ms, valve = excluded.valve, ts_ms = excluded.ts_ms";
constexpr const char* k_upsert_loop_sql =
    "INSERT INTO loop_state (loop, setpoint_c, ts_ms) VALUES (?1, ?2, ?3) "
    "ON CONFLICT (loop) DO UPDATE SET setpoint_c = excluded.setpoint_c, ts_ms = excluded.ts_ms";
constexpr const char* k_delete_old_events_sql =
    "DELETE FROM events WHERE id IN (SELECT id FROM events WHERE ts_ms < ?1 ORDER BY ts_ms LIMIT ?2)";
// zone_samples and zone_hours are clustered by time: the oldest rows are a range at the front.
constexpr const char* k_delete_old_samples_sql =
    "DELETE FROM zone_samples WHERE (minute_ms, zone) IN "
    "(SELECT minute_ms, zone FROM zone_samples WHERE minute_ms < ?1 ORDER BY minute_ms LIMIT ?2)";
constexpr const char* k_delete_old_hours_sql =
    "DELETE FROM zone_hours WHERE (hour_ms, zone) IN "
    "(SELECT hour_ms, zone FROM zone_hours WHERE hour_ms < ?1 ORDER BY hour_ms LIMIT ?2)";
constexpr const char* k_oldest_sample_sql = "SELECT min(minute_ms) FROM zone_samples";
constexpr const char* k_minutes_to_roll_sql =
    "SELECT minute_ms, zone, min_margin_k, max_dew_point_c, worst_band, air_temp_c, rh_pct, surface_min_c, supply_c, "
    "surface_rh_pct FROM zone_samples WHERE minute_ms >= ?1 AND minute_ms < ?2";
constexpr const char* k_delete_rolled_sql = "DELETE FROM zone_samples WHERE minute_ms >= ?1 AND minute_ms < ?2";
constexpr const char* k_newest_sample_sql = "SELECT max(minute_ms) FROM zone_samples";
constexpr const char* k_next_sample_sql = "SELECT min(minute_ms) FROM zone_samples WHERE minute_ms >= ?1";
constexpr const char* k_read_mark_sql = "SELECT value_ms FROM store_marks WHERE name = ?1";
constexpr const char* k_set_mark_sql = "INSERT OR REPLACE INTO store_marks (name, value_ms) VALUES (?1, ?2)";
constexpr const char* k_mark_hours_until = "hours_until";
constexpr const char* k_mark_minutes_from = "minutes_from";
// A batch whose samples complete at most this many hours is summarised in its own commit; a
// longer gap (a file migrated from version 2, a long outage) is caught up by maintenance passes.
constexpr std::int64_t k_inline_summary_hours = 24;

std::int64_t floor_to(std::int64_t ms, std::int64_t unit) { return ms - (((ms % unit) + unit) % unit); }

std::string seconds_text(std::chrono::milliseconds d) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.2f s", static_cast<double>(d.count()) / 1000.0);
  return buf;
}

std::optional<std::int64_t> cutoff_ms(timestamp now, double keep_days) {
  if (!(keep_days > 0.0)) return std::nullopt;
  return to_unix_ms(now) - std::llround(keep_days * k_ms_per_day);
}

// What a failed write step was doing, for the report.
struct write_failure {
  std::string step;
  std::string sqlite_text;
};

}  // namespace

store_writer_options store_writer_options_from(const storage_config& storage) {
  store_writer_options o;
  o.path = storage.path;
  o.keep_events_days = storage.keep_events_days;
  o.keep_samples_days = storage.keep_samples_days;
  o.keep_minute_samples_days = storage.keep_minute_samples_days;
  return o;
}

class store_writer::impl {
 public:
  impl(store_writer_options options, connection db) : options_(std::move(options)), db_(std::move(db)) {
    backoff_ = options_.retry_backoff_initial;
  }

  ~impl() { stop(std::chrono::seconds{5}); }
  impl(const impl&) = delete;
  impl& operator=(const impl&) = delete;

  // Prepared once; re-prepared by SQLite itself after a schema change.
  std::optional<store_error> prepare_statements() {
    const std::pair<const char*, statement*> all[] = {
        {k_insert_event_sql, &insert_event_},
        {k_upsert_sample_sql, &upsert_sample_},
        {k_upsert_zone_sql, &upsert_zone_},
        {k_upsert_loop_sql, &upsert_loop_},
        {k_delete_old_events_sql, &delete_old_events_},
        {k_delete_old_samples_sql, &delete_old_samples_},
        {k_delete_old_hours_sql, &delete_old_hours_},
        {k_oldest_sample_sql, &oldest_sample_},
        {k_minutes_to_roll_sql, &minutes_to_roll_},
        {k_delete_rolled_sql, &delete_rolled_},
        {upsert_hour_sql_.c_str(), &upsert_hour_},
        {k_newest_sample_sql, &newest_sample_},
        {k_next_sample_sql, &next_sample_},
        {k_read_mark_sql, &read_mark_},
        {k_set_mark_sql, &set_mark_},
    };
    for (const auto& [sql, stmt] : all) {
      const int rc = statement::prepare(db_.get(), sql, *stmt);
      if (rc != SQLITE_OK) {
        return store_error{store_error_kind::sqlite_failure,
                           options_.path.string() + ": preparing statements: " + describe(db_.get(), rc)};
      }
    }
    for (const auto& [name, mark] : {std::pair<const char*, std::int64_t*>{k_mark_hours_until, &hours_until_ms_},
                                     std::pair<const char*, std::int64_t*>{k_mark_minutes_from, &minutes_from_ms_}}) {
      read_mark_.bind_text(1, name);
      const int rc = sqlite3_step(read_mark_.get());
      *mark = rc == SQLITE_ROW ? sqlite3_column_int64(read_mark_.get(), 0) : 0;
      sqlite3_reset(read_mark_.get());
      if (rc != SQLITE_ROW && rc != SQLITE_DONE) {
        return store_error{store_error_kind::sqlite_failure,
                           options_.path.string() + ": reading store_marks: " + describe(db_.get(), rc)};
      }
    }
    return std::nullopt;
  }

  void start() {
    thread_ = std::thread([this] { run(); });
  }

  // The owner's reporter must not take the writer down: an exception from it has nowhere
  // else to go, so it is swallowed here (the counters still show every error).
  void report(const std::string& line) const noexcept {
    try {
      options_.report_error(line);
    } catch (...) {  // NOLINT(bugprone-empty-catch): see above
    }
  }

  void enqueue(const engine_output& output) {
    const std::size_t rows =
        output.events.size() + output.samples.size() + output.zone_snapshots.size() + output.loop_snapshots.size();
    if (rows == 0) return;
    bool report_late = false;
    {
      std::lock_guard<std::mutex> lock(mu_);
      counters_.rows_enqueued += rows;
      ++enqueued_seq_;  // also when dropped below: a later flush() must not report them written
      if (stopping_ || thread_done_) {
        counters_.dropped_rows += rows;
        report_late = !reported_late_;
        reported_late_ = true;
      } else {
        const bool was_empty = pending_.empty();
        const bool was_below_early = pending_.size() < options_.commit_early_rows;
        pending_.add(output);
        counters_.dropped_rows += pending_.enforce_limit(options_.max_pending_rows);
        if (was_empty) oldest_pending_since_ = steady::now();
        // Wake the writer only when its schedule changes: the first row (a commit is now due in
        // commit_interval) or crossing the early threshold.
        if (was_empty || (was_below_early && pending_.size() >= options_.commit_early_rows)) wake_.notify_one();
      }
    }
    if (report_late) {
      report(options_.path.string() + ": rows enqueued after the writer stopped are dropped");
    }
  }

  bool flush(std::chrono::milliseconds timeout) {
    std::unique_lock<std::mutex> lock(mu_);
    const std::uint64_t target = enqueued_seq_;
    if (committed_seq_ >= target) return true;
    attempt_now_ = true;
    wake_.notify_one();
    return progress_.wait_for(lock, timeout, [&] { return committed_seq_ >= target || thread_done_; }) &&
           committed_seq_ >= target;
  }

  bool run_maintenance(std::chrono::milliseconds timeout) {
    std::unique_lock<std::mutex> lock(mu_);
    if (thread_done_) return false;
    const std::uint64_t target = counters_.maintenance_passes + 1 + (maintenance_running_ ? 1 : 0);
    maintenance_requested_ = true;
    wake_.notify_one();
    return progress_.wait_for(lock, timeout, [&] { return counters_.maintenance_passes >= target || thread_done_; }) &&
           counters_.maintenance_passes >= target;
  }

  void stop(std::chrono::milliseconds timeout) {
    {
      std::lock_guard<std::mutex> lock(mu_);
      if (!stopping_) {
        stopping_ = true;
        stop_deadline_ = steady::now() + timeout;
      }
      wake_.notify_one();
    }
    if (thread_.joinable()) thread_.join();
    db_.close();
  }

  store_writer_counters counters() const {
    std::lock_guard<std::mutex> lock(mu_);
    store_writer_counters c = counters_;
    c.pending_rows = pending_.size() + in_flight_rows_;
    c.in_flight_rows = in_flight_rows_;
    return c;
  }

  const std::filesystem::path& path() const { return options_.path; }

 private:
  void run() {
    try {
      run_loop();
    } catch (const std::exception& e) {
      // Nothing may escape the thread; a failure here (e.g. out of memory) ends the writer.
      report(options_.path.string() + ": store writer stopped by an exception: " + e.what());
    }
    std::lock_guard<std::mutex> lock(mu_);
    thread_done_ = true;
    progress_.notify_all();
  }

  void run_loop() {
    std::unique_lock<std::mutex> lock(mu_);
    maintain(lock);  // at start: a service that was off for a while catches up on retention
    next_maintenance_ = steady::now() + options_.maintenance_interval;
    for (;;) {
      const auto now = steady::now();
      const bool have_rows = !pending_.empty();
      // When a commit is due: after a failure not before the back-off; otherwise once the
      // oldest row has waited commit_interval, or at once with many rows or while stopping.
      steady::time_point commit_due = retry_at_;
      if (!retrying_ && have_rows && !stopping_ && pending_.size() < options_.commit_early_rows &&
          oldest_pending_since_) {
        commit_due = *oldest_pending_since_ + options_.commit_interval;
      }
      if (have_rows && (attempt_now_ || now >= commit_due)) {
        attempt_now_ = false;
        commit(lock);
        continue;
      }
      if (!have_rows) {
        attempt_now_ = false;
        // Everything enqueued so far is written or was dropped: flush() waiters may go.
        if (committed_seq_ != enqueued_seq_) {
          committed_seq_ = enqueued_seq_;
          progress_.notify_all();
        }
      }
      if (stopping_ && (!have_rows || now >= stop_deadline_)) break;
      if (maintenance_requested_ || (!stopping_ && now >= next_maintenance_)) {
        maintain(lock);
        next_maintenance_ = steady::now() + options_.maintenance_interval;
        continue;
      }
      steady::time_point wake_at = next_maintenance_;
      if (have_rows) wake_at = std::min(wake_at, commit_due);
      if (stopping_) wake_at = std::min(wake_at, stop_deadline_);
      wake_.wait_until(lock, wake_at);
    }
    const std::size_t left = pending_.size();
    if (left > 0) {
      counters_.dropped_rows += left;
      pending_ = pending_rows{};
      lock.unlock();
      report(options_.path.string() + ": stopped with " + std::to_string(left) + " rows not written (they are lost)");
      lock.lock();
    }
  }

  // Takes everything pending, writes it in one transaction without holding the lock, and on
  // failure puts it back in front of what arrived meanwhile.
  void commit(std::unique_lock<std::mutex>& lock) {
    pending_rows batch;
    std::swap(batch, pending_);
    oldest_pending_since_.reset();
    const std::uint64_t batch_seq = enqueued_seq_;
    in_flight_rows_ = batch.size();
    lock.unlock();

    const auto started = steady::now();
    const std::optional<write_failure> failure = write(batch);
    const auto took_us = static_cast<std::uint64_t>(
        std::chrono::duration_cast<std::chrono::microseconds>(steady::now() - started).count());
    const std::size_t rows = batch.size();
    if (!failure) batch = pending_rows{};  // free the rows before taking the lock: enqueue() must not wait for it

    lock.lock();
    in_flight_rows_ = 0;
    if (!failure) {
      committed_seq_ = batch_seq;
      counters_.rows_written += rows;
      ++counters_.commits;
      counters_.last_commit_us = took_us;
      counters_.max_commit_us = std::max(counters_.max_commit_us, took_us);
      counters_.total_commit_us += took_us;
      backoff_ = options_.retry_backoff_initial;
      retrying_ = false;
      retry_at_ = steady::time_point{};
      progress_.notify_all();
      return;
    }
    ++counters_.errors;
    const std::string sizes = std::to_string(rows) + " rows (" + std::to_string(batch.event_count()) + " events, " +
                              std::to_string(batch.samples().size()) + " samples, " +
                              std::to_string(batch.zone_snapshots().size() + batch.loop_snapshots().size()) +
                              " snapshots)";
    pending_.prepend(std::move(batch));
    const std::size_t dropped = pending_.enforce_limit(options_.max_pending_rows);
    counters_.dropped_rows += dropped;
    oldest_pending_since_ = steady::now();
    retrying_ = true;
    const auto wait = backoff_;
    retry_at_ = steady::now() + wait;
    backoff_ = std::min(backoff_ * 2, options_.retry_backoff_max);
    progress_.notify_all();
    std::string message = options_.path.string() + ": commit of " + sizes + " failed while " + failure->step + ": " +
                          failure->sqlite_text + "; rolled back, rows kept, retry in " + seconds_text(wait);
    if (dropped > 0) message += "; pending list full, " + std::to_string(dropped) + " oldest rows dropped";
    lock.unlock();
    report(message);
    lock.lock();
  }

  // Runs on the writer's thread only, without the lock.
  std::optional<write_failure> write(const pending_rows& batch) {
    sqlite3* db = db_.get();
    std::optional<write_failure> failure;
    const auto fail = [&](std::string step, int step_rc) {
      failure = write_failure{std::move(step), describe(db, step_rc)};
      // Some errors (SQLITE_FULL, SQLITE_IOERR ...) roll back on their own; the rest we do.
      if (sqlite3_get_autocommit(db) == 0) exec(db, "ROLLBACK");
    };
    int rc = exec(db, "BEGIN IMMEDIATE");
    if (rc != SQLITE_OK) {
      fail("beginning the transaction", rc);
      return failure;
    }
    std::size_t index = 0;
    batch.for_each_event([&](const event_record& e) {
      if (failure) return;
      ++index;
      rc = insert_event_.run(to_unix_ms(e.ts), subject_type_name(e.subject), e.subject_id, e.kind, e.json);
      if (rc != SQLITE_DONE) {
        fail("inserting event " + std::to_string(index) + " (" + e.kind + " of " + subject_type_name(e.subject) + " '" +
                 e.subject_id + "' at " + format_iso8601_utc(e.ts) + ")",
             rc);
      }
    });
    if (failure) return failure;
    for (const auto& z : batch.samples()) {
      rc = upsert_sample_.run(to_unix_ms(z.minute_start), z.zone, z.min_margin_k, z.max_dew_point_c, z.worst_band,
                              z.air_temp_c, z.rh_pct, z.surface_min_c, z.supply_c, z.surface_rh_pct);
      if (rc != SQLITE_DONE) {
        fail("writing the sample of zone '" + z.zone + "' at " + format_iso8601_utc(z.minute_start), rc);
        return failure;
      }
    }
    // Hourly summaries in the same commit: hours this batch completed, and hours already
    // summarised that got a late sample (summarised again from their minutes).
    std::int64_t hours_until = hours_until_ms_;
    if (!batch.samples().empty()) {
      std::int64_t newest_hour = std::numeric_limits<std::int64_t>::min();
      std::set<std::int64_t> late_hours;
      for (const auto& z : batch.samples()) {
        const std::int64_t hour = floor_to(to_unix_ms(z.minute_start), store_detail::k_ms_per_hour);
        newest_hour = std::max(newest_hour, hour);
        if (hour < hours_until_ms_ && hour >= minutes_from_ms_) late_hours.insert(hour);
      }
      for (const std::int64_t hour : late_hours) {
        if (auto f = summarise_hours(hour, hour + store_detail::k_ms_per_hour, nullptr)) {
          fail("summarising the hour " + format_iso8601_utc(from_unix_ms(hour)) + " again (" + f->first + ")",
               f->second);
          return failure;
        }
      }
      if (newest_hour > hours_until) {
        std::int64_t from = newest_hour;
        rc = next_sample_at_or_after(hours_until, from);
        if (rc != SQLITE_OK) {
          fail("finding the first sample to summarise", rc);
          return failure;
        }
        from = std::min(from, newest_hour);
        if (newest_hour - from <= k_inline_summary_hours * store_detail::k_ms_per_hour) {
          if (auto f = summarise_hours(from, newest_hour, nullptr)) {
            fail(
                "summarising the hours before " + format_iso8601_utc(from_unix_ms(newest_hour)) + " (" + f->first + ")",
                f->second);
            return failure;
          }
          hours_until = newest_hour;
          rc = set_mark_.run(k_mark_hours_until, hours_until);
          if (rc != SQLITE_DONE) {
            fail("setting the hours_until mark", rc);
            return failure;
          }
        }
      }
    }
    for (const auto& [zone, z] : batch.zone_snapshots()) {
      const std::optional<std::int64_t> shelved_until_ms =
          z.shelved_until ? std::optional<std::int64_t>(to_unix_ms(*z.shelved_until)) : std::nullopt;
      rc = upsert_zone_.run(z.zone, z.band, z.alarm_active ? 1 : 0, z.acknowledged ? 1 : 0, shelved_until_ms, z.valve,
                            to_unix_ms(z.ts));
      if (rc != SQLITE_DONE) {
        fail("writing the state of zone '" + zone + "'", rc);
        return failure;
      }
    }
    for (const auto& [loop, l] : batch.loop_snapshots()) {
      rc = upsert_loop_.run(l.loop, l.setpoint_c, to_unix_ms(l.ts));
      if (rc != SQLITE_DONE) {
        fail("writing the state of loop '" + loop + "'", rc);
        return failure;
      }
    }
    rc = exec(db, "COMMIT");
    if (rc != SQLITE_OK) {
      fail("committing", rc);
    } else {
      hours_until_ms_ = hours_until;
    }
    return failure;
  }

  // SQLITE_OK and the time of the first sample at or after `from_ms` in `out` (unchanged when
  // there is none), or SQLite's error.
  int next_sample_at_or_after(std::int64_t from_ms, std::int64_t& out) {
    next_sample_.bind_int64(1, from_ms);
    const int rc = sqlite3_step(next_sample_.get());
    if (rc == SQLITE_ROW && sqlite3_column_type(next_sample_.get(), 0) != SQLITE_NULL) {
      out = floor_to(sqlite3_column_int64(next_sample_.get(), 0), store_detail::k_ms_per_hour);
    }
    sqlite3_reset(next_sample_.get());
    return rc == SQLITE_ROW || rc == SQLITE_DONE ? SQLITE_OK : rc;
  }

  // Inside a transaction: (re)writes the zone_hours rows of [from_ms, to_ms) (whole hours) from
  // their per-minute samples. On failure: what failed and SQLite's code.
  std::optional<std::pair<std::string, int>> summarise_hours(std::int64_t from_ms, std::int64_t to_ms,
                                                             std::uint64_t* minutes_read) {
    std::map<std::pair<std::int64_t, std::string>, zone_period> hours;
    const statement& s = minutes_to_roll_;
    s.bind_int64(1, from_ms);
    s.bind_int64(2, to_ms);
    int rc = SQLITE_OK;
    while ((rc = sqlite3_step(s.get())) == SQLITE_ROW) {
      store_detail::read_minute_row(s.get(), summary_scratch_, summary_minute_);
      const std::int64_t hour_ms = floor_to(to_unix_ms(summary_minute_.start), store_detail::k_ms_per_hour);
      auto it = hours.find({hour_ms, summary_minute_.zone});
      if (it == hours.end()) {
        it = hours
                 .emplace(std::make_pair(hour_ms, summary_minute_.zone),
                          empty_period(summary_minute_.zone, from_unix_ms(hour_ms), 0))
                 .first;
      }
      merge_period(it->second, summary_minute_);
      if (minutes_read != nullptr) ++*minutes_read;
    }
    sqlite3_reset(s.get());
    if (rc != SQLITE_DONE) return std::make_pair(std::string("reading samples"), rc);
    for (auto& [key, hour] : hours) {
      // Minutes missing at the end of the hour break a mould run there.
      if (hour.length_min < 60) merge_period(hour, empty_period(hour.zone, hour.start + std::chrono::hours{1}, 0));
      rc = store_detail::write_hour_row(upsert_hour_, hour);
      if (rc != SQLITE_DONE) return std::make_pair(std::string("writing an hourly row"), rc);
    }
    return std::nullopt;
  }

  // One maintenance pass; called with the lock held, runs the SQL without it.
  void maintain(std::unique_lock<std::mutex>& lock) {
    maintenance_requested_ = false;
    maintenance_running_ = true;
    const int pass = static_cast<int>(counters_.maintenance_passes);
    lock.unlock();

    std::vector<std::string> problems;
    const timestamp now =
        options_.retention_now
            ? options_.retention_now()
            : std::chrono::time_point_cast<std::chrono::milliseconds>(std::chrono::system_clock::now());
    const std::uint64_t minutes_rolled = roll_up(now, problems);
    const std::uint64_t events_deleted =
        delete_older(delete_old_events_, "events", cutoff_ms(now, options_.keep_events_days), problems);
    const auto samples_cutoff = cutoff_ms(now, options_.keep_samples_days);
    const std::uint64_t samples_deleted = delete_older(delete_old_samples_, "zone_samples", samples_cutoff, problems);
    const std::uint64_t hours_deleted = delete_older(delete_old_hours_, "zone_hours", samples_cutoff, problems);
    vacuum_free_pages(problems);
    checkpoint(pass, problems);

    lock.lock();
    counters_.events_deleted += events_deleted;
    counters_.samples_deleted += samples_deleted;
    counters_.hours_deleted += hours_deleted;
    counters_.minutes_rolled_up += minutes_rolled;
    counters_.errors += problems.size();
    ++counters_.maintenance_passes;
    maintenance_running_ = false;
    progress_.notify_all();
    if (problems.empty()) return;
    lock.unlock();
    for (const auto& p : problems) report(options_.path.string() + ": maintenance: " + p);
    lock.lock();
  }

  // Hourly summaries and the roll-up, a few hours per transaction, until done or the pass has
  // used its time budget:
  // 1. late samples before minutes_from (their hour's minutes are gone) are merged into it;
  // 2. hours not summarised yet (after a migration or an outage, and every hour older than
  //    keep_minute_samples_days) are summarised;
  // 3. per-minute samples older than keep_minute_samples_days (whole hours) are deleted: their
  //    hours keep min, max, mean, minutes in each band and the mould figures.
  // Returns the number of per-minute rows rolled up (deleted, their hour kept).
  std::uint64_t roll_up(timestamp now, std::vector<std::string>& problems) {
    const auto cutoff = cutoff_ms(now, options_.keep_minute_samples_days);
    const std::optional<std::int64_t> cutoff_hour =
        cutoff ? std::optional<std::int64_t>(floor_to(*cutoff, store_detail::k_ms_per_hour)) : std::nullopt;
    const std::int64_t batch_ms =
        std::max<std::int64_t>(1, options_.rollup_hours_per_batch) * store_detail::k_ms_per_hour;
    const auto deadline = steady::now() + options_.rollup_pass_budget;
    sqlite3* db = db_.get();
    std::uint64_t rolled = 0;
    const auto range_text = [](std::int64_t from_ms, std::int64_t to_ms) {
      return format_iso8601_utc(from_unix_ms(from_ms)) + " … " + format_iso8601_utc(from_unix_ms(to_ms));
    };
    // 1. Late samples below minutes_from.
    do {
      int rc = sqlite3_step(oldest_sample_.get());
      const bool have = rc == SQLITE_ROW && sqlite3_column_type(oldest_sample_.get(), 0) != SQLITE_NULL;
      const std::int64_t oldest = have ? sqlite3_column_int64(oldest_sample_.get(), 0) : 0;
      sqlite3_reset(oldest_sample_.get());
      if (rc != SQLITE_ROW) {
        problems.push_back("roll-up: finding the oldest sample: " + describe(db, rc) + "; retried on the next pass");
        return rolled;
      }
      if (!have || oldest >= minutes_from_ms_) break;
      const std::int64_t from_ms = floor_to(oldest, store_detail::k_ms_per_hour);
      const std::int64_t to_ms = std::min(from_ms + batch_ms, minutes_from_ms_);
      std::string failed_step;
      const std::uint64_t n = roll_up_range(from_ms, to_ms, failed_step);
      if (!failed_step.empty()) {
        problems.push_back("roll-up of " + range_text(from_ms, to_ms) + ": " + failed_step +
                           "; retried on the next pass");
        return rolled;
      }
      rolled += n;
    } while (steady::now() < deadline);
    // 2. Summaries up to the newest complete hour (and at least up to the roll-up's cut-off).
    std::int64_t target = hours_until_ms_;
    {
      int rc = sqlite3_step(newest_sample_.get());
      if (rc == SQLITE_ROW && sqlite3_column_type(newest_sample_.get(), 0) != SQLITE_NULL) {
        target = floor_to(sqlite3_column_int64(newest_sample_.get(), 0), store_detail::k_ms_per_hour);
      }
      sqlite3_reset(newest_sample_.get());
      if (rc != SQLITE_ROW) {
        problems.push_back("summaries: finding the newest sample: " + describe(db, rc) + "; retried on the next pass");
        return rolled;
      }
      if (cutoff_hour) target = std::max(target, *cutoff_hour);
    }
    while (hours_until_ms_ < target && steady::now() < deadline) {
      const auto failed = [&](const std::string& what, int rc, std::int64_t to_ms) {
        problems.push_back("summaries of " + range_text(hours_until_ms_, to_ms) + ": " + what + ": " +
                           describe(db, rc) + "; retried on the next pass");
        if (sqlite3_get_autocommit(db) == 0) exec(db, "ROLLBACK");
      };
      int rc = exec(db, "BEGIN IMMEDIATE");
      if (rc != SQLITE_OK) {
        failed("beginning the transaction", rc, target);
        return rolled;
      }
      std::int64_t from_ms = target;
      rc = next_sample_at_or_after(hours_until_ms_, from_ms);
      if (rc != SQLITE_OK) {
        failed("finding the first sample", rc, target);
        return rolled;
      }
      from_ms = std::max(std::min(from_ms, target), hours_until_ms_);
      const std::int64_t to_ms = std::min(from_ms + batch_ms, target);
      if (auto f = summarise_hours(from_ms, to_ms, nullptr)) {
        failed(f->first, f->second, to_ms);
        return rolled;
      }
      rc = set_mark_.run(k_mark_hours_until, to_ms);
      if (rc != SQLITE_DONE) {
        failed("setting the hours_until mark", rc, to_ms);
        return rolled;
      }
      rc = exec(db, "COMMIT");
      if (rc != SQLITE_OK) {
        failed("committing", rc, to_ms);
        return rolled;
      }
      hours_until_ms_ = to_ms;
    }
    // 3. Old minutes go; their hours stay.
    if (!cutoff_hour) return rolled;
    const std::int64_t end_ms = std::min(*cutoff_hour, hours_until_ms_);
    while (minutes_from_ms_ < end_ms && steady::now() < deadline) {
      const auto failed = [&](const std::string& what, int rc) {
        problems.push_back("roll-up of the minutes before " + format_iso8601_utc(from_unix_ms(end_ms)) + ": " + what +
                           ": " + describe(db, rc) + "; retried on the next pass");
        if (sqlite3_get_autocommit(db) == 0) exec(db, "ROLLBACK");
      };
      int rc = exec(db, "BEGIN IMMEDIATE");
      if (rc != SQLITE_OK) {
        failed("beginning the transaction", rc);
        return rolled;
      }
      std::int64_t first_ms = end_ms;
      rc = next_sample_at_or_after(minutes_from_ms_, first_ms);
      if (rc != SQLITE_OK) {
        failed("finding the oldest sample", rc);
        return rolled;
      }
      const std::int64_t to_ms = std::min(std::max(first_ms, minutes_from_ms_) + batch_ms, end_ms);
      rc = delete_rolled_.run(minutes_from_ms_, to_ms);
      if (rc != SQLITE_DONE) {
        failed("deleting rolled-up samples", rc);
        return rolled;
      }
      const auto deleted = static_cast<std::uint64_t>(sqlite3_changes64(db));
      rc = set_mark_.run(k_mark_minutes_from, to_ms);
      if (rc != SQLITE_DONE) {
        failed("setting the minutes_from mark", rc);
        return rolled;
      }
      rc = exec(db, "COMMIT");
      if (rc != SQLITE_OK) {
        failed("committing", rc);
        return rolled;
      }
      minutes_from_ms_ = to_ms;
      rolled += deleted;
    }
    return rolled;
  }

  // One transaction: reads the minutes of [from_ms, to_ms), merges them per zone and hour (into
  // an hour already rolled up, if a late sample arrived for it), writes the hours and deletes
  // the minutes. On failure `failed_step` says what failed and nothing changed.
  std::uint64_t roll_up_range(std::int64_t from_ms, std::int64_t to_ms, std::string& failed_step) {
    sqlite3* db = db_.get();
    const auto failed = [&](const char* what, int rc) {
      failed_step = std::string(what) + ": " + describe(db, rc);
      if (sqlite3_get_autocommit(db) == 0) exec(db, "ROLLBACK");
      return std::uint64_t{0};
    };
    int rc = exec(db, "BEGIN IMMEDIATE");
    if (rc != SQLITE_OK) return failed("beginning the transaction", rc);
    std::map<std::pair<std::int64_t, std::string>, zone_period> hours;
    {
      statement existing;
      const std::string sql = std::string("SELECT ") + store_detail::k_hour_columns +
                              " FROM zone_hours WHERE hour_ms >= ?1 AND hour_ms < ?2";
      rc = statement::prepare(db, sql, existing);
      if (rc != SQLITE_OK) return failed("querying hourly rows", rc);
      existing.bind_int64(1, from_ms);
      existing.bind_int64(2, to_ms);
      zone_period h;
      while ((rc = sqlite3_step(existing.get())) == SQLITE_ROW) {
        store_detail::read_hour_row(existing.get(), h);
        hours.emplace(std::make_pair(to_unix_ms(h.start), h.zone), h);
      }
      if (rc != SQLITE_DONE) return failed("reading hourly rows", rc);
    }
    std::uint64_t minutes = 0;
    {
      const statement& s = minutes_to_roll_;
      s.bind_int64(1, from_ms);
      s.bind_int64(2, to_ms);
      zone_sample scratch;
      zone_period minute;
      while ((rc = sqlite3_step(s.get())) == SQLITE_ROW) {
        store_detail::read_minute_row(s.get(), scratch, minute);
        const std::int64_t hour_ms = floor_to(to_unix_ms(minute.start), store_detail::k_ms_per_hour);
        auto it = hours.find({hour_ms, minute.zone});
        if (it == hours.end()) {
          it = hours.emplace(std::make_pair(hour_ms, minute.zone), empty_period(minute.zone, from_unix_ms(hour_ms), 0))
                   .first;
        }
        merge_period(it->second, minute);
        ++minutes;
      }
      sqlite3_reset(s.get());
      if (rc != SQLITE_DONE) return failed("reading samples", rc);
    }
    for (auto& [key, hour] : hours) {
      // Minutes missing at the end of the hour break a mould run there.
      if (hour.length_min < 60) merge_period(hour, empty_period(hour.zone, hour.start + std::chrono::hours{1}, 0));
      rc = store_detail::write_hour_row(upsert_hour_, hour);
      if (rc != SQLITE_DONE) return failed("writing an hourly row", rc);
    }
    rc = delete_rolled_.run(from_ms, to_ms);
    if (rc != SQLITE_DONE) return failed("deleting rolled-up samples", rc);
    rc = exec(db, "COMMIT");
    if (rc != SQLITE_OK) return failed("committing", rc);
    return minutes;
  }

  // Deletes rows older than the cut-off in transactions of retention_batch_rows, at most
  // retention_batches_per_pass of them, so the write lock is never held for long.
  std::uint64_t delete_older(const statement& stmt, const char* table, std::optional<std::int64_t> cutoff,
                             std::vector<std::string>& problems) {
    if (!cutoff) return 0;
    sqlite3* db = db_.get();
    std::uint64_t deleted = 0;
    for (int batch = 0; batch < options_.retention_batches_per_pass; ++batch) {
      int rc = exec(db, "BEGIN IMMEDIATE");
      if (rc != SQLITE_OK) {
        problems.push_back(std::string("retention of ") + table + ": beginning the transaction: " + describe(db, rc) +
                           "; retried on the next pass");
        break;
      }
      rc = stmt.run(*cutoff, static_cast<std::int64_t>(options_.retention_batch_rows));
      const std::string text = rc == SQLITE_DONE ? std::string() : describe(db, rc);
      if (rc != SQLITE_DONE) {
        if (sqlite3_get_autocommit(db) == 0) exec(db, "ROLLBACK");
        problems.push_back(std::string("retention of ") + table + ": deleting: " + text + "; retried on the next pass");
        break;
      }
      const auto changed = static_cast<std::uint64_t>(sqlite3_changes64(db));
      rc = exec(db, "COMMIT");
      if (rc != SQLITE_OK) {
        problems.push_back(std::string("retention of ") + table + ": committing: " + describe(db, rc) +
                           "; retried on the next pass");
        if (sqlite3_get_autocommit(db) == 0) exec(db, "ROLLBACK");
        break;
      }
      deleted += changed;
      if (changed < options_.retention_batch_rows) break;  // nothing older left
    }
    return deleted;
  }

  // Gives free pages back to the file system, a bounded number per pass (never a full VACUUM).
  void vacuum_free_pages(std::vector<std::string>& problems) {
    sqlite3* db = db_.get();
    std::int64_t free_pages = 0;
    int rc = store_detail::query_int64(db, "PRAGMA freelist_count", free_pages);
    if (rc != SQLITE_OK) {
      problems.push_back("reading freelist_count: " + describe(db, rc));
      return;
    }
    if (free_pages == 0) return;
    const std::string sql = "PRAGMA incremental_vacuum(" + std::to_string(options_.incremental_vacuum_pages) + ")";
    rc = exec(db, sql.c_str());
    if (rc != SQLITE_OK) problems.push_back("incremental vacuum: " + describe(db, rc));
  }

  // PASSIVE never waits; TRUNCATE (every Nth pass) keeps the WAL file small but needs all
  // readers gone, so it gets a short busy timeout and a busy result is not a problem.
  void checkpoint(int pass, std::vector<std::string>& problems) {
    sqlite3* db = db_.get();
    const bool truncate = options_.checkpoint_truncate_every > 0 &&
                          pass % options_.checkpoint_truncate_every == options_.checkpoint_truncate_every - 1;
    if (truncate) sqlite3_busy_timeout(db, 100);
    const int rc = sqlite3_wal_checkpoint_v2(
        db, nullptr, truncate ? SQLITE_CHECKPOINT_TRUNCATE : SQLITE_CHECKPOINT_PASSIVE, nullptr, nullptr);
    if (truncate) sqlite3_busy_timeout(db, static_cast<int>(options_.busy_timeout.count()));
    if (rc != SQLITE_OK && (rc & 0xff) != SQLITE_BUSY) problems.push_back("WAL checkpoint: " + describe(db, rc));
  }

  const store_writer_options options_;
  connection db_;  // used by the writer's thread only (and closed by stop() after the join)
  statement insert_event_;
  statement upsert_sample_;
  statement upsert_zone_;
  statement upsert_loop_;
  statement delete_old_events_;
  statement delete_old_samples_;
  statement delete_old_hours_;
  statement oldest_sample_;
  statement minutes_to_roll_;
  statement delete_rolled_;
  const std::string upsert_hour_sql_ = store_detail::upsert_hour_sql();
  statement upsert_hour_;
  statement newest_sample_;
  statement next_sample_;
  statement read_mark_;
  statement set_mark_;
  // store_marks as committed (see store_schema.h); the writer's thread is their only writer.
  std::int64_t hours_until_ms_ = 0;
  std::int64_t minutes_from_ms_ = 0;
  zone_sample summary_scratch_;  // reused per row by summarise_hours
  zone_period summary_minute_;
  std::thread thread_;

  mutable std::mutex mu_;
  std::condition_variable wake_;      // the writer waits on it
  std::condition_variable progress_;  // flush() and run_maintenance() wait on it
  pending_rows pending_;
  std::size_t in_flight_rows_ = 0;
  std::uint64_t enqueued_seq_ = 0;   // enqueue() calls so far
  std::uint64_t committed_seq_ = 0;  // calls whose rows are committed (or were dropped)
  std::optional<steady::time_point> oldest_pending_since_;
  bool retrying_ = false;  // the last commit failed: the next one waits for retry_at_ only
  steady::time_point retry_at_{};
  std::chrono::milliseconds backoff_{};
  steady::time_point next_maintenance_{};
  steady::time_point stop_deadline_{};
  bool attempt_now_ = false;
  bool maintenance_requested_ = false;
  bool maintenance_running_ = false;
  bool stopping_ = false;
  bool thread_done_ = false;
  bool reported_late_ = false;
  store_writer_counters counters_;
};

store_result<store_writer> store_writer::open(store_writer_options options) {
  const auto invalid = [&](const std::string& what) {
    return store_error{store_error_kind::invalid_options, options.path.string() + ": " + what};
  };
  if (!options.report_error) return invalid("store writer needs a report_error callback");
  if (options.max_pending_rows == 0) return invalid("max_pending_rows must be at least 1");
  if (options.retention_batch_rows == 0) return invalid("retention_batch_rows must be at least 1");
  if (options.retry_backoff_initial.count() <= 0 || options.retry_backoff_max < options.retry_backoff_initial) {
    return invalid("retry back-off must be positive and its maximum at least the initial value");
  }
  store_detail::open_settings settings;
  settings.busy_timeout = options.busy_timeout;
  settings.journal_size_limit_bytes = options.journal_size_limit_bytes;
  auto db = store_detail::open_history_db(options.path, store_detail::open_mode::read_write, settings);
  if (!db.ok()) return db.err();
  auto p = std::make_unique<impl>(std::move(options), std::move(db).value());
  if (auto failure = p->prepare_statements()) return *failure;
  p->start();
  return store_writer(std::move(p));
}

store_writer::store_writer(std::unique_ptr<impl> p) : impl_(std::move(p)) {}
store_writer::store_writer(store_writer&&) noexcept = default;
store_writer& store_writer::operator=(store_writer&&) noexcept = default;
store_writer::~store_writer() = default;

void store_writer::enqueue(const engine_output& output) { impl_->enqueue(output); }
bool store_writer::flush(std::chrono::milliseconds timeout) { return impl_->flush(timeout); }
bool store_writer::run_maintenance(std::chrono::milliseconds timeout) { return impl_->run_maintenance(timeout); }
void store_writer::stop(std::chrono::milliseconds timeout) {
  if (impl_) impl_->stop(timeout);
}
store_writer_counters store_writer::counters() const { return impl_->counters(); }
const std::filesystem::path& store_writer::path() const { return impl_->path(); }

store_result<restored_state> store_writer::load_restored_state() const {
  auto reader = history_reader::open(impl_->path());
  if (!reader.ok()) return reader.err();
  return reader.value().load_restored_state();
}

}  // namespace dewmargin
