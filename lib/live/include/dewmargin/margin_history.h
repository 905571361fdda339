#pragma once
// Each zone's margin over the last hour, for the sparklines of the live page. One point per
// bucket of time (the lowest margin in it: a short dip must stay visible), trimmed to the
// window behind the series' newest point. Times are the states' own `ts`, so a service on
// event time (the demo) draws its simulated hour. Pure; bounded: at most
// window / bucket + 1 points per zone and max_series zones.
#include <chrono>
#include <cstddef>
#include <cstdint>
#include <deque>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "dewmargin/timestamp.h"

namespace dewmargin::live {

struct margin_point {
  timestamp ts;                    // start of the bucket
  std::optional<double> margin_k;  // null: the margin was unknown for the whole bucket
};

class margin_history {
 public:
  explicit margin_history(std::chrono::seconds window = std::chrono::hours(1),
                          std::chrono::seconds bucket = std::chrono::seconds(30), std::size_t max_series = 10000);

  // A new series beyond max_series is not kept (returns false).
  bool add(const std::string& key, timestamp ts, std::optional<double> margin_k);
  void erase(const std::string& key) { series_.erase(key); }

  [[nodiscard]] std::vector<margin_point> series(const std::string& key) const;
  [[nodiscard]] std::vector<std::string> keys() const;
  [[nodiscard]] std::chrono::seconds window() const { return window_; }
  [[nodiscard]] std::chrono::seconds bucket() const { return bucket_; }

 private:
  struct stored {
    std::int64_t bucket_start_ms;
    float margin_k;
    bool known;
  };
  std::chrono::seconds window_;
  std::chrono::seconds bucket_;
  std::size_t max_series_;
  std::map<std::string, std::deque<stored>> series_;
};

}  // namespace dewmargin::live
