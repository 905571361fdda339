#pragma once
// A quantity over the day given at a few times (hourly weather, an occupancy schedule): linear
// between its points, flat before the first and after the last. A step is written as two
// points a minute apart.
#include <utility>
#include <vector>

namespace dewmargin::sim {

class time_series {
 public:
  // Zero all day.
  time_series() = default;
  // The same value all day.
  static time_series constant(double value);
  // Points (seconds since midnight, value), strictly increasing in time; at least one.
  // Throws std::invalid_argument otherwise (the scenario reader checks before).
  explicit time_series(std::vector<std::pair<double, double>> points);

  [[nodiscard]] double at(double t_s) const;
  [[nodiscard]] double max_value() const;
  [[nodiscard]] const std::vector<std::pair<double, double>>& points() const { return points_; }
  // Every value multiplied by `factor`.
  [[nodiscard]] time_series scaled(double factor) const;

 private:
  std::vector<std::pair<double, double>> points_;
};

}  // namespace dewmargin::sim
