// Where the probability goes: ground-state shares, imbalance, sinks.
#include <doctest/doctest.h>

#include <algorithm>
#include <bit>
#include <cmath>

#include "dynamics/anneal_simulation.hpp"
#include "studies/outcome_analysis.hpp"

using namespace gapwise;

namespace {

// Three qubits, h = (-1, -1, 0), J_01 = J_12 = +1. The ground manifold
// (E = -2) is {010, 001, 101} (bits q0 q1 q2 as basis indices 2, 4, 5). 001 and
// 101 differ by a zero-energy flip of qubit 0, 010 has no zero-energy
// neighbour. In the transverse field the pair is mixed in first order (its
// symmetric combination drops by A/2) while 010 is lowered only in second
// order, so the adiabatic ground state ends on the pair and 010 is suppressed:
// the mechanism of unfair sampling (Matsuda, Nishimori & Katzgraber, New J.
// Phys. 11, 073021 (2009)). Instance built for this test.
IsingProblem unfair_triple() {
  IsingProblem p(3);
  p.h = {-1.0, -1.0, 0.0};
  p.couplings = {{0, 1, 1.0}, {1, 2, 1.0}};
  return p;
}

AnnealResult anneal(const TransverseIsingHamiltonian& H, const GroundManifold& gm, double duration_ns) {
  Schedule sch;  // linear 5 GHz scales, forward path
  const AnnealPath path = sch.path_for(duration_ns);
  SimulationOptions opt;
  opt.propagation.tolerance = 1e-6;
  return simulate_anneal(H, gm, sch.scales, path, initial_state(H, sch, path), opt);
}

}  // namespace

TEST_CASE("a degenerate manifold sampled unevenly: the reported shares are the simulated probabilities") {
  const IsingProblem p = unfair_triple();
  const TransverseIsingHamiltonian H(p);
  const GroundManifold gm = find_ground_manifold(p, H.diagonal());
  REQUIRE(gm.states == std::vector<BasisIndex>{2, 4, 5});
  const AnnealResult r = anneal(H, gm, 100.0);
  const std::vector<double> prob = probabilities(r.final_state);
  const OutcomeAnalysis oa = analyze_outcome(H, gm, prob);

  CHECK(oa.ground_probability == doctest::Approx(r.ground_probability).epsilon(1e-14));
  REQUIRE(oa.ground.size() == 3);
  double lo = 1, hi = 0;
  for (const auto& g : oa.ground) {
    CHECK(g.probability == prob[g.state]);
    CHECK(g.share == doctest::Approx(prob[g.state] / r.ground_probability).epsilon(1e-14));
    lo = std::min(lo, g.probability);
    hi = std::max(hi, g.probability);
  }
  CHECK(oa.balance.max_over_min == doctest::Approx(hi / lo).epsilon(1e-12));
  CHECK(oa.balance.spread == doctest::Approx((hi - lo) / (r.ground_probability / 3)).epsilon(1e-12));
  double tv = 0;
  for (const auto& g : oa.ground) tv += 0.5 * std::abs(prob[g.state] / r.ground_probability - 1.0 / 3);
  CHECK(oa.balance.distance_from_fair == doctest::Approx(tv).epsilon(1e-12));

  // The physics: a slow anneal shares p about evenly between 001 and 101 and
  // starves 010 (first- against second-order lowering, see above).
  CHECK(r.ground_probability > 0.9);
  CHECK(oa.ground[0].share < 0.05);
  CHECK(oa.ground[1].share == doctest::Approx(0.5).epsilon(0.1));
  CHECK(oa.ground[2].share == doctest::Approx(0.5).epsilon(0.1));
  CHECK(oa.balance.max_over_min > 10);
  CHECK(oa.balance.distance_from_fair > 0.25);
}

TEST_CASE("sinks: excited levels and states with their Hamming distance to the ground manifold") {
  // A hand-made distribution over 3 qubits on the frustrated triangle
  // J = +1 on all pairs, h = 0: ground manifold = the six states with two
  // spins alike (E = -1), excited = 000 and 111 (E = +3), each one flip from a
  // ground state (counting by hand; common practice, no source).
  IsingProblem p(3);
  p.couplings = {{0, 1, 1.0}, {1, 2, 1.0}, {0, 2, 1.0}};
  const TransverseIsingHamiltonian H(p);
  const GroundManifold gm = find_ground_manifold(p, H.diagonal());
  REQUIRE(gm.degeneracy() == 6);
  std::vector<double> prob(8, 0.0);
  prob[0] = 0.3;
  prob[7] = 0.1;
  prob[1] = 0.6;
  const OutcomeAnalysis oa = analyze_outcome(H, gm, prob);
  CHECK(oa.ground_probability == doctest::Approx(0.6));
  REQUIRE(oa.sink_levels.size() == 1);
  CHECK(oa.sink_levels[0].energy == doctest::Approx(3.0));
  CHECK(oa.sink_levels[0].states == 2);
  CHECK(oa.sink_levels[0].probability == doctest::Approx(0.4));
  CHECK(oa.sink_levels[0].min_hamming_to_ground == 1);
  REQUIRE(oa.sink_states.size() == 2);
  CHECK(oa.sink_states[0].state == 0);
  CHECK(oa.sink_states[1].state == 7);
  CHECK(oa.sink_states[0].hamming_to_ground == 1);
  // Only one of six ground states is populated: max/min is infinite, distance
  // from fair = 1 - 1/6.
  CHECK(std::isinf(oa.balance.max_over_min));
  CHECK(oa.balance.distance_from_fair == doctest::Approx(5.0 / 6));
  // Hamming distance against brute force over the manifold.
  for (BasisIndex b = 0; b < 8; ++b) {
    int best = 99;
    for (BasisIndex g : gm.states) best = std::min(best, std::popcount(b ^ g));
    CHECK(hamming_to_ground(b, gm) == best);
  }
}
