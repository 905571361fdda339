#include "model/random_stream.h"

#include <cmath>

namespace dewmargin::sim {
namespace {

// FNV-1a, 64 bit (constants from memory): mixes the stream name into the seed.
std::uint64_t fnv1a(std::string_view s) {
  std::uint64_t h = 0xcbf29ce484222325ULL;
  for (char c : s) {
    h ^= static_cast<unsigned char>(c);
    h *= 0x100000001b3ULL;
  }
  return h;
}

constexpr double k_two_pi = 6.283185307179586;

}  // namespace

random_stream::random_stream(std::uint64_t seed, std::string_view name) : state_(seed ^ fnv1a(name)) {}

std::uint64_t random_stream::next_u64() {
  std::uint64_t z = (state_ += 0x9e3779b97f4a7c15ULL);
  z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
  z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
  return z ^ (z >> 31);
}

double random_stream::uniform() { return static_cast<double>(next_u64() >> 11) * 0x1.0p-53; }

double random_stream::normal(double sigma) {
  if (has_spare_) {
    has_spare_ = false;
    return spare_ * sigma;
  }
  double u1 = uniform();
  while (u1 <= 0.0) u1 = uniform();
  const double u2 = uniform();
  const double r = std::sqrt(-2.0 * std::log(u1));
  spare_ = r * std::sin(k_two_pi * u2);
  has_spare_ = true;
  return r * std::cos(k_two_pi * u2) * sigma;
}

}  // namespace dewmargin::sim
