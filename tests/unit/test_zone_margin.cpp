// The pure margin computation of a zone. Dew points come from psychro::dew_point_c, checked
// against the npm package psychrolib in test_psychro.cpp; here only what is done with them.
#include <gtest/gtest.h>

#include "dewmargin/psychro.h"
#include "dewmargin/zone_margin.h"

namespace dewmargin {
namespace {

double dp(double t, double rh) { return psychro::dew_point_c(t, rh).value(); }

margin_input good(double v) { return {v, v, false, "ok"}; }
margin_input faulted(const char* status) { return {std::nullopt, std::nullopt, true, status}; }
// Faulted after it had reported `last`: its last good value is kept, but it is not fresh.
margin_input faulted_after(double last, const char* status) { return {std::nullopt, last, true, status}; }
margin_input awaiting() { return {std::nullopt, std::nullopt, false, "awaiting"}; }

zone_readings all_good() {
  zone_readings r;
  r.air_temp_c = good(24);
  r.humidity_pct = {good(50)};
  r.surfaces_c = {good(17)};
  r.supply_c = good(16);
  return r;
}

TEST(ZoneMargin, ColdestSurfaceMinusHighestDewPoint) {
  zone_readings r = all_good();
  r.humidity_pct = {good(50), good(60), faulted("stale")};
  r.surfaces_c = {good(17.5), good(17), awaiting()};
  const zone_margin m = compute_zone_margin(r);
  ASSERT_TRUE(m.margin_k);
  EXPECT_DOUBLE_EQ(*m.dew_point_c, dp(24, 60));
  EXPECT_EQ(m.rh_pct, 60.0);
  EXPECT_EQ(m.surface_min_c, 17.0);
  EXPECT_DOUBLE_EQ(*m.margin_k, 17 - dp(24, 60));
  EXPECT_STREQ(m.margin_source, "surface");
  EXPECT_FALSE(m.unknown_is_fault);
  EXPECT_EQ(m.unknown_reason, "");
}

// A failed sensor never improves the zone (safety first): its loss must not turn an alarm
// into safe, nor lower the dew point that drives the loop's setpoint.
TEST(ZoneMargin, LosingTheMoreHumidSensorKeepsItsLastValueWhileAnotherReports) {
  zone_readings r = all_good();
  r.humidity_pct = {good(50), faulted_after(65, "stale")};
  const zone_margin m = compute_zone_margin(r);
  ASSERT_TRUE(m.dew_point_c);
  EXPECT_DOUBLE_EQ(*m.dew_point_c, dp(24, 65));
  EXPECT_EQ(m.rh_pct, 65.0);
  // All of them failed: no dew point at all (unknown, a fault), never one from old values.
  r.humidity_pct = {faulted_after(50, "stale"), faulted_after(65, "stale")};
  const zone_margin none = compute_zone_margin(r);
  EXPECT_FALSE(none.dew_point_c);
  EXPECT_TRUE(none.unknown_is_fault);
}

TEST(ZoneMargin, LosingOneOfSeveralSurfacesBoundsTheReferenceByTheSupply) {
  zone_readings r = all_good();
  r.surfaces_c = {faulted_after(15.5, "stale"), good(19)};  // the colder one went silent
  r.supply_c = good(16);
  const zone_margin m = compute_zone_margin(r);
  ASSERT_TRUE(m.margin_k);
  EXPECT_DOUBLE_EQ(*m.margin_k, 16 - dp(24, 50)) << "not 19 - dew point";
  EXPECT_STREQ(m.margin_source, "supply");
  EXPECT_EQ(m.surface_min_c, 19.0);
  // With every surface reporting the supply does not count.
  r.surfaces_c = {good(17.5), good(19)};
  EXPECT_DOUBLE_EQ(*compute_zone_margin(r).margin_k, 17.5 - dp(24, 50));
}

TEST(ZoneMargin, SupplyStandsInForAZoneWithoutAFreshSurface) {
  zone_readings r = all_good();
  r.surfaces_c = {faulted("stale")};
  const zone_margin m = compute_zone_margin(r);
  ASSERT_TRUE(m.margin_k);
  EXPECT_DOUBLE_EQ(*m.margin_k, 16 - dp(24, 50));
  EXPECT_STREQ(m.margin_source, "supply");
  EXPECT_FALSE(m.surface_min_c);
}

struct unknown_case {
  const char* name;
  zone_readings readings;
  bool fault;
  const char* reason;
};

TEST(ZoneMargin, NoMarginSaysWhetherItIsAFaultAndWhy) {
  const auto with = [](auto edit) {
    zone_readings r = all_good();
    edit(r);
    return r;
  };
  const unknown_case cases[] = {
      {"waiting for a surface", with([](zone_readings& r) { r.waiting = true; }), false,
       "waiting for the first readings"},
      {"air stale", with([](zone_readings& r) { r.air_temp_c = faulted("stale"); }), true, "air temperature stale"},
      {"air awaiting", with([](zone_readings& r) { r.air_temp_c = awaiting(); }), false, "air temperature awaiting"},
      {"humidity missing", with([](zone_readings& r) { r.humidity_pct = {faulted("missing")}; }), true,
       "no fresh humidity reading"},
      {"supply barred, surface missing", with([](zone_readings& r) {
         r.surfaces_c = {faulted("missing")};
         r.supply_allowed = false;
       }),
       true, "no fresh surface or supply temperature"},
      {"surface and supply stale", with([](zone_readings& r) {
         r.surfaces_c = {faulted("stale")};
         r.supply_c = faulted("stale");
       }),
       true, "no fresh surface or supply temperature"},
      {"supply not yet reported", with([](zone_readings& r) {
         r.surfaces_c = {};
         r.supply_c = awaiting();
         r.supply_awaiting = true;
       }),
       false, "no fresh surface or supply temperature"},
  };
  for (const auto& c : cases) {
    const zone_margin m = compute_zone_margin(c.readings);
    EXPECT_FALSE(m.margin_k) << c.name;
    EXPECT_EQ(m.unknown_is_fault, c.fault) << c.name;
    EXPECT_EQ(m.unknown_reason, c.reason) << c.name;
  }
}

TEST(ZoneMargin, WaitingStillReportsTheValuesItHas) {
  zone_readings r = all_good();
  r.waiting = true;
  const zone_margin m = compute_zone_margin(r);
  EXPECT_FALSE(m.margin_k);
  EXPECT_DOUBLE_EQ(*m.dew_point_c, dp(24, 50));  // the loop's reset needs it
  EXPECT_EQ(m.surface_min_c, 17.0);
  EXPECT_EQ(m.supply_c, 16.0);
}

TEST(ZoneMargin, BarredSupplyIsNoReference) {
  zone_readings r = all_good();
  r.surfaces_c = {faulted("missing")};
  r.supply_allowed = false;
  const zone_margin m = compute_zone_margin(r);
  EXPECT_EQ(m.margin_source, nullptr);
  EXPECT_EQ(m.supply_c, 16.0) << "still shown";
}

}  // namespace
}  // namespace dewmargin
