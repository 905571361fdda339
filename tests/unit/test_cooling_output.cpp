#include <gtest/gtest.h>

#include <cctype>
#include <cmath>
#include <iostream>
#include <limits>
#include <string>

#include "dewmargin/cooling_output.h"
#include "dewmargin/units.h"
#include "dewmargin/water_properties.h"

namespace dewmargin {
namespace {

TEST(LoopCoolingOutput, MatchesTheTwentyFourTimesTonsRule) {
  // Chilled-water sizing rule: gpm = 24 × tons / ΔT(°F), so 100 tons of refrigeration at a 10 °F
  // rise takes 240 US gpm (common practice, no source). 1 ton = 12,000 Btu/h = 3.51685 kW.
  // Water 45 °F supply, 55 °F return.
  const double k_kw_per_ton = 3.51685;
  const double supply_c = units::fahrenheit_to_celsius(45.0);
  const double return_c = units::fahrenheit_to_celsius(55.0);
  const double flow_l_s = units::us_gpm_to_litres_per_second(240.0);
  const auto q = loop_cooling_kw(supply_c, return_c, flow_l_s);
  ASSERT_TRUE(q.ok()) << q.err().message;
  const double expected_kw = 100.0 * k_kw_per_ton;
  EXPECT_NEAR(q.value(), expected_kw, 0.02 * expected_kw);
  std::cout << "[ cooling ] 240 gpm at 45→55 °F: " << q.value() << " kW vs " << expected_kw << " kW ("
            << (q.value() / expected_kw - 1.0) * 100.0 << " %)\n";
}

TEST(LoopCoolingOutput, IsDensityTimesFlowTimesSpecificHeatTimesRise) {
  // Q = ρ V̇ c_p ΔT with properties at the mean water temperature (16 + 19)/2 = 17.5 °C.
  const double rho = water::density_kg_m3(17.5).value();
  const double cp = water::specific_heat_kj_kg_k(17.5).value();
  EXPECT_NEAR(loop_cooling_kw(16.0, 19.0, 0.5).value(), rho * 0.5e-3 * cp * 3.0, 1e-12);
  // About 4.18 kW per L/s and K for water near 18 °C (from memory: c_p ≈ 4.18 kJ/(kg·K), ρ ≈ 1 kg/L).
  EXPECT_NEAR(loop_cooling_kw(16.0, 19.0, 0.5).value(), 0.5 * 3.0 * 4.18, 0.01);
}

TEST(LoopCoolingOutput, KeepsTheSignWhenTheLoopIsHeating) {
  const auto cooling = loop_cooling_kw(16.0, 19.0, 0.5);
  const auto heating = loop_cooling_kw(19.0, 16.0, 0.5);
  ASSERT_TRUE(cooling.ok() && heating.ok());
  EXPECT_GT(cooling.value(), 0.0);
  EXPECT_LT(heating.value(), 0.0);
  EXPECT_DOUBLE_EQ(heating.value(), -cooling.value());  // same mean, same properties
  EXPECT_EQ(loop_cooling_kw(17.0, 17.0, 0.5).value(), 0.0);
}

TEST(LoopCoolingOutput, ZeroFlowGivesZeroOutput) {
  for (double return_c : {14.0, 18.0, 22.0}) {
    const auto q = loop_cooling_kw(18.0, return_c, 0.0);
    ASSERT_TRUE(q.ok());
    EXPECT_EQ(q.value(), 0.0);
    EXPECT_FALSE(std::signbit(q.value())) << "no negative zero for a colder return";
  }
}

struct cooling_error_case {
  const char* what;
  double supply_c;
  double return_c;
  double flow_l_s;
  error_code expected;
};

class LoopCoolingOutputErrors : public ::testing::TestWithParam<cooling_error_case> {};

// gtest prints the case in ctest's test names: the description, not a byte dump.
void PrintTo(const cooling_error_case& c, std::ostream* os) { *os << c.what; }

TEST_P(LoopCoolingOutputErrors, NamesTheError) {
  const auto& c = GetParam();
  const auto q = loop_cooling_kw(c.supply_c, c.return_c, c.flow_l_s);
  ASSERT_FALSE(q.ok()) << c.what << " gave " << q.value();
  EXPECT_EQ(q.err().code, c.expected) << c.what << ": " << q.err().message;
}

constexpr double k_nan = std::numeric_limits<double>::quiet_NaN();
constexpr double k_inf = std::numeric_limits<double>::infinity();

INSTANTIATE_TEST_SUITE_P(
    BadInputs, LoopCoolingOutputErrors,
    ::testing::Values(cooling_error_case{"negative flow", 16.0, 19.0, -0.1, error_code::invalid_argument},
                      cooling_error_case{"NaN flow", 16.0, 19.0, k_nan, error_code::not_finite},
                      cooling_error_case{"infinite flow", 16.0, 19.0, k_inf, error_code::not_finite},
                      cooling_error_case{"NaN supply", k_nan, 19.0, 0.5, error_code::not_finite},
                      cooling_error_case{"infinite return", 16.0, k_inf, 0.5, error_code::not_finite},
                      cooling_error_case{"supply below 0 °C", -2.0, 19.0, 0.5, error_code::out_of_range},
                      cooling_error_case{"return above 60 °C", 50.0, 65.0, 0.5, error_code::out_of_range}),
    [](const ::testing::TestParamInfo<cooling_error_case>& case_info) {
      std::string name = case_info.param.what;
      for (char& ch : name) {
        if (!std::isalnum(static_cast<unsigned char>(ch))) ch = '_';
      }
      return name;
    });

}  // namespace
}  // namespace dewmargin
