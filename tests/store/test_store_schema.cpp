// Schema identity, versions and migrations of the history file.
#include <fstream>
#include <sstream>

#include "dewmargin/psychro.h"
#include "migrations.h"
#include "store_test_support.h"

namespace dewmargin {
namespace {

using store_detail::migration;
using store_detail::open_history_db;
using store_detail::open_mode;
using store_detail::open_settings;
using store_test::contains;
using store_test::raw_db;
using store_test::temp_dir;

// Creates a file with the store's writer, then closes it.
void create_with_writer(const std::filesystem::path& file) {
  store_test::error_sink errors;
  auto options = store_test::test_options(file, errors);
  options.keep_events_days = 0;  // retention is not the subject here: keep the rows of any age
  options.keep_samples_days = 0;
  auto w = store_writer::open(options);
  ASSERT_TRUE(w.ok()) << w.err().message;
  w.value().stop();
  EXPECT_TRUE(errors.lines().empty());
}

std::string read_file(const std::filesystem::path& file) {
  std::ifstream in(file, std::ios::binary);
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

std::string collapse_spaces(const std::string& text) {
  std::istringstream in(text);
  std::string word, out;
  while (in >> word) out += (out.empty() ? "" : " ") + word;
  return out;
}

TEST(StoreSchema, FreshFileGetsIdentityVersionAndPragmas) {
  temp_dir dir;
  const auto file = dir.file("history.db");
  create_with_writer(file);
  raw_db db(file);
  EXPECT_EQ(db.integer("PRAGMA application_id"), k_store_application_id);
  EXPECT_EQ(db.integer("PRAGMA user_version"), k_store_schema_version);
  EXPECT_EQ(db.text("PRAGMA journal_mode"), "wal");
  EXPECT_EQ(db.integer("PRAGMA auto_vacuum"), 2) << "2 = INCREMENTAL";
  EXPECT_EQ(
      db.texts("SELECT name FROM sqlite_schema WHERE type = 'table' ORDER BY name"),
      (std::vector<std::string>{"events", "loop_state", "store_marks", "zone_hours", "zone_samples", "zone_state"}));
  EXPECT_EQ(db.texts("SELECT name FROM sqlite_schema WHERE type = 'index' AND sql IS NOT NULL ORDER BY name"),
            (std::vector<std::string>{"events_by_kind_ts", "events_by_subject_ts", "events_by_ts"}));
  EXPECT_EQ(db.texts("SELECT name FROM pragma_index_info((SELECT name FROM pragma_index_list('zone_samples') "
                     "WHERE origin = 'pk'))"),
            (std::vector<std::string>{"minute_ms", "zone"}))
      << "clustered by time: primary key (minute_ms, zone), WITHOUT ROWID";
  EXPECT_EQ(db.integer("SELECT count(*) FROM sqlite_schema WHERE name = 'zone_samples' AND sql LIKE '%WITHOUT ROWID%'"),
            1);
}

TEST(StoreSchema, ReopensItsOwnFileKeepingRows) {
  temp_dir dir;
  const auto file = dir.file("history.db");
  create_with_writer(file);
  {
    raw_db db(file);
    ASSERT_EQ(db.exec("INSERT INTO events (ts_ms, subject_type, subject_id, kind, json) VALUES (1, 'site', '', "
                      "'service', '{}')"),
              SQLITE_OK);
  }
  create_with_writer(file);
  raw_db db(file);
  EXPECT_EQ(db.integer("SELECT count(*) FROM events"), 1);
  EXPECT_EQ(db.integer("PRAGMA user_version"), k_store_schema_version);
}

TEST(StoreSchema, MigratesAnOlderVersionStepByStep) {
  temp_dir dir;
  const auto file = dir.file("history.db");
  const auto& v1 = store_detail::schema_migrations().at(0);
  const std::vector<migration> only_v1{v1};
  const std::vector<migration> up_to_v3{
      v1, {2, "ALTER TABLE events ADD COLUMN note TEXT;"}, {3, "CREATE TABLE operators (initials TEXT PRIMARY KEY);"}};
  {
    auto db = open_history_db(file, open_mode::read_write, open_settings{}, only_v1);
    ASSERT_TRUE(db.ok()) << db.err().message;
  }
  {
    raw_db db(file);
    ASSERT_EQ(db.integer("PRAGMA user_version"), 1);
    ASSERT_EQ(db.exec("INSERT INTO events (ts_ms, subject_type, subject_id, kind, json) VALUES (1, 'site', '', "
                      "'service', '{}')"),
              SQLITE_OK);
  }
  {
    auto db = open_history_db(file, open_mode::read_write, open_settings{}, up_to_v3);
    ASSERT_TRUE(db.ok()) << db.err().message;
  }
  raw_db db(file);
  EXPECT_EQ(db.integer("PRAGMA user_version"), 3);
  EXPECT_EQ(db.integer("SELECT count(*) FROM pragma_table_info('events') WHERE name = 'note'"), 1);
  EXPECT_EQ(db.integer("SELECT count(*) FROM sqlite_schema WHERE name = 'operators'"), 1);
  EXPECT_EQ(db.integer("SELECT count(*) FROM events"), 1) << "rows survive a migration";
  EXPECT_EQ(db.integer("PRAGMA application_id"), k_store_application_id);
}

TEST(StoreSchema, FailedMigrationLeavesThePreviousVersionWhole) {
  temp_dir dir;
  const auto file = dir.file("history.db");
  const auto& v1 = store_detail::schema_migrations().at(0);
  {
    auto db = open_history_db(file, open_mode::read_write, open_settings{}, {v1});
    ASSERT_TRUE(db.ok()) << db.err().message;
  }
  // Step 2 creates a table, then fails: the table must not stay behind.
  const std::vector<migration> broken{v1, {2, "CREATE TABLE half_done (x); CREATE TABLE events (x);"}};
  auto db = open_history_db(file, open_mode::read_write, open_settings{}, broken);
  ASSERT_FALSE(db.ok());
  EXPECT_EQ(db.err().kind, store_error_kind::sqlite_failure);
  EXPECT_TRUE(contains(db.err().message, file.string() + ": migration to schema version 2 failed (schema statements)"))
      << db.err().message;
  EXPECT_TRUE(contains(db.err().message, "table events already exists")) << db.err().message;
  raw_db check(file);
  EXPECT_EQ(check.integer("PRAGMA user_version"), 1);
  EXPECT_EQ(check.integer("SELECT count(*) FROM sqlite_schema WHERE name = 'half_done'"), 0);
}

TEST(StoreSchema, RefusesANewerVersionForWritingAndReading) {
  temp_dir dir;
  const auto file = dir.file("history.db");
  create_with_writer(file);
  {
    raw_db db(file);
    ASSERT_EQ(db.exec("PRAGMA user_version = 99"), SQLITE_OK);
  }
  store_test::error_sink errors;
  auto w = store_writer::open(store_test::test_options(file, errors));
  ASSERT_FALSE(w.ok());
  EXPECT_EQ(w.err().kind, store_error_kind::schema_too_new);
  EXPECT_TRUE(contains(w.err().message, file.string() + ": schema version 99 is newer than this program knows (3)"))
      << w.err().message;
  auto r = history_reader::open(file);
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.err().kind, store_error_kind::schema_too_new);
  raw_db db(file);
  EXPECT_EQ(db.integer("PRAGMA user_version"), 99) << "a newer file is left alone";
}

TEST(StoreSchema, ReaderRefusesAnOlderVersionItCannotRead) {
  temp_dir dir;
  const auto file = dir.file("history.db");
  {
    raw_db db(file);
    ASSERT_EQ(db.exec("PRAGMA application_id = 1148669287; CREATE TABLE t (x); PRAGMA user_version = 0"), SQLITE_OK);
  }
  auto r = history_reader::open(file);
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.err().kind, store_error_kind::schema_too_old);
  EXPECT_TRUE(contains(r.err().message, "schema version 0 is older than this program's (3)")) << r.err().message;
}

TEST(StoreSchema, ReaderReadsAVersion1FileAsItIs) {
  temp_dir dir;
  const auto file = dir.file("history.db");
  const auto& v1 = store_detail::schema_migrations().at(0);
  {
    auto db = open_history_db(file, open_mode::read_write, open_settings{}, {v1});
    ASSERT_TRUE(db.ok()) << db.err().message;
  }
  {
    raw_db db(file);
    // 2026-07-14T13:00:00Z; 24 °C, 50 %, surface 18 °C.
    ASSERT_EQ(
        db.exec("INSERT INTO zone_samples VALUES ('z1', 1784034000000, 5.0, 12.9, 'safe', 24.0, 50.0, 18.0, 16.0)"),
        SQLITE_OK);
  }
  auto r = history_reader::open(file);
  ASSERT_TRUE(r.ok()) << r.err().message;
  EXPECT_EQ(r.value().schema_version(), 1);
  std::vector<zone_period> periods;
  auto n = r.value().for_each_period({}, [&](const zone_period& p) { periods.push_back(p); });
  ASSERT_TRUE(n.ok()) << n.err().message;
  ASSERT_EQ(periods.size(), 1u);
  EXPECT_EQ(periods[0].zone, "z1");
  ASSERT_TRUE(periods[0].max_surface_rh_pct.has_value()) << "computed from air, RH and surface";
  EXPECT_NEAR(*periods[0].max_surface_rh_pct, psychro::surface_rh_pct(24.0, 50.0, 18.0).value(), 1e-9);
  raw_db db(file);
  EXPECT_EQ(db.integer("PRAGMA user_version"), 1) << "the reader never migrates";
}

TEST(StoreSchema, Version2MigrationKeepsTheSamples) {
  temp_dir dir;
  const auto file = dir.file("history.db");
  const auto& v1 = store_detail::schema_migrations().at(0);
  {
    auto db = open_history_db(file, open_mode::read_write, open_settings{}, {v1});
    ASSERT_TRUE(db.ok()) << db.err().message;
  }
  {
    raw_db db(file);
    ASSERT_EQ(db.exec("INSERT INTO zone_samples VALUES ('z1', 60000, 1.5, 14.0, 'tight', 24.0, 60.0, 16.0, 15.0),"
                      "('z0', 120000, NULL, NULL, 'unknown', NULL, NULL, NULL, NULL)"),
              SQLITE_OK);
  }
  create_with_writer(file);
  raw_db db(file);
  EXPECT_EQ(db.integer("PRAGMA user_version"), k_store_schema_version);
  EXPECT_EQ(db.texts("SELECT zone || ' ' || minute_ms || ' ' || worst_band || ' ' || coalesce(min_margin_k, 'null') "
                     "|| ' ' || coalesce(surface_rh_pct, 'null') FROM zone_samples ORDER BY minute_ms"),
            (std::vector<std::string>{"z1 60000 tight 1.5 null", "z0 120000 unknown null null"}));
  EXPECT_EQ(
      db.integer("SELECT count(*) FROM sqlite_schema WHERE name IN ('zone_samples_v1', 'zone_samples_by_minute')"), 0);
}

// A version 2 file: hours rolled up to 02:00, minutes from 02:00 on. Version 3 marks both times
// at the end of the last hour, so the readers take the hours before it and the minutes after it.
TEST(StoreSchema, Version3MigrationMarksWhereTheHoursEnd) {
  temp_dir dir;
  const auto file = dir.file("history.db");
  const auto& all = store_detail::schema_migrations();
  {
    auto db = open_history_db(file, open_mode::read_write, open_settings{}, {all.at(0), all.at(1)});
    ASSERT_TRUE(db.ok()) << db.err().message;
  }
  {
    raw_db db(file);
    ASSERT_EQ(
        db.exec("INSERT INTO zone_hours (hour_ms, zone, sample_minutes, safe_min, tight_min, alarm_min, "
                "condensing_min, unknown_min, mould_min, mould_head_min, mould_tail_min, mould_longest_min) "
                "VALUES (0, 'z1', 60, 60, 0, 0, 0, 0, 0, 0, 0, 0), (3600000, 'z1', 60, 60, 0, 0, 0, 0, 0, 0, 0, 0);"
                "INSERT INTO zone_samples (minute_ms, zone, worst_band) VALUES (7200000, 'z1', 'safe')"),
        SQLITE_OK);
  }
  {
    auto db = open_history_db(file, open_mode::read_write, open_settings{}, all);
    ASSERT_TRUE(db.ok()) << db.err().message;
  }
  raw_db db(file);
  EXPECT_EQ(db.integer("PRAGMA user_version"), 3);
  EXPECT_EQ(db.texts("SELECT name || ' ' || value_ms FROM store_marks ORDER BY name"),
            (std::vector<std::string>{"hours_until 7200000", "minutes_from 7200000"}));
  EXPECT_EQ(db.integer("SELECT count(*) FROM zone_hours"), 2) << "rows survive the migration";
  EXPECT_EQ(db.integer("SELECT count(*) FROM zone_samples"), 1);
  auto r = history_reader::open(file);
  ASSERT_TRUE(r.ok()) << r.err().message;
  std::vector<std::int32_t> lengths;
  auto n = r.value().for_each_period({}, [&](const zone_period& p) { lengths.push_back(p.length_min); });
  ASSERT_TRUE(n.ok()) << n.err().message;
  EXPECT_EQ(lengths, (std::vector<std::int32_t>{60, 60, 1}));
}

TEST(StoreSchema, Version3MigrationOfAFileWithoutHoursStartsAtZero) {
  temp_dir dir;
  const auto file = dir.file("history.db");
  const auto& all = store_detail::schema_migrations();
  {
    auto db = open_history_db(file, open_mode::read_write, open_settings{}, {all.at(0), all.at(1)});
    ASSERT_TRUE(db.ok()) << db.err().message;
  }
  {
    auto db = open_history_db(file, open_mode::read_write, open_settings{}, all);
    ASSERT_TRUE(db.ok()) << db.err().message;
  }
  raw_db db(file);
  EXPECT_EQ(db.texts("SELECT name || ' ' || value_ms FROM store_marks ORDER BY name"),
            (std::vector<std::string>{"hours_until 0", "minutes_from 0"}));
}

struct foreign_case {
  const char* name;
  const char* sql;
  const char* expected;  // part of the message after "FILE: "
};

void PrintTo(const foreign_case& c, std::ostream* os) { *os << c.name; }

class StoreSchemaForeign : public ::testing::TestWithParam<foreign_case> {};

TEST_P(StoreSchemaForeign, IsRefusedAndLeftUntouched) {
  temp_dir dir;
  const auto file = dir.file("other.db");
  {
    raw_db db(file);
    ASSERT_EQ(db.exec(GetParam().sql), SQLITE_OK);
  }
  const std::string expected = file.string() + ": " + GetParam().expected;
  store_test::error_sink errors;
  auto w = store_writer::open(store_test::test_options(file, errors));
  ASSERT_FALSE(w.ok());
  EXPECT_EQ(w.err().kind, store_error_kind::foreign_database);
  EXPECT_TRUE(contains(w.err().message, expected)) << w.err().message;
  auto r = history_reader::open(file);
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.err().kind, store_error_kind::foreign_database);
  EXPECT_TRUE(contains(r.err().message, expected)) << r.err().message;
  raw_db db(file);
  EXPECT_EQ(db.integer("SELECT count(*) FROM sqlite_schema WHERE name = 'events'"), 0);
  EXPECT_EQ(db.integer("PRAGMA user_version"), 0);
}

