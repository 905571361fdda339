#include "migrations.h"

#include <algorithm>
#include <cstdio>
#include <optional>
#include <string>
#include <system_error>

#include "dewmargin/store_schema.h"

namespace dewmargin::store_detail {
namespace {

// Version 1. The same DDL is in tests/data/history/fixture.sql (a test keeps them equal).
constexpr std::string_view k_schema_v1 = R"sql(
CREATE TABLE events (
  id INTEGER PRIMARY KEY,
  ts_ms INTEGER NOT NULL,
  subject_type TEXT NOT NULL,
  subject_id TEXT NOT NULL,
  kind TEXT NOT NULL,
  json TEXT NOT NULL
);
CREATE INDEX events_by_subject_ts ON events (subject_id, ts_ms);
CREATE INDEX events_by_ts ON events (ts_ms);
CREATE INDEX events_by_kind_ts ON events (kind, ts_ms);
CREATE TABLE zone_samples (
  zone TEXT NOT NULL,
  minute_ms INTEGER NOT NULL,
  min_margin_k REAL,
  max_dew_point_c REAL,
  worst_band TEXT NOT NULL,
  air_temp_c REAL,
  rh_pct REAL,
  surface_min_c REAL,
  supply_c REAL,
  PRIMARY KEY (zone, minute_ms)
);
CREATE INDEX zone_samples_by_minute ON zone_samples (minute_ms);
CREATE TABLE zone_state (
  zone TEXT PRIMARY KEY,
  band TEXT NOT NULL,
  alarm_active INTEGER NOT NULL,
  acknowledged INTEGER NOT NULL,
  shelved_until_ms INTEGER,
  valve TEXT NOT NULL,
  ts_ms INTEGER NOT NULL
);
CREATE TABLE loop_state (
  loop TEXT PRIMARY KEY,
  setpoint_c REAL NOT NULL,
  ts_ms INTEGER NOT NULL
);
)sql";

// Version 2 (issue 12: reports over long periods, bounded storage).
// - zone_samples is clustered by time, (minute_ms, zone) WITHOUT ROWID: the writer appends at the
//   end, retention and the hourly roll-up take from the front, and a report reads one range in
//   one pass. It needs no second index (v1 had two: its primary key and minute_ms).
// - surface_rh_pct: the room air's RH at the coldest surface (NULL until the engine fills it; the
//   readers compute it from air temperature, RH and coldest surface then).
// - zone_hours: per-minute samples older than keep_minute_samples_days, rolled up per zone and
//   hour (see dewmargin/zone_period.h for what each column keeps).
// Old rows are copied in this one transaction; a v1 file of 400 days and 200 zones takes minutes.
constexpr std::string_view k_schema_v2 = R"sql(
ALTER TABLE zone_samples RENAME TO zone_samples_v1;
CREATE TABLE zone_samples (
  minute_ms INTEGER NOT NULL,
  zone TEXT NOT NULL,
  min_margin_k REAL,
  max_dew_point_c REAL,
  worst_band TEXT NOT NULL,
  air_temp_c REAL,
  rh_pct REAL,
  surface_min_c REAL,
  supply_c REAL,
  surface_rh_pct REAL,
  PRIMARY KEY (minute_ms, zone)
) WITHOUT ROWID;
INSERT INTO zone_samples (minute_ms, zone, min_margin_k, max_dew_point_c, worst_band, air_temp_c, rh_pct,
                          surface_min_c, supply_c)
  SELECT minute_ms, zone, min_margin_k, max_dew_point_c, worst_band, air_temp_c, rh_pct, surface_min_c, supply_c
  FROM zone_samples_v1;
DROP TABLE zone_samples_v1;
CREATE TABLE zone_hours (
  hour_ms INTEGER NOT NULL,
  zone TEXT NOT NULL,
  sample_minutes INTEGER NOT NULL,
  min_margin_k REAL,
  min_margin_at_ms INTEGER,
  max_margin_k REAL,
  mean_margin_k REAL,
  max_dew_point_c REAL,
  mean_dew_point_c REAL,
  min_surface_c REAL,
  mean_surface_c REAL,
  mean_air_temp_c REAL,
  mean_rh_pct REAL,
  mean_supply_c REAL,
  max_surface_rh_pct REAL,
  mean_surface_rh_pct REAL,
  safe_min INTEGER NOT NULL,
  tight_min INTEGER NOT NULL,
  alarm_min INTEGER NOT NULL,
  condensing_min INTEGER NOT NULL,
  unknown_min INTEGER NOT NULL,
  mould_min INTEGER NOT NULL,
  mould_head_min INTEGER NOT NULL,
  mould_tail_min INTEGER NOT NULL,
  mould_longest_min INTEGER NOT NULL,
  PRIMARY KEY (hour_ms, zone)
) WITHOUT ROWID;
)sql";

