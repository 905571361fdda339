// A simulated year through the service's writer, with the roll-up running as the service runs
// it: the file stays bounded, and the report over the year still finds the one dip, the mould
// run and the band minutes, most of them now in hourly rows.
#include <gtest/gtest.h>

#include "dewmargin/report/report_data.h"
#include "dewmargin/store.h"
#include "store_test_support.h"

namespace dewmargin::report {
namespace {

using store_test::raw_db;
using store_test::temp_dir;

constexpr std::int64_t k_min_ms = 60'000;
constexpr std::int64_t k_day_ms = 86'400'000;
constexpr std::int64_t k_start_ms = 1'767'225'600'000;  // 2026-01-01T00:00:00Z
constexpr int k_days = 365;

zone_sample sample(int day, int minute, const char* zone) {
  zone_sample s;
  s.minute_start = from_unix_ms(k_start_ms + day * k_day_ms + minute * k_min_ms);
  s.zone = zone;
  const bool z0 = zone[1] == '0';
  const bool dip = z0 && day == 200 && minute == 600;
  s.min_margin_k = dip ? -1.5 : (!z0 && minute == 720 ? 1.5 : 3.0);
  s.worst_band = dip ? "condensing" : (!z0 && minute == 720 ? "tight" : "safe");
  s.max_dew_point_c = 14.0;
  s.air_temp_c = 25.0;
  s.rh_pct = 50.0;
  s.surface_min_c = 17.0;
  s.supply_c = 16.0;
  const bool wet = z0 && ((day >= 100 && day < 105) || (day == 350 && minute < 120));
  s.surface_rh_pct = wet ? 85.0 : 60.0;
  return s;
}

TEST(ReportYear, FileStaysBoundedAndTheReportStaysRight) {
  temp_dir dir;
  const auto file = dir.file("year.db");
  store_test::error_sink errors;
  auto options = store_test::test_options(file, errors);
  options.keep_minute_samples_days = 35;
  options.keep_samples_days = 400;
  options.keep_events_days = 730;
  options.max_pending_rows = 100'000;
  std::int64_t now_ms = k_start_ms;
  options.retention_now = [&now_ms] { return from_unix_ms(now_ms); };
  auto writer = store_test::open_writer(options);
  for (int day = 0; day < k_days; ++day) {
    engine_output out;
    for (int minute = 0; minute < 1440; ++minute) {
      out.samples.push_back(sample(day, minute, "z0"));
      out.samples.push_back(sample(day, minute, "z1"));
    }
    if (day == 200) {
      out.events.push_back(store_test::make_event(k_start_ms + day * k_day_ms + 600 * k_min_ms, "z0", "band",
                                                  R"(,"from":"safe","to":"condensing")"));
      out.events.push_back(store_test::make_event(k_start_ms + day * k_day_ms + 601 * k_min_ms, "z0", "band",
                                                  R"(,"from":"condensing","to":"safe")"));
    }
    writer.enqueue(out);
    ASSERT_TRUE(writer.flush(store_test::k_wait));
    now_ms = k_start_ms + (day + 1) * k_day_ms;
    if (day % 7 == 6 || day == k_days - 1) {
      ASSERT_TRUE(writer.run_maintenance(store_test::k_wait));
    }
  }
  const auto counters = writer.counters();
  writer.stop();
  ASSERT_TRUE(errors.lines().empty()) << errors.lines().front();

  // Bounded: at most 35 days (and the day being rolled) of minutes; the rest are hours.
  raw_db db(file);
  const auto minutes = db.integer("SELECT count(*) FROM zone_samples");
  const auto hours = db.integer("SELECT count(*) FROM zone_hours");
  EXPECT_LE(minutes, 2 * 1440 * 36);
  EXPECT_GE(hours, 2 * 24 * (k_days - 36));
  EXPECT_EQ(static_cast<std::int64_t>(counters.minutes_rolled_up), 2 * 1440 * k_days - minutes);
  const auto bytes = std::filesystem::file_size(file);
  // Measured about 100 bytes per per-minute row and 140 per hourly row; the bound leaves room
  // (and is a tenth of what the year would take in per-minute rows: ~105 MB).
  const std::uintmax_t bound =
      static_cast<std::uintmax_t>(minutes) * 160 + static_cast<std::uintmax_t>(hours) * 260 + 2'000'000;
  EXPECT_LE(bytes, bound) << minutes << " minute rows, " << hours << " hour rows";
  std::cout << "[ year ] file " << bytes / 1000 << " kB: " << minutes << " minute rows, " << hours
            << " hourly rows (bound " << bound / 1000 << " kB)\n";

  auto reader = history_reader::open(file);
  ASSERT_TRUE(reader.ok()) << reader.err().message;
  report_options o;
  o.since = from_unix_ms(k_start_ms);
  o.until = from_unix_ms(k_start_ms + k_days * k_day_ms);
  o.generated_at = *o.until;
  auto data = build_report(reader.value(), o);
  ASSERT_TRUE(data.ok()) << data.err().message;
  ASSERT_EQ(data.value().zones.size(), 2u);
  const zone_report& z0 = data.value().zones[0];
  const zone_report& z1 = data.value().zones[1];
  ASSERT_EQ(z0.review.zone, "z0");
  const zone_period& t0 = z0.series.total();
  EXPECT_EQ(t0.sample_minutes, 1440 * k_days);
  EXPECT_DOUBLE_EQ(*t0.min_margin_k, -1.5);
  EXPECT_EQ(to_unix_ms(t0.min_margin_at), k_start_ms + 200 * k_day_ms + 600 * k_min_ms)
      << "the minute, from an hour row";
  EXPECT_EQ(t0.mould_minutes, 5 * 1440 + 120);
  EXPECT_EQ(t0.mould_longest_min, 5 * 1440) << "a five-day run across 120 hourly rows";
  EXPECT_EQ(t0.band_minutes[3], 1);
  EXPECT_EQ(z1.series.total().band_minutes[1], k_days) << "one tight minute a day";
  EXPECT_EQ(z1.series.total().mould_minutes, 0);
  EXPECT_DOUBLE_EQ(z0.review.band_s[3], 60.0) << "condensing 10:00-10:01 on day 200, from the events";
  // The chart of the year still shows the dip.
  double lowest = 10.0;
  for (const auto& b : z0.series.buckets()) {
    if (b.min_margin_k) lowest = std::min(lowest, *b.min_margin_k);
  }
  EXPECT_DOUBLE_EQ(lowest, -1.5);
}

}  // namespace
}  // namespace dewmargin::report
