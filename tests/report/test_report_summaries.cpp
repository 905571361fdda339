// The report drawn from hourly summaries equals the report drawn from the minutes: the fixture
// of test_report_fixture.cpp (tests/data/history/report_fixture.sql) is loaded as minutes only,
// reported, then summarised by the service's writer and reported again. Every figure must be the
// same: minima and when, band minutes, mould minutes and runs, bucket by bucket, and the page.
#include <gtest/gtest.h>

#include "dewmargin/report/report_data.h"
#include "dewmargin/store.h"
#include "report_fixture_db.h"
#include "store_test_support.h"

namespace dewmargin::report {
namespace {

using store_test::raw_db;
using store_test::temp_dir;

// One maintenance pass of the service's writer: it summarises every hour before the newest one
// (no roll-up: the minutes stay).
void summarise(const std::filesystem::path& file) {
  store_test::error_sink errors;
  auto options = store_test::test_options(file, errors);
  options.keep_minute_samples_days = 0;
  options.keep_events_days = 0;
  options.keep_samples_days = 0;
  auto w = store_test::open_writer(options);
  ASSERT_TRUE(w.run_maintenance(store_test::k_wait));
  w.stop();
  EXPECT_TRUE(errors.lines().empty()) << errors.lines().front();
}

report_data report(const std::filesystem::path& file, const char* since, const char* until, std::size_t buckets) {
  auto reader = history_reader::open(file);
  EXPECT_TRUE(reader.ok()) << reader.err().message;
  report_options o;
  o.since = parse_iso8601(since).value();
  o.until = parse_iso8601(until).value();
  o.generated_at = *o.until;
  o.chart_buckets = buckets;
  auto data = build_report(reader.value(), o);
  EXPECT_TRUE(data.ok()) << data.err().message;
  return std::move(data).value();
}

void expect_same_period(const zone_period& a, const zone_period& b, const std::string& where) {
  SCOPED_TRACE(where);
  EXPECT_EQ(a.sample_minutes, b.sample_minutes);
  EXPECT_EQ(a.min_margin_k, b.min_margin_k);
  if (a.min_margin_k) {
    EXPECT_EQ(a.min_margin_at, b.min_margin_at);
  }
  EXPECT_EQ(a.max_margin_k, b.max_margin_k);
  EXPECT_EQ(a.max_dew_point_c, b.max_dew_point_c);
  EXPECT_EQ(a.min_surface_c, b.min_surface_c);
  EXPECT_EQ(a.max_surface_rh_pct, b.max_surface_rh_pct);
  EXPECT_EQ(a.band_minutes, b.band_minutes);
  EXPECT_EQ(a.mould_minutes, b.mould_minutes);
  EXPECT_EQ(a.mould_longest_min, b.mould_longest_min);
  EXPECT_EQ(a.mean_margin_k.minutes, b.mean_margin_k.minutes);
  EXPECT_NEAR(a.mean_margin_k.mean, b.mean_margin_k.mean, 1e-9);
  EXPECT_NEAR(a.mean_surface_rh_pct.mean, b.mean_surface_rh_pct.mean, 1e-9);
  EXPECT_NEAR(a.mean_supply_c.mean, b.mean_supply_c.mean, 1e-9);
}

struct period_case {
  const char* since;
  const char* until;
  std::size_t buckets;  // chart points at most: 4 h in 4 gives hour buckets, 2 h buckets for 3
};

TEST(ReportSummaries, TheReportFromHoursEqualsTheReportFromMinutes) {
  for (const auto& c : {period_case{"2026-07-14T08:00:00Z", "2026-07-14T12:00:00Z", 4},
                        period_case{"2026-07-14T08:30:00Z", "2026-07-14T11:45:00Z", 3},
                        period_case{"2026-07-14T07:00:00Z", "2026-07-14T12:00:00Z", 5}}) {
    SCOPED_TRACE(std::string(c.since) + " … " + c.until);
    temp_dir dir;
    const auto file = report_fixture_db(dir);
    const report_data from_minutes = report(file, c.since, c.until, c.buckets);
    ASSERT_TRUE(from_minutes.layout.whole_hours()) << "buckets of whole hours: the summaries may be used";
    summarise(file);
    {
      raw_db db(file);
      ASSERT_EQ(db.integer("SELECT count(*) FROM zone_hours"), 6) << "08, 09 and 10 h of zones a and b";
      ASSERT_EQ(db.integer("SELECT count(*) FROM zone_samples"), 480) << "the minutes stay";
    }
    const report_data from_hours = report(file, c.since, c.until, c.buckets);
    EXPECT_LT(from_hours.periods_read, from_minutes.periods_read) << "hours read in place of minutes";
    ASSERT_EQ(from_minutes.zones.size(), 2u);
    ASSERT_EQ(from_hours.zones.size(), from_minutes.zones.size());
    for (std::size_t z = 0; z < from_minutes.zones.size(); ++z) {
      const zone_series& a = from_minutes.zones[z].series;
      const zone_series& b = from_hours.zones[z].series;
      ASSERT_EQ(a.zone(), b.zone());
      expect_same_period(a.total(), b.total(), a.zone() + " whole period");
      ASSERT_EQ(a.buckets().size(), b.buckets().size());
      for (std::size_t i = 0; i < a.buckets().size(); ++i) {
        expect_same_period(a.buckets()[i], b.buckets()[i], a.zone() + " bucket " + std::to_string(i));
      }
      EXPECT_EQ(from_minutes.zones[z].review.band_s, from_hours.zones[z].review.band_s);
    }
    EXPECT_EQ(render_html(from_minutes), render_html(from_hours)) << "the page is the same";
  }
}

TEST(ReportSummaries, ShortPeriodsAreDrawnFromMinutes) {
  temp_dir dir;
  const auto file = report_fixture_db(dir);
  summarise(file);
  // 4 h in at most 480 points: buckets of a minute; no hour may stand for its minutes.
  const report_data d = report(file, "2026-07-14T08:00:00Z", "2026-07-14T12:00:00Z", 480);
  EXPECT_FALSE(d.layout.whole_hours());
  EXPECT_EQ(d.periods_read, 480u);
}

}  // namespace
}  // namespace dewmargin::report
