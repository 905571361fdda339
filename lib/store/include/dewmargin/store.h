#pragma once
// dewmargin::store — the SQLite adapter that keeps the history (event log, per-minute zone
// samples) and the state a restarted service restores.
//
// Design decisions
// - File identity: PRAGMA application_id = "DwMg" marks our files. A file with another id, or
//   an id of 0 but tables in it, is foreign and never written to. A file that is not SQLite at
//   all is refused with its own message. Both are exit 1 for `dewmargin history`.
// - Versioning: PRAGMA user_version is the schema version. Migrations are a list applied in
//   order, each in its own BEGIN IMMEDIATE transaction that also bumps user_version, so a
//   crash leaves the file at the previous version, never half-migrated. The version is
//   re-read inside the transaction, so two processes opening a new file do not both migrate.
//   A newer version is refused (we never write what we do not understand); the read-only
//   side also refuses an older one (it cannot migrate; the service does on its next start).
// - Pragmas: auto_vacuum=INCREMENTAL before the first table (it cannot be changed later
//   without a VACUUM), journal_mode=WAL (persistent in the file), and per connection
//   synchronous=NORMAL (a power cut may lose the last commits, never corrupt the file),
//   busy_timeout, journal_size_limit.
// - Writer: enqueue() copies rows into an in-memory pending list under a short mutex and
//   returns; it never waits for the disk. One thread owns the write connection and commits
//   everything pending in one BEGIN IMMEDIATE transaction with prepared statements: when a
//   row has waited commit_interval (1 s), as soon as commit_early_rows wait, on flush() and at
//   stop(). A batch commits or rolls back whole; an enqueue() call's rows never straddle
//   two transactions (unless some were dropped in an overflow).
//   The writer takes the lock only to swap the pending list out and to update counters; the
//   committed rows are freed before it takes the lock again. Connections are opened NOMUTEX:
//   each is used by one thread at a time.
// - Failures: a failed commit is rolled back, reported through the owner's callback with the
//   file, the step, SQLite's message and code, and its rows go back to the front of the
//   pending list to be retried after a doubling back-off (250 ms … 30 s). flush() asks for
//   an attempt at once; stop() keeps retrying until its timeout, then reports and counts what
//   is left as dropped. No SQLite call happens on the caller's thread. The callback is
//   required (open() refuses without it); an exception thrown by it is contained.
// - Overflow: the pending list is bounded (200,000 rows). Beyond it the oldest samples are
//   dropped first, then the oldest events that are not alarm-related (kinds other than band,
//   ack, shelve, unshelve), then as a last resort the oldest alarm-related ones. Zone and loop
//   snapshots are coalesced per id (only the latest matters) and never dropped. Every dropped
//   row is counted. The bound applies to the rows waiting; a batch being written comes on top
//   of it until its commit fails and it rejoins the list.
// - Snapshots are upserted into zone_state / loop_state; a later sample for the same
//   (zone, minute) replaces the earlier one (a restart within a minute).
// - Retention: events older than keep_events_days and samples older than keep_samples_days
//   are deleted in transactions of 1000 rows, a few per pass, at start and every 10 minutes
//   (steady clock), so a pass never holds the write lock for long. Each pass then returns
//   free pages with PRAGMA incremental_vacuum(N) and checkpoints the WAL (PASSIVE; every
//   sixth pass TRUNCATE, which gives up quickly when readers are active). There is never a
//   scheduled full VACUUM. The "now" of the cut-offs is injectable for simulated time.
// - Reading: history_reader opens with SQLITE_OPEN_READONLY, so `dewmargin history` and the
//   report work while the service writes. Events come ordered by ts, then id (insertion
//   order). Filters: subject id (a zone, loop or dehumidifier), since (inclusive), until
//   (exclusive), kind. The service's restore (load_restored_state) reads the same way.
// - Retention cut-offs: keep_*_days <= 0 keeps rows forever. keep_samples_days applies to the
//   per-minute samples and to the hourly roll-ups alike.
// - Hourly summaries (schema v3): the commit that writes the first sample of a new hour also
//   writes the zone_hours rows of the hours it completed (up to 24 hours in one commit; a longer
//   gap, as after a migration from v2, is caught up by maintenance passes) and moves the mark
//   store_marks.hours_until. A late sample for an hour already summarised makes the same commit
//   summarise that hour again from its minutes, so nothing is counted twice. Each summary
//   merges the minutes per zone and hour (see zone_period.h: lowest margin and its minute,
//   highest dew point, coldest surface, means, minutes per band, mould minutes and runs).
//   Readers asked for whole hours (sample_filter::whole_hours, a report with buckets of an hour
//   or more) read the summaries before hours_until and the minutes after it.
// - Roll-up: each maintenance pass then deletes per-minute samples older than
//   keep_minute_samples_days (whole hours, already summarised), rollup_hours_per_batch hours of
//   all zones per transaction, until none is left or rollup_pass_budget is spent, and moves
//   store_marks.minutes_from; only the hours remain. A late sample for an hour whose minutes are
//   gone is merged into it by the next pass.
// - Layout (schema v2 on): zone_samples and zone_hours are WITHOUT ROWID tables keyed by time,
//   then zone: inserts append, retention and roll-up take ranges from the front, and a report
//   reads one range in one pass. Readers accept version 1 and 2 files as they are.
// - sqlite3.h stays out of these headers (pimpl); callers need only the core's types.
#include "dewmargin/history_format.h"
#include "dewmargin/history_reader.h"
#include "dewmargin/store_error.h"
#include "dewmargin/store_schema.h"
#include "dewmargin/store_writer.h"
