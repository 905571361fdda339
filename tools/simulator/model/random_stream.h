#pragma once
// Deterministic pseudo-random numbers for sensor noise: SplitMix64 (Steele, Lea & Flood,
// "Fast splittable pseudorandom number generators", OOPSLA 2014; constants from memory) and
// Box–Muller for normal deviates. Written out here rather than std::normal_distribution, whose
// output differs between standard libraries: a seed must give the same day everywhere.
#include <cstdint>
#include <string_view>

namespace dewmargin::sim {

class random_stream {
 public:
  // One independent stream per (seed, name): adding a sensor does not shift the others.
  random_stream(std::uint64_t seed, std::string_view name);

  std::uint64_t next_u64();
  double uniform();             // [0, 1)
  double normal(double sigma);  // mean 0

 private:
  std::uint64_t state_;
  bool has_spare_ = false;
  double spare_ = 0.0;
};

}  // namespace dewmargin::sim