INSTANTIATE_TEST_SUITE_P(
    Files, StoreSchemaForeign,
    ::testing::Values(
        foreign_case{"other_application_id", "PRAGMA application_id = 12345; CREATE TABLE t (x);",
                     "not a dewmargin history database (application_id 0x00003039, expected 0x44774d67)"},
        foreign_case{"no_id_but_tables", "CREATE TABLE t (x); CREATE INDEX t_x ON t (x);",
                     "not a dewmargin history database (application_id 0x00000000, expected 0x44774d67; it holds 2 "
                     "schema objects of another program)"}),
    [](const ::testing::TestParamInfo<foreign_case>& param_info) { return std::string(param_info.param.name); });

TEST(StoreSchema, RefusesAFileThatIsNotSqlite) {
  temp_dir dir;
  const auto file = dir.file("readings.csv");
  const std::string content = "ts,topic,payload\n2026-07-14T13:00:00Z,bldg/l2e/temp,24.5\n";
  std::ofstream(file) << content;
  store_test::error_sink errors;
  auto w = store_writer::open(store_test::test_options(file, errors));
  ASSERT_FALSE(w.ok());
  EXPECT_EQ(w.err().kind, store_error_kind::not_a_database);
  EXPECT_EQ(w.err().message, file.string() + ": not a dewmargin history database (not an SQLite file)");
  auto r = history_reader::open(file);
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.err().kind, store_error_kind::not_a_database);
  EXPECT_EQ(read_file(file), content) << "the file is not modified";
}

