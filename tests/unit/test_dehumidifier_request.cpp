#include <gtest/gtest.h>

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

}  // namespace
}  // namespace dewmargin
