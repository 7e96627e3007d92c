#include "problem/seeded_random.hpp"

#include <cmath>
#include <numbers>

namespace gapwise {
namespace {
std::uint64_t splitmix64(std::uint64_t x) {
  x += 0x9E3779B97F4A7C15ULL;
  x = (x ^ (x >> 30)) * 0xBF58476D1CE4E5B9ULL;
  x = (x ^ (x >> 27)) * 0x94D049BB133111EBULL;
  return x ^ (x >> 31);
}
}  // namespace

std::uint64_t derive_seed(std::uint64_t master, std::initializer_list<std::uint64_t> keys) {
  std::uint64_t h = splitmix64(master);
  for (std::uint64_t k : keys) h = splitmix64(h ^ splitmix64(k + 0x632BE59BD9B4E019ULL));
  return h >> 1;
}

std::uint64_t uniform_index(std::mt19937_64& rng, std::uint64_t n) {
  if (n <= 1) return 0;
  // Smallest all-ones mask covering n-1; draw until the masked value is < n.
  std::uint64_t mask = n - 1;
  mask |= mask >> 1; mask |= mask >> 2; mask |= mask >> 4;
  mask |= mask >> 8; mask |= mask >> 16; mask |= mask >> 32;
  for (;;) {
    const std::uint64_t x = rng() & mask;
    if (x < n) return x;
  }
}

double uniform_unit(std::mt19937_64& rng) { return static_cast<double>(rng() >> 11) * 0x1.0p-53; }

double standard_normal(std::mt19937_64& rng) {
  const double u1 = 1.0 - uniform_unit(rng);  // (0, 1]: log is finite
  const double u2 = uniform_unit(rng);
  return std::sqrt(-2.0 * std::log(u1)) * std::cos(2.0 * std::numbers::pi * u2);
}

}  // namespace gapwise