TEST(StoreSchema, ReaderRefusesMissingAndEmptyFiles) {
  temp_dir dir;
  auto missing = history_reader::open(dir.file("missing.db"));
  ASSERT_FALSE(missing.ok());
  EXPECT_EQ(missing.err().kind, store_error_kind::missing_file);
  EXPECT_EQ(missing.err().message, dir.file("missing.db").string() + ": no such file");

  const auto empty = dir.file("empty.db");
  std::ofstream{empty};
  auto r = history_reader::open(empty);
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.err().kind, store_error_kind::foreign_database);
  EXPECT_TRUE(contains(r.err().message, "an empty SQLite file")) << r.err().message;
  EXPECT_EQ(std::filesystem::file_size(empty), 0u) << "the reader never writes";
}

TEST(StoreSchema, WriterInitialisesAnEmptyFile) {
  temp_dir dir;
  const auto file = dir.file("empty.db");
  std::ofstream{file};
  create_with_writer(file);
  raw_db db(file);
  EXPECT_EQ(db.integer("PRAGMA user_version"), k_store_schema_version);
  EXPECT_EQ(db.integer("PRAGMA auto_vacuum"), 2);
}

TEST(StoreSchema, WriterReportsAFileItCannotCreate) {
  temp_dir dir;
  struct open_case {
    std::filesystem::path file;
    const char* expected;
  };
  for (const auto& c : {open_case{dir.file("no-such-dir") / "history.db", "cannot open or create"},
                        open_case{dir.file(""), "is a directory, not a database file"}}) {
    store_test::error_sink errors;
    auto w = store_writer::open(store_test::test_options(c.file, errors));
    ASSERT_FALSE(w.ok()) << c.file;
    EXPECT_EQ(w.err().kind, store_error_kind::cannot_open);
    EXPECT_TRUE(contains(w.err().message, c.file.string() + ": " + c.expected)) << w.err().message;
  }
}

