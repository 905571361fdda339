// The simulator's humidity-ratio helpers (tools/simulator/model/moist_air.h).
#include <gtest/gtest.h>

#include "model/moist_air.h"

namespace dewmargin::sim {
namespace {

TEST(SimMoistAir, SaturationHumidityRatioMatchesAshraeTable) {
  // ASHRAE Handbook—Fundamentals 2017, ch. 1, Table 2 (moist air at 101.325 kPa), W_s at
  // saturation (from memory): 10 °C 0.007659, 20 °C 0.014758, 25 °C 0.020170 kg/kg. Tolerance
  // 1 %: the table includes the enhancement factor (about 0.4 %) that Magnus leaves out.
  struct row {
    double t_c;
    double w_s;
  };
  for (const row& r : {row{10.0, 0.007659}, row{20.0, 0.014758}, row{25.0, 0.020170}}) {
    EXPECT_NEAR(humidity_ratio_from_dew_point(r.t_c), r.w_s, 0.01 * r.w_s) << r.t_c << " °C";
  }
}

TEST(SimMoistAir, DewPointAndHumidityRatioAreInverses) {
  for (double dp_c = -10.0; dp_c <= 30.0; dp_c += 2.5) {
    EXPECT_NEAR(dew_point_from_humidity_ratio(humidity_ratio_from_dew_point(dp_c)), dp_c, 1e-9) << dp_c;
  }
}

TEST(SimMoistAir, RelativeHumidityIsHundredAtOrAboveSaturation) {
  EXPECT_DOUBLE_EQ(relative_humidity_pct(20.0, 20.0), 100.0);
  EXPECT_DOUBLE_EQ(relative_humidity_pct(20.0, 21.0), 100.0);
  // 24 °C and a 12.93 °C dew point is 50 % RH (the README's dewpoint example, same formula).
  EXPECT_NEAR(relative_humidity_pct(24.0, 12.93), 50.0, 0.05);
}

TEST(SimMoistAir, NonPositiveHumidityRatioIsAModelBug) {
  EXPECT_THROW(dew_point_from_humidity_ratio(0.0), std::logic_error);
  EXPECT_THROW(dew_point_from_humidity_ratio(-0.001), std::logic_error);
}

}  // namespace
}  // namespace dewmargin::sim
