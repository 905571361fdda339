#pragma once
// Chart series: the period cut into at most N buckets of a round length (1 min … 1 day), each
// bucket the merge of the periods that start in it. Merging keeps the minimum margin, so a
// year drawn in 500 points still shows every dip (see zone_period).
#include <chrono>
#include <vector>

#include "dewmargin/zone_period.h"

namespace dewmargin::report {

struct series_layout {
  timestamp since;
  timestamp until;
  // Where the first bucket starts: `since`, rounded down to the hour for buckets of an hour or
  // more, so that an hour's summary falls whole into one bucket (the chart clips at `since`).
  timestamp origin;
  std::chrono::minutes bucket{1};
  std::size_t count = 0;
  [[nodiscard]] timestamp start_of(std::size_t i) const { return origin + bucket * static_cast<std::int64_t>(i); }
  // Buckets of whole hours: the report may read hourly summaries instead of minutes.
  [[nodiscard]] bool whole_hours() const { return bucket.count() % 60 == 0; }
  // The bucket a time falls in, clamped into [0, count).
  [[nodiscard]] std::size_t index_of(timestamp t) const;
};

// The smallest round bucket that cuts [since, until) into at most max_buckets.
[[nodiscard]] series_layout layout_for(timestamp since, timestamp until, std::size_t max_buckets);

// One zone's buckets. A bucket starts at its first period (so that two halves of the period,
// read apart, join without a false gap); the chart places it by the layout.
class zone_series {
 public:
  zone_series(std::string zone, const series_layout& layout);
  [[nodiscard]] const std::string& zone() const { return total_.zone; }
  void add(const zone_period& p);  // periods of one zone, in time order
  // Appends the buckets of a later part of the period (read separately), bucket by bucket.
  void absorb(const zone_series& later);
  // Merges the buckets into total(); call once, after the last add/absorb.
  void finish();
  [[nodiscard]] const std::vector<zone_period>& buckets() const { return buckets_; }
  [[nodiscard]] const zone_period& total() const { return total_; }  // the whole period merged

 private:
  series_layout layout_;
  std::vector<zone_period> buckets_;
  zone_period total_;
};

}  // namespace dewmargin::report
