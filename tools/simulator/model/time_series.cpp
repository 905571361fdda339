#include "model/time_series.h"

#include <algorithm>
#include <stdexcept>

namespace dewmargin::sim {

time_series time_series::constant(double value) { return time_series({{0.0, value}}); }

time_series::time_series(std::vector<std::pair<double, double>> points) : points_(std::move(points)) {
  if (points_.empty()) throw std::invalid_argument("a time series needs at least one point");
  for (std::size_t i = 1; i < points_.size(); ++i) {
    if (!(points_[i].first > points_[i - 1].first)) {
      throw std::invalid_argument("the points of a time series must be in increasing time");
    }
  }
}

double time_series::at(double t_s) const {
  if (points_.empty()) return 0.0;
  if (t_s <= points_.front().first) return points_.front().second;
  if (t_s >= points_.back().first) return points_.back().second;
  const auto after = std::upper_bound(points_.begin(), points_.end(), t_s,
                                      [](double t, const std::pair<double, double>& p) { return t < p.first; });
  const auto before = after - 1;
  const double f = (t_s - before->first) / (after->first - before->first);
  return before->second + f * (after->second - before->second);
}

double time_series::max_value() const {
  double m = points_.empty() ? 0.0 : points_.front().second;
  for (const auto& p : points_) m = std::max(m, p.second);
  return m;
}

time_series time_series::scaled(double factor) const {
  time_series out = *this;
  for (auto& p : out.points_) p.second *= factor;
  return out;
}

}  // namespace dewmargin::sim
