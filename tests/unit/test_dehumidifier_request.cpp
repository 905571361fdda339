#include <gtest/gtest.h>

#include <string>
#include <vector>

#include "dewmargin/dehumidifier_request.h"

namespace dewmargin {
namespace {

const std::string k_a = "a", k_b = "b";
const dew_point_request_config k_cfg{"plant/doas/dp", 8.0, 14.0, 3.0};

TEST(DehumidifierRequest, ColdestReferenceMinusOffset) {
  const auto r = compute_dehumidifier_request({{&k_a, 17.0, 16.0}, {&k_b, std::nullopt, 16.5}}, k_cfg);
  EXPECT_DOUBLE_EQ(r.request_c, 13.5);  // b's supply 16.5 is colder than a's surface 17
  EXPECT_EQ(r.reason, "coldest supply 16.50 °C in b - 3.00 K");
}

TEST(DehumidifierRequest, ASurfaceOutranksItsOwnZonesSupply) {
  const auto r = compute_dehumidifier_request({{&k_a, 16.8, 12.0}}, k_cfg);
  EXPECT_DOUBLE_EQ(r.request_c, 13.8);
  EXPECT_EQ(r.reason, "coldest surface 16.80 °C in a - 3.00 K");
}

TEST(DehumidifierRequest, ClampedToItsRange) {
  EXPECT_EQ(compute_dehumidifier_request({{&k_a, 10.0, std::nullopt}}, k_cfg).request_c, 8.0);
  EXPECT_EQ(compute_dehumidifier_request({{&k_a, 30.0, std::nullopt}}, k_cfg).request_c, 14.0);
}

TEST(DehumidifierRequest, NothingKnownAsksForTheDriestAir) {
  const auto r = compute_dehumidifier_request({{&k_a, std::nullopt, std::nullopt}}, k_cfg);
  EXPECT_EQ(r.request_c, 8.0);
  EXPECT_EQ(r.reason, "no surface or supply temperature known: driest request");
}

TEST(DehumidifierRequest, RepublishedOnATenthOfAKelvin) {
  EXPECT_TRUE(dehumidifier_request_moved(std::nullopt, 13.0));
  EXPECT_FALSE(dehumidifier_request_moved(13.0, 13.05));
  EXPECT_TRUE(dehumidifier_request_moved(13.0, 13.1));
  EXPECT_TRUE(dehumidifier_request_moved(13.0, 12.9));
}

// Trim-and-respond, the reset method of ASHRAE Guideline 36 (section 5.1.14): requests lower
// the dew point by respond_k each, at most max_step_k per step; none raise it by trim_k.
// The defaults (120 s, 0.3 K, 1.0 K, 0.1 K) are the documented ones of this project.
const timestamp k_t0 = from_unix_ms(1'784'030'400'000);  // 2026-07-14T12:00:00Z
timestamp at_s(std::int64_t s) { return k_t0 + std::chrono::seconds(s); }

const std::string k_c = "c", k_d = "d";

zone_reference zone_at(const std::string* id, band b, double margin_k, bool held = false) {
  zone_reference z{id, std::nullopt, 16.0};  // feed-forward: supply 16 - 3 = 13 °C
  z.zone_band = b;
  z.margin_k = margin_k;
  z.held = held;
  return z;
}

TEST(DehumidifierTrim, WhichZonesRequestDrierAir) {
  struct request_case {
    band b;
    bool unknown_is_fault;
    bool held;
    bool requests;
  };
  const std::vector<request_case> cases = {
      {band::safe, false, false, false},      {band::tight, false, false, true},  {band::alarm, false, false, true},
      {band::condensing, false, false, true}, {band::unknown, true, false, true}, {band::unknown, false, false, false},
      {band::safe, false, true, true},
  };
  for (const auto& c : cases) {
    zone_reference z = zone_at(&k_a, c.b, 1.0, c.held);
    z.unknown_is_fault = c.unknown_is_fault;
    EXPECT_EQ(zone_requests_drier_air(z), c.requests) << band_name(c.b) << " held " << c.held;
  }
}

struct trim_case {
  const char* name;
  std::vector<band> bands;  // of zones a, b, c, d
  double expected_c;        // after one step from 12.1 °C
  std::string reason;
};

TEST(DehumidifierTrim, OneStepRespondsToRequestsOrTrims) {
  const std::vector<const std::string*> ids{&k_a, &k_b, &k_c, &k_d};
  const std::vector<trim_case> cases = {
      {"no requests: trim up", {band::safe, band::safe}, 12.2, "trim-and-respond: no requests: +0.10 K"},
      {"one request", {band::tight, band::safe}, 11.8, "trim-and-respond: 1 request, worst a (tight): -0.30 K"},
      {"three requests",
       {band::tight, band::alarm, band::tight},
       11.2,
       "trim-and-respond: 3 requests, worst b (alarm): -0.90 K"},
      {"four requests: at most max_step_k",
       {band::tight, band::alarm, band::condensing, band::tight},
       11.1,
       "trim-and-respond: 4 requests, worst c (condensing): -1.00 K"},
  };
  for (const auto& c : cases) {
    // Start at the feed-forward (13 °C), then three steps with one request: 12.1 °C.
    dehumidifier_trim trim;
    std::vector<zone_reference> one_tight{zone_at(&k_a, band::tight, 1.5)};
    EXPECT_DOUBLE_EQ(trim.update(one_tight, k_cfg, at_s(0)).request_c, 13.0);
    for (int step = 1; step <= 3; ++step) trim.update(one_tight, k_cfg, at_s(120 * step));
    ASSERT_NEAR(*trim.request_c(), 12.1, 1e-9);
    std::vector<zone_reference> zones;
    for (std::size_t i = 0; i < c.bands.size(); ++i)
      zones.push_back(zone_at(ids[i], c.bands[i], 1.0 - 0.1 * static_cast<double>(i)));
    EXPECT_NEAR(trim.update(zones, k_cfg, at_s(479)).request_c, 12.1, 1e-9) << c.name << ": no step before step_s";
    const dehumidifier_request r = trim.update(zones, k_cfg, at_s(480));
    EXPECT_NEAR(r.request_c, c.expected_c, 1e-9) << c.name;
    EXPECT_EQ(r.reason, c.reason) << c.name;
  }
}

TEST(DehumidifierTrim, TheFeedForwardIsAnUpperBoundAndTheRangeHolds) {
  dehumidifier_trim trim;
  const std::vector<zone_reference> calm{zone_at(&k_a, band::safe, 3.0)};
  trim.update(calm, k_cfg, at_s(0));
  const dehumidifier_request r = trim.update(calm, k_cfg, at_s(120));
  EXPECT_DOUBLE_EQ(r.request_c, 13.0) << "trim stops at the feed-forward";
  EXPECT_EQ(r.reason, "feed-forward bound: coldest supply 16.00 °C in a - 3.00 K");

  zone_reference colder = zone_at(&k_a, band::safe, 3.0);
  colder.surface_min_c = 15.0;  // feed-forward 12 °C: bounds at once, between steps
  EXPECT_DOUBLE_EQ(trim.update({colder}, k_cfg, at_s(130)).request_c, 12.0);

  const std::vector<zone_reference> wet{zone_at(&k_a, band::condensing, -0.5), zone_at(&k_b, band::alarm, 0.2),
                                        zone_at(&k_c, band::alarm, 0.4), zone_at(&k_d, band::tight, 1.2)};
  double last_c = 12.0;
  for (int step = 2; step <= 10; ++step) last_c = trim.update(wet, k_cfg, at_s(120 * step)).request_c;
  EXPECT_DOUBLE_EQ(last_c, 8.0) << "held at min_c";
  EXPECT_EQ(trim.update(wet, k_cfg, at_s(1320)).reason,
            "trim-and-respond: 4 requests, worst a (condensing): -1.00 K, held at min");
}

TEST(DehumidifierTrim, AZoneHeldByThePermissiveIsARequest) {
  dehumidifier_trim trim;
  const std::vector<zone_reference> held{zone_at(&k_a, band::safe, 3.0, true)};
  trim.update(held, k_cfg, at_s(0));
  const dehumidifier_request r = trim.update(held, k_cfg, at_s(120));
  EXPECT_DOUBLE_EQ(r.request_c, 12.7);
  EXPECT_EQ(r.reason, "trim-and-respond: 1 request, worst a (held by the permissive): -0.30 K");
}

}  // namespace
}  // namespace dewmargin
