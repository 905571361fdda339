#pragma once
// One zone's summary over each minute of event time, for reports (engine_output.h
// zone_sample): the lowest margin, the highest dew point and the worst band seen, and the
// zone's values when the minute is closed.
#include <cstdint>
#include <optional>
#include <string>

#include "dewmargin/band.h"
#include "dewmargin/engine_output.h"
#include "dewmargin/zone_margin.h"

namespace dewmargin {

class minute_sampler {
 public:
  // Takes the zone's evaluation at `now`. When `now` opens a new minute, returns the
  // previous minute's sample (with `m`'s values as its last values).
  std::optional<zone_sample> add(timestamp now, const zone_margin& m, band current, const std::string& zone);
  // The current minute's sample so far, if any, and a fresh start (at shutdown).
  std::optional<zone_sample> close(const zone_margin& m, const std::string& zone);

 private:
  [[nodiscard]] zone_sample sample(const zone_margin& m, const std::string& zone) const;

  std::int64_t minute_ = -1;  // minutes since the epoch; -1: nothing yet
  std::optional<double> min_margin_k_;
  std::optional<double> max_dew_point_c_;
  band worst_ = band::safe;
};

}  // namespace dewmargin
