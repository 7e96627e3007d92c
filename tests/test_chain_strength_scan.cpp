// The chain-strength scan and the price of embedding.
//
// Sources of the checks:
//  - a single logical spin on a two-qubit chain: its minimum gap along a
//    linear schedule must approach that of one spin with the reduced transverse
//    scale A_eff(s) = A(s)^2 / (B(s) J_chain) from second-order degenerate
//    perturbation theory (Schrieffer-Wolff; Bravyi, DiVincenzo and Loss, Ann.
//    Phys. 326, 2793 (2011), cited from memory; derivation in the method notes)
//    and single-qubit gap sqrt(A^2 + (B h)^2) (physics conventions' worked values),
//    with the relative difference falling as 1 / J_chain (reason at the check);
//  - minor embedding (Choi, Quantum Inf. Process. 7, 193 (2008)): above the
//    chain bound the physical ground states are intact images of the logical
//    ones, so p_logical >= p_physical; an embedding with one-qubit chains is the
//    logical problem itself, so its price is exactly 1 (a consequence of the
//    definition, no further source);
//  - p_logical is computed twice, by decoding the final state and by the
//    duration search on the logical success set: the two must agree.
#include <doctest/doctest.h>

#include <cmath>
#include <fstream>

#include "io/embedding_file.hpp"
#include "io/problem_file.hpp"
#include "studies/chain_strength_scan.hpp"
#include "test_support.hpp"

using namespace gapwise;

namespace {

Schedule linear_schedule(double duration_ns) {
  Schedule s;
  s.scales = EnergyScales::linear(5.0, 5.0);
  s.duration_ns = duration_ns;
  return s;
}

ChainScanOptions quick_options(std::vector<ChainStrength> strengths) {
  ChainScanOptions o;
  o.strengths = std::move(strengths);
  o.duration_ns = 4.0;
  o.grid_ns = {1.0, 4.0, 16.0};
  o.needed.relative_width = 0.05;
  o.gap.coarse_points = 41;
  o.gap.s_tolerance = 1e-6;
  o.threads = 1;
  return o;
}

IsingProblem triangle() {
  return parse_problem_text("qubits = 3\nfields = [0.3, -0.1, 0.05]\n"
                            "couplings = [[0, 1, 1.0], [1, 2, 1.0], [0, 2, 1.0]]\n",
                            "tri.toml")
      .ising;
}

}  // namespace

TEST_CASE("what a duration search established, and the ratio of two such answers") {
  using K = NeededDuration::Kind;
  DurationNeeded reached;
  reached.status = NeededStatus::Reached;
  reached.first = {10.0, 10.4, 0.98, 0.991, 3, false};
  const NeededDuration b = NeededDuration::from(reached);
  CHECK(b.kind == K::Bracketed);
  CHECK(b.ns == 10.4);
  CHECK(b.lower_ns == 10.0);
  CHECK(b.describe() == "10.4 ns");
  DurationNeeded shortest;
  shortest.status = NeededStatus::ReachedAtShortest;
  shortest.first.upper_ns = 1.0;
  DurationNeeded never;
  never.status = NeededStatus::NotReached;
  never.first.lower_ns = 1000.0;
  const NeededDuration at_most = NeededDuration::from(shortest), more = NeededDuration::from(never);
  CHECK(at_most.describe() == "<= 1 ns");
  CHECK(more.describe() == "> 1000 ns");
  // Every combination: a lower bound in the numerator or an upper bound in the
  // denominator can only raise the true ratio, and the mirror cases lower it.
  CHECK(needed_ratio(b, b).relation == "=");
  CHECK(needed_ratio(b, b).ratio == 1.0);
  CHECK(needed_ratio(more, b).relation == ">");
  CHECK(needed_ratio(b, at_most).relation == ">=");
  CHECK(needed_ratio(at_most, b).relation == "<=");
  CHECK(needed_ratio(b, more).relation == "<");
  CHECK(needed_ratio(at_most, more).relation == "<");
  CHECK(needed_ratio(more, at_most).relation == ">");
  CHECK(needed_ratio(more, more).relation == "?");
  CHECK(needed_ratio(at_most, at_most).relation == "?");
  CHECK(needed_ratio(more, b).ratio == doctest::Approx(1000.0 / 10.4));
}