// Version 3 (issue 12 item 4: a month's report in seconds). Hourly summaries are kept for recent
// hours too, written by the service as each hour completes, so a long report reads one row per
// zone and hour instead of sixty. store_marks holds two times (ms):
// - hours_until: every hour before it has its zone_hours rows (the summary of all its minutes);
//   minutes from it on are only in zone_samples.
// - minutes_from: the minutes before it were deleted by the roll-up (only their hours remain).
// A version 2 file has hours exactly up to the end of its last rolled-up hour, and no minutes
// before it (but late ones, which the next roll-up merges): both marks start there.
constexpr std::string_view k_schema_v3 = R"sql(
CREATE TABLE store_marks (
  name TEXT PRIMARY KEY,
  value_ms INTEGER NOT NULL
) WITHOUT ROWID;
INSERT INTO store_marks (name, value_ms) SELECT 'hours_until', coalesce(max(hour_ms) + 3600000, 0) FROM zone_hours;
INSERT INTO store_marks (name, value_ms) SELECT 'minutes_from', coalesce(max(hour_ms) + 3600000, 0) FROM zone_hours;
)sql";

std::string hex_id(std::int64_t id) {
  char buf[24];
  std::snprintf(buf, sizeof buf, "0x%08llx", static_cast<unsigned long long>(id) & 0xffffffffULL);
  return buf;
}

store_error make(const std::filesystem::path& file, store_error_kind kind, const std::string& what) {
  return store_error{kind, file.string() + ": " + what};
}

// The first read of a file is where SQLite finds out what it is.
store_error first_read_failure(const std::filesystem::path& file, sqlite3* db, int rc) {
  switch (rc & 0xff) {
    case SQLITE_NOTADB:
      return make(file, store_error_kind::not_a_database, "not a dewmargin history database (not an SQLite file)");
    case SQLITE_CORRUPT:
      return make(file, store_error_kind::corrupt, "database is corrupt: " + describe(db, rc));
    case SQLITE_CANTOPEN:
    case SQLITE_PERM:
    case SQLITE_AUTH:
      return make(file, store_error_kind::cannot_open, "cannot read: " + describe(db, rc));
    default:
      return make(file, store_error_kind::sqlite_failure, "cannot read the file header: " + describe(db, rc));
  }
}

int set_int_pragma(sqlite3* db, const char* name, std::int64_t value) {
  const std::string sql = std::string("PRAGMA ") + name + " = " + std::to_string(value);
  return exec(db, sql.c_str());
}

bool migrations_well_formed(const std::vector<migration>& migrations) {
  if (migrations.empty()) return false;
  for (std::size_t i = 0; i < migrations.size(); ++i) {
    if (migrations[i].version != static_cast<int>(i) + 1) return false;
  }
  return true;
}

// One step in one transaction; the version is re-read under the write lock so that a second
// process that raced us to a new file skips the step instead of failing on CREATE TABLE.
std::optional<store_error> apply_step(const std::filesystem::path& file, sqlite3* db, const migration& step) {
  const auto failed = [&](const char* what, int rc) {
    const std::string text = describe(db, rc);
    if (sqlite3_get_autocommit(db) == 0) exec(db, "ROLLBACK");
    return make(file, (rc & 0xff) == SQLITE_CORRUPT ? store_error_kind::corrupt : store_error_kind::sqlite_failure,
                "migration to schema version " + std::to_string(step.version) + " failed (" + what + "): " + text);
  };
  int rc = exec(db, "BEGIN IMMEDIATE");
  if (rc != SQLITE_OK) return failed("begin", rc);
  std::int64_t version = 0;
  rc = query_int64(db, "PRAGMA user_version", version);
  if (rc != SQLITE_OK) return failed("reading user_version", rc);
  if (version >= step.version) {
    rc = exec(db, "COMMIT");
    if (rc != SQLITE_OK) return failed("commit", rc);
    return std::nullopt;
  }
  rc = set_int_pragma(db, "application_id", k_store_application_id);
  if (rc != SQLITE_OK) return failed("setting application_id", rc);
  const std::string sql(step.sql);
  rc = exec(db, sql.c_str());
  if (rc != SQLITE_OK) return failed("schema statements", rc);
  rc = set_int_pragma(db, "user_version", step.version);
  if (rc != SQLITE_OK) return failed("setting user_version", rc);
  rc = exec(db, "COMMIT");
  if (rc != SQLITE_OK) return failed("commit", rc);
  return std::nullopt;
}

}  // namespace

const std::vector<migration>& schema_migrations() {
  static const std::vector<migration> k_migrations{{1, k_schema_v1}, {2, k_schema_v2}, {3, k_schema_v3}};
  return k_migrations;
}

