#pragma once
// Seeded random numbers that are the same on every platform. std::mt19937_64 is
// fully specified by the C++ standard, but the std:: distributions are not (their
// output differs between standard libraries), so gapwise draws its integers,
// uniforms and normals from the raw 64-bit stream with the formulas below.
// Every generator in gapwise is seeded explicitly and the seed is stored with
// the result; nothing uses std::random_device.
//
//   std::mt19937_64 rng(derive_seed(master_seed, {size, index}));
//   std::size_t k = uniform_index(rng, 10);   // 0..9, unbiased
//   double x = standard_normal(rng);          // N(0, 1), Box-Muller
#include <cstdint>
#include <initializer_list>
#include <random>

namespace gapwise {

/// A 63-bit seed (fits a signed 64-bit HDF5 attribute) derived from `master`
/// and a list of integers by SplitMix64 mixing (Steele, Lea and Flood, OOPSLA 2014).
/// Streams for different keys are independent for practical purposes, and one
/// instance's seed does not depend on how many others were asked for.
std::uint64_t derive_seed(std::uint64_t master, std::initializer_list<std::uint64_t> keys);

/// Uniform integer in [0, n), n >= 1, without modulo bias (rejection on the top bits).
std::uint64_t uniform_index(std::mt19937_64& rng, std::uint64_t n);

/// Uniform double in [0, 1) with 53 random bits.
double uniform_unit(std::mt19937_64& rng);

/// Standard normal deviate by the Box-Muller transform (Box and Muller,
/// Ann. Math. Stat. 29, 610 (1958)); uses two uniforms per call.
double standard_normal(std::mt19937_64& rng);

}  // namespace gapwise