TEST_CASE("one-qubit chains are the logical problem itself: same gap, same p, price exactly 1") {
  const IsingProblem logical = triangle();
  const Embedding e = parse_embedding_text("format = \"gapwise-embedding\"\nchains = [[0], [1], [2]]\n"
                                           "couplers = [[0, 1], [1, 2], [0, 2]]\n",
                                           "identity.toml");
  const ChainScanResult r =
      scan_chain_strength(logical, e, linear_schedule(4.0), quick_options({ChainStrength::relative_to_largest(2.0)}));
  REQUIRE(r.points.size() == 1);
  const ChainScanPoint& p = r.points[0];
  CHECK(p.m.gap.gap_ghz == doctest::Approx(r.logical_m.gap.gap_ghz).epsilon(1e-12));
  CHECK(p.m.p_success == doctest::Approx(r.logical_m.p_success).epsilon(1e-12));
  CHECK(p.m.p_physical == doctest::Approx(r.logical_m.p_success).epsilon(1e-12));
  CHECK(p.m.decoded.mean_broken_fraction == 0.0);
  CHECK(p.m.needed.kind == r.logical_m.needed.kind);
  CHECK(r.price.ratio == doctest::Approx(1.0).epsilon(1e-12));
}

TEST_CASE("a two-qubit chain's minimum gap approaches the one-spin model with the reduced transverse scale") {
  // Logical: one spin with field h = 1; physical: the chain [0, 1].
  IsingProblem logical(1);
  logical.h = {1.0};
  Embedding e;
  e.chains = {{0, 1}};
  e.physical_qubits = 2;
  const Schedule schedule = linear_schedule(4.0);
  ChainScanOptions o =
      quick_options({ChainStrength::absolute(8.0), ChainStrength::absolute(16.0), ChainStrength::absolute(32.0)});
  o.grid_ns = {1.0};  // only the gaps matter here
  const ChainScanResult r = scan_chain_strength(logical, e, schedule, o);
  REQUIRE(r.points.size() == 3);
  double previous = 1.0;
  for (const auto& p : r.points) {
    // One-spin model: gap(s) = sqrt(A_eff(s)^2 + (B(s) h)^2), A_eff = A^2/(B J_chain);
    // its minimum found on a fine grid of s (it is smooth and has one minimum).
    double model = 1e300;
    for (int k = 1; k < 200000; ++k) {
      const double s = k / 200000.0, a = schedule.scales.a_ghz(s), b = schedule.scales.b_ghz(s);
      model = std::min(model, std::hypot(a * a / (b * p.chain_coupling), b * logical.h[0]));
    }
    const double rel = std::abs(p.m.gap.gap_ghz - model) / model;
    MESSAGE("J_chain " << p.chain_coupling << ": minimum gap " << p.m.gap.gap_ghz << " GHz at s* = " << p.m.gap.s_star
                       << ", one-spin model " << model << " GHz, relative difference " << rel);
    CHECK(rel < previous);
    // The model's minimum sits where A_eff ~ B h, i.e. B ~ A / sqrt(J_chain):
    // there the expansion parameter A / (B J_chain) is ~ J_chain^(-1/2), so the
    // relative error (of order its square) must fall as 1 / J_chain.
    CHECK(rel * p.chain_coupling > 0.3);
    CHECK(rel * p.chain_coupling < 0.8);
    previous = rel;
  }
  CHECK(previous < 0.02);
}

TEST_CASE("p_logical by decoding equals p_logical from the success set; above the bound p_logical >= p_physical") {
  const IsingProblem logical = triangle();
  const Embedding e = parse_embedding_text("format = \"gapwise-embedding\"\nchains = [[0, 1], [2, 3], [4, 5]]\n"
                                           "couplers = [[0, 1], [1, 2], [2, 3], [3, 4], [4, 5], [5, 0], [0, 3]]\n",
                                           "ring.toml");
  ChainScanOptions o = quick_options({ChainStrength::relative_to_largest(0.5), ChainStrength::relative_to_largest(3.0)});
  o.term_limit = 1.0;
  const ChainScanResult r = scan_chain_strength(logical, e, linear_schedule(4.0), o);
  REQUIRE(r.points.size() == 2);
  CHECK(r.chain_bound == doctest::Approx(2.3));
  CHECK_FALSE(r.points[0].above_bound);
  CHECK(r.points[1].above_bound);
  CHECK(r.points[1].scale == doctest::Approx(1.0 / 3.0));
  for (const auto& p : r.points) {
    REQUIRE(p.m.search.points.count(4.0) == 1);
    CHECK(p.m.search.points.at(4.0) == doctest::Approx(p.m.p_success).epsilon(1e-10));
    CHECK(p.m.decoded.mean_broken_fraction >= 0.0);
    CHECK(p.m.decoded.any_break_probability <= 1.0);
  }
  CHECK(r.points[1].m.p_success >= r.points[1].m.p_physical - 1e-12);
  // Above the bound the ground states are intact (Choi 2008; method notes).
  CHECK(r.points[1].ground_intact);
  CHECK(r.points[1].ground_decodes);
  // At half the largest term the frustrated ring's ground state breaks a chain
  // (the cheapest term to violate is then a chain coupler), so that strength
  // is not eligible as best even if its decoded p is high.
  CHECK_FALSE(r.points[0].ground_intact);
  CHECK(r.best == 1);
  CHECK(r.best_ground_intact);
  CHECK(r.best < r.points.size());
  CHECK(r.price.ratio > 0.0);
}
