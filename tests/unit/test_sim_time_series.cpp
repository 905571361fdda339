// Values over the day (tools/simulator/model/time_series.h): linear between points, flat outside.
#include <gtest/gtest.h>

#include <stdexcept>

#include "model/time_series.h"

namespace dewmargin::sim {
namespace {

TEST(SimTimeSeries, LinearBetweenPointsFlatOutside) {
  const time_series s({{3600.0, 10.0}, {7200.0, 20.0}, {7260.0, 0.0}});
  struct row {
    double t_s;
    double value;
  };
  for (const row& r : {row{0.0, 10.0}, row{3600.0, 10.0}, row{5400.0, 15.0}, row{7200.0, 20.0}, row{7230.0, 10.0},
                       row{7260.0, 0.0}, row{86400.0, 0.0}}) {
    EXPECT_DOUBLE_EQ(s.at(r.t_s), r.value) << r.t_s;
  }
  EXPECT_DOUBLE_EQ(s.max_value(), 20.0);
  EXPECT_DOUBLE_EQ(s.scaled(0.5).at(5400.0), 7.5);
  EXPECT_DOUBLE_EQ(time_series::constant(4.0).at(1e5), 4.0);
  EXPECT_DOUBLE_EQ(time_series().at(10.0), 0.0);
}

TEST(SimTimeSeries, PointsMustIncrease) {
  EXPECT_THROW(time_series(std::vector<std::pair<double, double>>{}), std::invalid_argument);
  EXPECT_THROW(time_series({{10.0, 1.0}, {10.0, 2.0}}), std::invalid_argument);
  EXPECT_THROW(time_series({{20.0, 1.0}, {10.0, 2.0}}), std::invalid_argument);
}

}  // namespace
}  // namespace dewmargin::sim
