// The read API: filters, order, samples, and reading while a writer holds the lock.
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

constexpr std::int64_t k_min = 60'000;

class HistoryReader : public ::testing::Test {
 protected:
  temp_dir dir_;

  // Events of two zones and a loop over an hour; written in an order that is not ts order.
  void SetUp() override {
    error_sink errors;
    auto writer = store_test::open_writer(store_test::test_options(file(), errors));
    engine_output out;
    out.events.push_back(make_event(k_t0_ms + 30 * k_min, "z1", "ack"));               // id 1
    out.events.push_back(make_event(k_t0_ms, "z1", "band"));                           // id 2
    out.events.push_back(make_event(k_t0_ms + 30 * k_min, "z2", "band"));              // id 3, same ts as id 1
    out.events.push_back(make_event(k_t0_ms + 60 * k_min, "z2", "valve"));             // id 4
    event_record loop_event = make_event(k_t0_ms + 10 * k_min, "loop-a", "setpoint");  // id 5
    loop_event.subject = subject_type::loop;
    out.events.push_back(loop_event);
    for (int m = 0; m < 3; ++m) {
      out.samples.push_back(make_sample(k_t0_ms + m * k_min, "z2", 2.0 - m));
      out.samples.push_back(make_sample(k_t0_ms + m * k_min, "z1", 3.0 - m));
    }
    writer.enqueue(out);
    ASSERT_TRUE(writer.flush(k_wait));
  }
  std::filesystem::path file() const { return dir_.file("h.db"); }
};

std::vector<std::int64_t> ids(const std::vector<stored_event>& rows) {
  std::vector<std::int64_t> v;
  for (const auto& r : rows) v.push_back(r.id);
  return v;
}

TEST_F(HistoryReader, FiltersBySubjectTimeAndKind) {
  auto reader = history_reader::open(file());
  ASSERT_TRUE(reader.ok()) << reader.err().message;
  struct filter_case {
    const char* what;
    event_filter filter;
    std::vector<std::int64_t> ids;
  };
  const auto at = [](std::int64_t minutes) {
    return std::optional<timestamp>(from_unix_ms(k_t0_ms + minutes * k_min));
  };
  const filter_case cases[] = {
      {"everything, by ts then id", {}, {2, 5, 1, 3, 4}},
      {"zone z1", {std::string("z1"), {}, {}, {}}, {2, 1}},
      {"a loop id", {std::string("loop-a"), {}, {}, {}}, {5}},
      {"unknown id", {std::string("nowhere"), {}, {}, {}}, {}},
      {"kind band", {{}, {}, {}, {"band"}}, {2, 3}},
      {"kinds band and valve", {{}, {}, {}, {"valve", "band"}}, {2, 3, 4}},
      {"since is inclusive", {{}, at(30), {}, {}}, {1, 3, 4}},
      {"until is exclusive", {{}, {}, at(30), {}}, {2, 5}},
      {"a window", {{}, at(10), at(60), {}}, {5, 1, 3}},
      {"all filters", {std::string("z2"), at(0), at(61), {"valve"}}, {4}},
  };
  for (const auto& c : cases) {
    auto rows = reader.value().events(c.filter);
    ASSERT_TRUE(rows.ok()) << c.what << ": " << rows.err().message;
    EXPECT_EQ(ids(rows.value()), c.ids) << c.what;
  }
}

TEST_F(HistoryReader, ReturnsTheStoredRecord) {
  auto reader = history_reader::open(file());
  ASSERT_TRUE(reader.ok()) << reader.err().message;
  auto rows = reader.value().events(event_filter{std::string("loop-a"), {}, {}, {}});
  ASSERT_TRUE(rows.ok()) << rows.err().message;
  ASSERT_EQ(rows.value().size(), 1u);
  const event_record& r = rows.value()[0].record;
  EXPECT_EQ(r.subject, subject_type::loop);
  EXPECT_EQ(r.subject_id, "loop-a");
  EXPECT_EQ(r.kind, "setpoint");
  EXPECT_EQ(to_unix_ms(r.ts), k_t0_ms + 10 * k_min);
  EXPECT_EQ(r.json, make_event(k_t0_ms + 10 * k_min, "loop-a", "setpoint").json);
}

