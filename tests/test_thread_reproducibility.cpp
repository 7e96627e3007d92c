// Same inputs, same bits: a 16-qubit anneal (large enough that the Hamiltonian
// kernel runs its OpenMP loops, dim >= 2^16) gives a bit-identical final state
// with 1 and with 2 threads. The kernel's loops write disjoint elements and
// have no reductions, so nothing may depend on the thread count.
#include <doctest/doctest.h>

#include <cstring>

#include <omp.h>

#include "dynamics/anneal_simulation.hpp"
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
