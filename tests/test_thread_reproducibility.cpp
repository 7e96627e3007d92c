// Same inputs, same bits: a 16-qubit anneal (large enough that the Hamiltonian
// kernel runs its OpenMP loops, dim >= 2^16) gives a bit-identical final state
// with 1 and with 2 threads. The kernel's loops write disjoint elements and
// have no reductions, so nothing may depend on the thread count. The split
// propagator shares states only from 2^18 amplitudes on; with that threshold
// lowered, its sweeps and its sums (error control) must be thread-blind too.
#include <doctest/doctest.h>

#include <cstring>
#include <random>

#include <omp.h>

#include "dynamics/anneal_simulation.hpp"
#include "dynamics/split_exponentials.hpp"
#include "problem/classical_spectrum.hpp"

using namespace gapwise;

namespace {
AnnealResult run_with_threads(int threads) {
  IsingProblem p(16);
  for (int i = 0; i < 16; ++i) {
    p.h[static_cast<std::size_t>(i)] = 0.1 * (i % 3) - 0.1;
    p.couplings.push_back({std::min(i, (i + 1) % 16), std::max(i, (i + 1) % 16), -1.0});
  }
  const TransverseIsingHamiltonian H(p);
  const GroundManifold gm = find_ground_manifold(p, H.diagonal());
  Schedule sch;
  const AnnealPath path = sch.path_for(0.05);
  omp_set_num_threads(threads);
  SimulationOptions o;
  o.top_outcomes = 4;
  return simulate_anneal(H, gm, sch.scales, path, initial_state(H, sch, path), o);
}
}  // namespace

TEST_CASE("a 16-qubit anneal is bit-identical with 1 and 2 OpenMP threads") {
  const AnnealResult one = run_with_threads(1);
  const AnnealResult two = run_with_threads(2);
  REQUIRE(one.final_state.size() == (std::size_t{1} << 16));
  REQUIRE(two.final_state.size() == one.final_state.size());
  CHECK(std::memcmp(one.final_state.data(), two.final_state.data(), one.final_state.size() * sizeof(Complex)) == 0);
  CHECK(std::memcmp(&one.ground_probability, &two.ground_probability, sizeof(double)) == 0);
  CHECK(one.stats.steps == two.stats.steps);
  CHECK(one.stats.steps > 0);
}

namespace {
// Lowers the split propagator's threading threshold for one scope.
struct ParallelThreshold {
  std::size_t saved = SplitExponentials::parallel_threshold();
  explicit ParallelThreshold(std::size_t dim) { SplitExponentials::set_parallel_threshold(dim); }
  ~ParallelThreshold() { SplitExponentials::set_parallel_threshold(saved); }
};

SplitState random_split_state(std::size_t dim, unsigned seed) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> g;
  SplitState x(dim);
  for (std::size_t k = 0; k < dim; ++k) {
    x.re.data()[k] = g(rng);
    x.im.data()[k] = g(rng);
  }
  return x;
}

bool same_bits(double a, double b) { return std::memcmp(&a, &b, sizeof a) == 0; }
}  // namespace

TEST_CASE("split-state sums have the same bits with 1 and 2 threads") {
  // An OpenMP reduction adds in an order set by the thread count; these sums
  // steer the step control, so they must not depend on it.
  const ParallelThreshold lowered(std::size_t{1} << 10);
  const std::size_t dim = std::size_t{1} << 15;
  const SplitState a = random_split_state(dim, 11), b = random_split_state(dim, 12);
  omp_set_num_threads(1);
  const double d1 = a.distance(b), p1 = a.probability_distance(b), f1 = a.distance_up_to_phase(b);
  omp_set_num_threads(2);
  const double d2 = a.distance(b), p2 = a.probability_distance(b), f2 = a.distance_up_to_phase(b);
  CHECK(same_bits(d1, d2));
  CHECK(same_bits(p1, p2));
  CHECK(same_bits(f1, f2));
  CHECK(d1 > 0.0);
  CHECK(p1 > 0.0);
  // The sums are sums: the distance of a state from itself is zero, and the
  // triangle inequality holds (common practice: a cheap check that the blocks
  // cover every amplitude exactly once).
  CHECK(a.distance(a) == 0.0);
  const SplitState c = random_split_state(dim, 13);
  CHECK(a.distance(c) <= a.distance(b) + b.distance(c));
}

TEST_CASE("a 13-qubit split-operator anneal sharing its state among threads is bit-identical with 1 and 2 threads") {
  const ParallelThreshold lowered(std::size_t{1} << 10);
  IsingProblem p(13);
  std::mt19937_64 rng(7);
  std::uniform_int_distribution<int> pm(0, 1);
  for (int i = 0; i < 13; ++i)
    for (int j = i + 1; j < 13; ++j)
      if ((i + j) % 3 == 0) p.couplings.push_back({i, j, pm(rng) ? 1.0 : -1.0});
  p.h[0] = 0.2;
  const TransverseIsingHamiltonian H(p);
  const GroundManifold gm = find_ground_manifold(p, H.diagonal());
  Schedule sch;
  const AnnealPath path = sch.path_for(5.0);
  SimulationOptions o;
  o.top_outcomes = 4;
  o.propagator = "split4";
  omp_set_num_threads(1);
  const AnnealResult one = simulate_anneal(H, gm, sch.scales, path, initial_state(H, sch, path), o);
  omp_set_num_threads(2);
  const AnnealResult two = simulate_anneal(H, gm, sch.scales, path, initial_state(H, sch, path), o);
  REQUIRE(one.final_state.size() == (std::size_t{1} << 13));
  CHECK(std::memcmp(one.final_state.data(), two.final_state.data(), one.final_state.size() * sizeof(Complex)) == 0);
  CHECK(same_bits(one.ground_probability, two.ground_probability));
  CHECK(same_bits(one.stats.error_estimate, two.stats.error_estimate));
  CHECK(one.stats.steps == two.stats.steps);
  CHECK(one.ground_probability > 0.0);
}

// Small products called from inside another parallel region (a threaded study:
// each thread applies its own H to its own vector) must be each thread's whole
// product. An orphaned `omp for` in the small-vector path once bound to the
// caller's team and split one thread's product among all threads (wrong sums,
// then a deadlock at the mismatched barriers).
TEST_CASE("small H products inside an outer parallel region are each thread's own") {
  IsingProblem p(8);
  for (int i = 0; i < 8; ++i) {
    p.h[static_cast<std::size_t>(i)] = 0.15 * (i % 3) - 0.1;
    p.couplings.push_back({std::min(i, (i + 1) % 8), std::max(i, (i + 1) % 8), -1.0 + 0.1 * i});
  }
  const TransverseIsingHamiltonian H(p);
  const std::size_t dim = std::size_t{1} << 8;
  std::vector<std::vector<double>> x(4, std::vector<double>(dim)), serial(4, std::vector<double>(dim)),
      threaded(4, std::vector<double>(dim, -7.0));
  std::mt19937 rng(5);
  std::normal_distribution<double> normal;
  for (auto& v : x)
    for (double& e : v) e = normal(rng);
  for (int t = 0; t < 4; ++t) H.apply(1.3, 0.7, x[t].data(), serial[t].data());
#pragma omp parallel num_threads(4)
  {
    const int t = omp_get_thread_num();
    for (int rep = 0; rep < 50; ++rep) H.apply(1.3, 0.7, x[t].data(), threaded[t].data());
  }
  for (int t = 0; t < 4; ++t) CHECK(std::memcmp(serial[t].data(), threaded[t].data(), dim * sizeof(double)) == 0);
}