TEST(StoreSchema, FixtureOfTheCliTestMatchesTheMigrations) {
  temp_dir dir;
  const auto ours = dir.file("ours.db");
  create_with_writer(ours);
  const auto fixture = dir.file("fixture.db");
  const std::string sql = read_file(std::string(DEWMARGIN_TEST_DATA_DIR) + "/history/fixture.sql");
  ASSERT_FALSE(sql.empty()) << "tests/data/history/fixture.sql";
  {
    raw_db db(fixture);
    ASSERT_EQ(db.exec(sql), SQLITE_OK);
  }
  raw_db a(ours);
  raw_db b(fixture);
  const std::string schema_query =
      "SELECT type || ' ' || name || ' ' || tbl_name || ' ' || coalesce(sql, '') FROM "
      "sqlite_schema ORDER BY name";
  auto schema_a = a.texts(schema_query);
  auto schema_b = b.texts(schema_query);
  for (auto& s : schema_a) s = collapse_spaces(s);
  for (auto& s : schema_b) s = collapse_spaces(s);
  EXPECT_EQ(schema_a, schema_b);
  for (const char* pragma : {"PRAGMA application_id", "PRAGMA user_version", "PRAGMA auto_vacuum"}) {
    EXPECT_EQ(a.integer(pragma), b.integer(pragma)) << pragma;
  }
  EXPECT_EQ(b.text("PRAGMA journal_mode"), "wal");
}

}  // namespace
}  // namespace dewmargin