store_result<connection> open_history_db(const std::filesystem::path& file, open_mode mode,
                                         const open_settings& settings, const std::vector<migration>& migrations) {
  if (!migrations_well_formed(migrations)) {
    return make(file, store_error_kind::invalid_options, "internal: migrations must be numbered 1..N in order");
  }
  const int target_version = migrations.back().version;
  const bool read_only = mode != open_mode::read_write;

  std::error_code ec;
  const auto status = std::filesystem::status(file, ec);
  if (read_only && !std::filesystem::exists(status)) return make(file, store_error_kind::missing_file, "no such file");
  if (std::filesystem::is_directory(status)) {
    return make(file, store_error_kind::cannot_open, "is a directory, not a database file");
  }

  sqlite3* raw = nullptr;
  // NOMUTEX: each connection is used by one thread at a time (the writer's thread, or the
  // reader's caller), so SQLite's per-call locking is pure cost.
  const int flags =
      (read_only ? SQLITE_OPEN_READONLY : SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE) | SQLITE_OPEN_NOMUTEX;
  std::string name = file.string();
  int open_flags = flags;
  if (mode == open_mode::immutable) {
    // A URI: '%', '?' and '#' in the path are escaped (RFC 3986, as SQLite reads it).
    std::string uri = "file:";
    for (const char c : name) {
      if (c == '%' || c == '?' || c == '#') {
        static const char* const k_hex = "0123456789ABCDEF";
        uri += '%';
        uri += k_hex[(static_cast<unsigned char>(c) >> 4U) & 0xFU];
        uri += k_hex[static_cast<unsigned char>(c) & 0xFU];
      } else {
        uri += c;
      }
    }
    name = uri + "?immutable=1";
    open_flags |= SQLITE_OPEN_URI;
  }
  int rc = sqlite3_open_v2(name.c_str(), &raw, open_flags, nullptr);
  connection db(raw);  // SQLite hands out a handle even on failure; it must be closed
  if (rc != SQLITE_OK) {
    return make(file, store_error_kind::cannot_open,
                std::string(read_only ? "cannot open: "
                                      : "cannot open or create (does the directory exist and "
                                        "is it writable?): ") +
                    describe(raw, rc));
  }
  sqlite3_extended_result_codes(raw, 1);
  sqlite3_busy_timeout(raw, static_cast<int>(settings.busy_timeout.count()));

  std::int64_t application_id = 0;
  std::int64_t version = 0;
  std::int64_t objects = 0;
  rc = query_int64(raw, "PRAGMA application_id", application_id);
  if (rc != SQLITE_OK) return first_read_failure(file, raw, rc);
  rc = query_int64(raw, "PRAGMA user_version", version);
  if (rc != SQLITE_OK) return first_read_failure(file, raw, rc);
  rc = query_int64(raw, "SELECT count(*) FROM sqlite_schema", objects);
  if (rc != SQLITE_OK) return first_read_failure(file, raw, rc);

  const bool fresh = application_id == 0 && version == 0 && objects == 0;
  if (!fresh && application_id != k_store_application_id) {
    std::string why = "not a dewmargin history database (application_id " + hex_id(application_id) + ", expected " +
                      hex_id(k_store_application_id);
    if (application_id == 0) why += "; it holds " + std::to_string(objects) + " schema objects of another program";
    return make(file, store_error_kind::foreign_database, why + ")");
  }
  if (fresh && read_only) {
    return make(file, store_error_kind::foreign_database,
                "not a dewmargin history database (an empty SQLite file, application_id 0x00000000)");
  }
  if (version > target_version) {
    return make(file, store_error_kind::schema_too_new,
                "schema version " + std::to_string(version) + " is newer than this program knows (" +
                    std::to_string(target_version) + "); use the dewmargin release that wrote it, or a newer one");
  }
  if (read_only) {
    // Readers know every version from k_store_min_readable_version on (history_reader asks the
    // file's version and reads what it has); older ones wait for the service to migrate them.
    if (version < std::min<std::int64_t>(target_version, k_store_min_readable_version)) {
      return make(file, store_error_kind::schema_too_old,
                  "schema version " + std::to_string(version) + " is older than this program's (" +
                      std::to_string(target_version) + "); the service migrates it on its next start");
    }
    // Reports read hundreds of megabytes in one pass: map the file instead of copying each page
    // through read(), and keep a larger page cache. Both only speed reading; failures are harmless.
    exec(raw, "PRAGMA mmap_size = 1073741824");
    exec(raw, "PRAGMA cache_size = -16384");
    return db;
  }

  if (fresh) {
    // Only possible before the first table exists; afterwards it would take a full VACUUM.
    rc = exec(raw, "PRAGMA auto_vacuum = INCREMENTAL");
    if (rc != SQLITE_OK)
      return make(file, store_error_kind::sqlite_failure, "setting auto_vacuum: " + describe(raw, rc));
  }
  std::string journal_mode;
  rc = query_text(raw, "PRAGMA journal_mode = WAL", journal_mode);
  if (rc != SQLITE_OK) {
    return make(file, store_error_kind::sqlite_failure, "switching to WAL journal mode: " + describe(raw, rc));
  }
  if (journal_mode != "wal") {
    return make(file, store_error_kind::sqlite_failure,
                "the file system does not support WAL journal mode (still '" + journal_mode + "')");
  }
  rc = exec(raw, "PRAGMA synchronous = NORMAL");
  if (rc == SQLITE_OK) rc = set_int_pragma(raw, "journal_size_limit", settings.journal_size_limit_bytes);
  if (rc != SQLITE_OK) return make(file, store_error_kind::sqlite_failure, "setting pragmas: " + describe(raw, rc));

  for (const auto& step : migrations) {
    if (step.version <= version) continue;
    if (auto failure = apply_step(file, raw, step)) return *failure;
  }
  return db;
}

}  // namespace dewmargin::store_detail
