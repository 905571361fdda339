// Per-minute samples older than keep_minute_samples_days become hourly rows; the readers see
// the same figures either way.
#include <gtest/gtest.h>

#include "dewmargin/store.h"
#include "store_test_support.h"

namespace dewmargin {
namespace {

using store_test::error_sink;
using store_test::k_day_ms;
using store_test::k_t0_ms;
using store_test::k_wait;
using store_test::raw_db;
using store_test::temp_dir;

constexpr std::int64_t k_min_ms = 60'000;

// z1: margin 3 K falling, lowest -0.4 K at minute 17 (condensing), surface RH >= 80 % from minute
// 40 to 89 (a 50-minute run across the first hour boundary); z2: safe, dry. Three hours.
engine_output three_hours() {
  engine_output out;
  for (int i = 0; i < 180; ++i) {
    for (const char* zone : {"z1", "z2"}) {
      zone_sample s;
      s.minute_start = from_unix_ms(k_t0_ms + i * k_min_ms);
      s.zone = zone;
      const bool z1 = std::string(zone) == "z1";
      s.min_margin_k = z1 && i == 17 ? -0.4 : 3.0;
      s.worst_band = z1 && i == 17 ? "condensing" : "safe";
      s.max_dew_point_c = 14.0;
      s.air_temp_c = 25.0;
      s.rh_pct = 50.0;
      s.surface_min_c = 17.0;
      s.supply_c = 16.0;
      s.surface_rh_pct = z1 && i >= 40 && i < 90 ? 82.0 : 60.0;
      out.samples.push_back(s);
    }
  }
  return out;
}

TEST(StoreRollup, OldMinutesBecomeHoursThatKeepTheFigures) {
  temp_dir dir;
  error_sink errors;
  auto options = store_test::test_options(dir.file("h.db"), errors);
  options.keep_minute_samples_days = 35;
  options.keep_samples_days = 400;
  // Now is 35 days and 2 h 5 min after t0: the first two hours are older than 35 days.
  options.retention_now = [] { return from_unix_ms(k_t0_ms + 35 * k_day_ms + 125 * k_min_ms); };
  options.maintenance_interval = std::chrono::hours{1};
  auto writer = store_test::open_writer(options);
  writer.enqueue(three_hours());
  ASSERT_TRUE(writer.flush(k_wait));
  ASSERT_TRUE(writer.run_maintenance(k_wait));
  EXPECT_EQ(writer.counters().minutes_rolled_up, 240u) << "2 zones × 2 hours";
  writer.stop();
  EXPECT_TRUE(errors.lines().empty()) << errors.lines().front();

  raw_db db(dir.file("h.db"));
  EXPECT_EQ(db.integer("SELECT count(*) FROM zone_hours"), 4);
  EXPECT_EQ(db.integer("SELECT count(*) FROM zone_samples"), 120);
  EXPECT_EQ(db.integer("SELECT min(minute_ms) FROM zone_samples"), k_t0_ms + 120 * k_min_ms);
  EXPECT_EQ(
      db.texts("SELECT sample_minutes || ' ' || min_margin_k || ' ' || min_margin_at_ms || ' ' || safe_min || ' ' "
               "|| condensing_min || ' ' || mould_min || ' ' || mould_head_min || ' ' || mould_tail_min || ' ' "
               "|| mould_longest_min || ' ' || mean_air_temp_c FROM zone_hours WHERE zone = 'z1' ORDER BY hour_ms"),
      (std::vector<std::string>{"60 -0.4 " + std::to_string(k_t0_ms + 17 * k_min_ms) + " 59 1 20 0 20 20 25.0",
                                "60 3.0 " + std::to_string(k_t0_ms + 60 * k_min_ms) + " 60 0 30 30 0 30 25.0"}));

  auto reader = history_reader::open(dir.file("h.db"));
  ASSERT_TRUE(reader.ok()) << reader.err().message;
  zone_period z1 = empty_period("z1", from_unix_ms(k_t0_ms), 0);
  std::vector<std::int32_t> lengths;
  auto n = reader.value().for_each_period({std::string("z1"), {}, {}}, [&](const zone_period& p) {
    lengths.push_back(p.length_min);
    merge_period(z1, p);
  });
  ASSERT_TRUE(n.ok()) << n.err().message;
  EXPECT_EQ(n.value(), 62u) << "2 hours, then 60 minutes";
  EXPECT_EQ(lengths.front(), 60);
  EXPECT_EQ(lengths.back(), 1);
  EXPECT_EQ(z1.sample_minutes, 180);
  EXPECT_EQ(z1.mould_minutes, 50);
  EXPECT_EQ(z1.mould_longest_min, 50) << "the run crosses the boundary between the two rolled-up hours";
  EXPECT_DOUBLE_EQ(*z1.min_margin_k, -0.4);
  EXPECT_EQ(to_unix_ms(z1.min_margin_at), k_t0_ms + 17 * k_min_ms);
  EXPECT_EQ(z1.band_minutes, (std::array<std::int32_t, k_band_count>{179, 0, 0, 1, 0}));
}

TEST(StoreRollup, EachCompletedHourIsSummarisedAsItsMinutesArrive) {
  temp_dir dir;
  error_sink errors;
  auto options = store_test::test_options(dir.file("h.db"), errors);
  options.keep_minute_samples_days = 0;  // no roll-up: the minutes stay beside their hours
  options.maintenance_interval = std::chrono::hours{1};
  auto writer = store_test::open_writer(options);
  writer.enqueue(three_hours());
  ASSERT_TRUE(writer.flush(k_wait));
  {
    raw_db db(dir.file("h.db"));
    EXPECT_EQ(db.integer("SELECT count(*) FROM zone_hours"), 4) << "hours 0 and 1 are complete, hour 2 is not";
    EXPECT_EQ(db.integer("SELECT count(*) FROM zone_samples"), 360);
    EXPECT_EQ(db.integer("SELECT value_ms FROM store_marks WHERE name = 'hours_until'"), k_t0_ms + 120 * k_min_ms);
    EXPECT_EQ(db.text("SELECT min_margin_k || ' ' || condensing_min || ' ' || mould_min FROM zone_hours WHERE zone = "
                      "'z1' AND hour_ms = " +
                      std::to_string(k_t0_ms)),
              "-0.4 1 20");
  }
  // A late sample replaces minute 17 of z1 (a restart within the minute): its hour is summarised
  // again from the minutes, so nothing is counted twice.
  engine_output late;
  zone_sample s;
  s.minute_start = from_unix_ms(k_t0_ms + 17 * k_min_ms);
  s.zone = "z1";
  s.min_margin_k = -1.25;
  s.worst_band = "condensing";
  s.surface_rh_pct = 60.0;
  late.samples.push_back(s);
  writer.enqueue(late);
  ASSERT_TRUE(writer.flush(k_wait));
  // The first minute of hour 3 completes hour 2.
  engine_output next;
  s.minute_start = from_unix_ms(k_t0_ms + 180 * k_min_ms);
  s.min_margin_k = 3.0;
  s.worst_band = "safe";
  next.samples.push_back(s);
  writer.enqueue(next);
  ASSERT_TRUE(writer.flush(k_wait));
  writer.stop();
  EXPECT_TRUE(errors.lines().empty()) << errors.lines().front();
  raw_db db(dir.file("h.db"));
  EXPECT_EQ(db.text("SELECT sample_minutes || ' ' || min_margin_k || ' ' || condensing_min FROM zone_hours WHERE zone "
                    "= 'z1' AND hour_ms = " +
                    std::to_string(k_t0_ms)),
            "60 -1.25 1");
  EXPECT_EQ(db.integer("SELECT count(*) FROM zone_hours"), 6);
  EXPECT_EQ(db.integer("SELECT value_ms FROM store_marks WHERE name = 'hours_until'"), k_t0_ms + 180 * k_min_ms);

  // The reader: with whole_hours, hours 0-2 come as summaries and the minute of hour 3 as itself.
  auto reader = history_reader::open(dir.file("h.db"));
  ASSERT_TRUE(reader.ok()) << reader.err().message;
  sample_filter f;
  f.zone = "z1";
  f.whole_hours = true;
  std::vector<std::int32_t> lengths;
  zone_period z1 = empty_period("z1", from_unix_ms(k_t0_ms), 0);
  auto n = reader.value().for_each_period(f, [&](const zone_period& p) {
    lengths.push_back(p.length_min);
    merge_period(z1, p);
  });
  ASSERT_TRUE(n.ok()) << n.err().message;
  EXPECT_EQ(lengths, (std::vector<std::int32_t>{60, 60, 60, 1}));
  EXPECT_EQ(z1.sample_minutes, 181);
  EXPECT_EQ(z1.mould_longest_min, 50);
  // Without whole_hours every kept minute comes as itself.
  f.whole_hours = false;
  auto minutes = reader.value().for_each_period(f, [](const zone_period&) {});
  ASSERT_TRUE(minutes.ok());
  EXPECT_EQ(minutes.value(), 181u);
  // A period that starts and ends inside hours: the edges come as minutes.
  f.whole_hours = true;
  f.since = from_unix_ms(k_t0_ms + 30 * k_min_ms);
  f.until = from_unix_ms(k_t0_ms + 150 * k_min_ms);
  lengths.clear();
  auto edges = reader.value().for_each_period(f, [&](const zone_period& p) { lengths.push_back(p.length_min); });
  ASSERT_TRUE(edges.ok());
  EXPECT_EQ(lengths.size(), 30u + 1u + 30u) << "30 minutes, hour 1, 30 minutes";
  EXPECT_EQ(lengths[30], 60);
}

TEST(StoreRollup, RetentionDeletesOldHoursToo) {
  temp_dir dir;
  error_sink errors;
  auto options = store_test::test_options(dir.file("h.db"), errors);
  options.keep_minute_samples_days = 1;
  options.keep_samples_days = 10;
  std::int64_t now_ms = k_t0_ms + 2 * k_day_ms;
  options.retention_now = [&now_ms] { return from_unix_ms(now_ms); };
  auto writer = store_test::open_writer(options);
  writer.enqueue(three_hours());
  ASSERT_TRUE(writer.flush(k_wait));
  ASSERT_TRUE(writer.run_maintenance(k_wait));
  {
    raw_db db(dir.file("h.db"));
    EXPECT_EQ(db.integer("SELECT count(*) FROM zone_hours"), 6);
    EXPECT_EQ(db.integer("SELECT count(*) FROM zone_samples"), 0);
  }
  now_ms = k_t0_ms + 11 * k_day_ms;
  ASSERT_TRUE(writer.run_maintenance(k_wait));
  EXPECT_EQ(writer.counters().hours_deleted, 6u);
  writer.stop();
  raw_db db(dir.file("h.db"));
  EXPECT_EQ(db.integer("SELECT count(*) FROM zone_hours"), 0);
}

}  // namespace
}  // namespace dewmargin
