// The pure margin computation of a zone. Dew points come from psychro::dew_point_c, checked
// against the npm package psychrolib in test_psychro.cpp; here only what is done with them.
#include <gtest/gtest.h>

#include "dewmargin/psychro.h"
#include "dewmargin/zone_margin.h"

namespace dewmargin {
namespace {

double dp(double t, double rh) { return psychro::dew_point_c(t, rh).value(); }

margin_input good(double v) { return {v, false, "ok"}; }
margin_input faulted(const char* status) { return {std::nullopt, true, status}; }
margin_input awaiting() { return {std::nullopt, false, "awaiting"}; }

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
