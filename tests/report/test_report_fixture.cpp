// The whole report over tests/data/history/report_fixture.sql (made by make_report_fixture.py,
// whose docstring tells the scenario). Every expected number below is worked out by hand from
// that scenario; the working is beside each check.
#include <gtest/gtest.h>

#include "dewmargin/psychro.h"
#include "dewmargin/report/report_data.h"
#include "dewmargin/store.h"
#include "report_fixture_db.h"
#include "store_test_support.h"

namespace dewmargin::report {
namespace {

using store_test::raw_db;
using store_test::temp_dir;

constexpr double k_min = 60.0;
const timestamp k_since = parse_iso8601("2026-07-14T08:00:00Z").value();
const timestamp k_until = parse_iso8601("2026-07-14T12:00:00Z").value();

report_data fixture_report(const std::filesystem::path& file) {
  auto reader = history_reader::open(file);
  EXPECT_TRUE(reader.ok()) << reader.err().message;
  report_options o;
  o.since = k_since;
  o.until = k_until;
  o.generated_at = k_until;
  auto data = build_report(reader.value(), o);
  EXPECT_TRUE(data.ok()) << data.err().message;
  return std::move(data).value();
}

const zone_report& zone(const report_data& d, const std::string& id) {
  for (const auto& z : d.zones) {
    if (z.review.zone == id) return z;
  }
  throw std::runtime_error("no zone " + id);
}

TEST(ReportFixture, BandTimesFromTheBandEvents) {
  temp_dir dir;
  const report_data d = fixture_report(report_fixture_db(dir));
  ASSERT_EQ(d.zones.size(), 2u);
  const zone_review& a = zone(d, "a").review;
  // safe 08:00-08:30, 09:30-10:00, 10:06-12:00 = 30 + 30 + 114; tight 08:30-08:40, 09:05-09:30;
  // alarm 08:40-08:50; condensing 08:50-09:05, 10:00-10:06.
  EXPECT_DOUBLE_EQ(a.band_s[0], 174 * k_min);
  EXPECT_DOUBLE_EQ(a.band_s[1], 35 * k_min);
  EXPECT_DOUBLE_EQ(a.band_s[2], 10 * k_min);
  EXPECT_DOUBLE_EQ(a.band_s[3], 21 * k_min);
  EXPECT_DOUBLE_EQ(a.band_s[4], 0.0);
  EXPECT_DOUBLE_EQ(a.no_data_s, 0.0);
  // b: safe from 07:50 (the state at 08:00 comes from the event before the period), 18 visits of
  // 10 s to alarm.
  const zone_review& b = zone(d, "b").review;
  EXPECT_DOUBLE_EQ(b.band_s[2], 18 * 10.0);
  EXPECT_DOUBLE_EQ(b.band_s[0], 240 * k_min - 180.0);
}

TEST(ReportFixture, TimeToAcknowledgeAndWarningTime) {
  temp_dir dir;
  const report_data d = fixture_report(report_fixture_db(dir));
  const zone_review& a = zone(d, "a").review;
  ASSERT_EQ(a.raises.size(), 2u);  // 08:40 (alarm), 10:00 (straight to condensing)
  // 08:40 → ack 08:55 = 15 min; 10:00 → ack 10:12 = 12 min; median of two = 13.5 min.
  EXPECT_EQ(a.ack_delays_s, (std::vector<double>{15 * k_min, 12 * k_min}));
  EXPECT_DOUBLE_EQ(*a.median_ack_s(), 13.5 * k_min);
  EXPECT_DOUBLE_EQ(*a.longest_ack_s(), 15 * k_min);
  ASSERT_EQ(a.condensing.size(), 2u);
  EXPECT_EQ(a.condensing[0].start, parse_iso8601("2026-07-14T08:50:00Z").value());
  EXPECT_DOUBLE_EQ(a.condensing[0].duration_s, 15 * k_min);
  EXPECT_DOUBLE_EQ(a.condensing[0].warning_s, 10 * k_min) << "alarm at 08:40, condensing at 08:50";
  EXPECT_DOUBLE_EQ(a.condensing[1].duration_s, 6 * k_min);
  EXPECT_DOUBLE_EQ(a.condensing[1].warning_s, 0.0) << "safe straight to condensing: no warning";
  EXPECT_DOUBLE_EQ(a.stale_input_s, 20 * k_min);  // 10:30 stale .. 10:50 ok
  EXPECT_EQ(a.unacknowledged_at_end, 0);
  EXPECT_EQ(a.shelves, 1);
  const zone_review& b = zone(d, "b").review;
  EXPECT_EQ(b.raises.size(), 18u);
  EXPECT_EQ(b.unacknowledged_at_end, 1);
  EXPECT_TRUE(b.ack_delays_s.empty());
}

TEST(ReportFixture, AlarmSystemFigures) {
  temp_dir dir;
  const report_data d = fixture_report(report_fixture_db(dir));
  const alarm_figures& f = d.alarms;
  EXPECT_EQ(f.alarms, 20);                           // a 2 + b 18
  EXPECT_DOUBLE_EQ(f.per_day_avg, 20 / (4.0 / 24));  // 4 hours: 120 a day
  EXPECT_EQ(f.periods_10min, 24);
  EXPECT_DOUBLE_EQ(f.per_10min_avg, 20.0 / 24);
  EXPECT_EQ(f.per_10min_peak, 12);  // 09:00-09:10: b's 12
  EXPECT_EQ(f.peak_10min, parse_iso8601("2026-07-14T09:00:00Z").value());
  // 09:00-09:10 has 12 (> 10: a flood starts), 09:10-09:20 has 6 (not < 5: still in flood),
  // 09:20-09:30 has 0 (ends): 2 of 24 periods.
  EXPECT_EQ(f.flood_periods, 2);
  EXPECT_EQ(f.floods, 1);
  EXPECT_NEAR(f.flood_pct, 100.0 * 2 / 24, 1e-9);
  EXPECT_EQ(f.chattering_sources, 1);   // b: 09:00:00, :20, :40
  EXPECT_EQ(f.chattering_episodes, 1);  // the others are 55 s and 90 s apart
  EXPECT_EQ(f.stale_alarms, 0);
  EXPECT_EQ(f.shelved, 1);
  ASSERT_EQ(f.top_sources.size(), 2u);
  EXPECT_EQ(f.top_sources[0].source, "b");
  EXPECT_DOUBLE_EQ(f.top_sources[0].share_pct, 90.0);
}

TEST(ReportFixture, MouldHoursAndWorstMargin) {
  temp_dir dir;
  const report_data d = fixture_report(report_fixture_db(dir));
  const zone_period& a = zone(d, "a").series.total();
  // 85 % over 09:00-10:29 (90 min) and 82 % over 11:20-11:49 (30 min): 2.0 h, longest 90 min.
  EXPECT_EQ(a.mould_minutes, 120);
  EXPECT_EQ(a.mould_longest_min, 90);
  EXPECT_DOUBLE_EQ(*a.min_margin_k, -0.8);
  EXPECT_EQ(a.min_margin_at, parse_iso8601("2026-07-14T08:55:00Z").value());
  // b stores no surface RH: computed per minute from 25 °C, 60 %, 17 °C (about 98 %): all 240 min.
  const zone_period& b = zone(d, "b").series.total();
  EXPECT_EQ(b.mould_minutes, 240);
  EXPECT_EQ(b.mould_longest_min, 240);
  EXPECT_NEAR(*b.max_surface_rh_pct, psychro::surface_rh_pct(25.0, 60.0, 17.0).value(), 1e-9);
}

TEST(ReportFixture, PageHasOneMarginChartPerZoneAndNothingFromOutside) {
  temp_dir dir;
  const report_data d = fixture_report(report_fixture_db(dir));
  const std::string html = render_html(d);
  std::size_t margin_charts = 0;
  for (std::size_t at = html.find("aria-label=\"margin of zone "); at != std::string::npos;
       at = html.find("aria-label=\"margin of zone ", at + 1)) {
    ++margin_charts;
  }
  EXPECT_EQ(margin_charts, 2u);
  for (const char* outside : {"http:", "https:", "src=", "<script", "<link", "@import", "//"}) {
    EXPECT_EQ(html.find(outside), std::string::npos) << outside;
  }
  EXPECT_NE(html.find("Caution: dewmargin supervises"), std::string::npos);
  EXPECT_NE(verdict_text(d).find("1 of 2 zones reached the dew point"), std::string::npos) << verdict_text(d);
}

}  // namespace
}  // namespace dewmargin::report