TEST_F(HistoryReader, ReadsSamplesByZoneAndTime) {
  auto reader = history_reader::open(file());
  ASSERT_TRUE(reader.ok()) << reader.err().message;
  auto all = reader.value().samples({});
  ASSERT_TRUE(all.ok()) << all.err().message;
  ASSERT_EQ(all.value().size(), 6u);
  EXPECT_EQ(all.value()[0].zone, "z1") << "ordered by zone, then minute";
  EXPECT_EQ(all.value()[3].zone, "z2");
  EXPECT_EQ(to_unix_ms(all.value()[1].minute_start), k_t0_ms + k_min);

  auto some = reader.value().samples(sample_filter{std::string("z2"), from_unix_ms(k_t0_ms + k_min), {}});
  ASSERT_TRUE(some.ok()) << some.err().message;
  ASSERT_EQ(some.value().size(), 2u);
  const zone_sample& s = some.value()[0];
  EXPECT_EQ(s.min_margin_k, 1.0);
  EXPECT_EQ(s.max_dew_point_c, 16.0);
  EXPECT_EQ(s.worst_band, "tight");
  EXPECT_EQ(s.air_temp_c, 25.0);
  EXPECT_EQ(s.rh_pct, 55.0);
  EXPECT_FALSE(s.surface_min_c.has_value()) << "NULL comes back as no value";
  EXPECT_EQ(s.supply_c, 17.5);
}

TEST_F(HistoryReader, ReadsTheCommittedStateWhileAWriterHoldsTheLock) {
  raw_db other(file());
  ASSERT_EQ(other.exec("BEGIN IMMEDIATE"), SQLITE_OK);
  ASSERT_EQ(other.exec("INSERT INTO events (ts_ms, subject_type, subject_id, kind, json) VALUES (1, 'site', '', "
                       "'service', '{}')"),
            SQLITE_OK);
  auto reader = history_reader::open(file());
  ASSERT_TRUE(reader.ok()) << reader.err().message;
  auto rows = reader.value().events({});
  ASSERT_TRUE(rows.ok()) << rows.err().message;
  EXPECT_EQ(rows.value().size(), 5u) << "the uncommitted row is not seen, and the read did not wait";
  ASSERT_EQ(other.exec("COMMIT"), SQLITE_OK);
  auto after = reader.value().events({});
  ASSERT_TRUE(after.ok()) << after.err().message;
  EXPECT_EQ(after.value().size(), 6u);
}

TEST_F(HistoryReader, ReportsARowItCannotReadAsCorrupt) {
  {
    raw_db other(file());
    ASSERT_EQ(other.exec("INSERT INTO events (id, ts_ms, subject_type, subject_id, kind, json) VALUES (77, 1, "
                         "'planet', 'mars', 'band', '{}')"),
              SQLITE_OK);
  }
  auto reader = history_reader::open(file());
  ASSERT_TRUE(reader.ok()) << reader.err().message;
  auto rows = reader.value().events({});
  ASSERT_FALSE(rows.ok());
  EXPECT_EQ(rows.err().kind, store_error_kind::corrupt);
  EXPECT_EQ(rows.err().message, file().string() + ": event id 77: unknown subject_type 'planet'");
}

TEST_F(HistoryReader, StreamsRowsToAVisitor) {
  auto reader = history_reader::open(file());
  ASSERT_TRUE(reader.ok()) << reader.err().message;
  std::vector<std::string> seen;
  auto n = reader.value().for_each_event({}, [&](const stored_event& e) { seen.push_back(e.record.kind); });
  ASSERT_TRUE(n.ok()) << n.err().message;
  EXPECT_EQ(n.value(), 5u);
  EXPECT_EQ(seen, (std::vector<std::string>{"band", "setpoint", "ack", "band", "valve"}));
}

}  // namespace
}  // namespace dewmargin
