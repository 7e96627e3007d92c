// The classical ground-state tolerance follows the energy differences of the
// problem, not the size of its largest energy: a problem scaled by 1e-9 keeps
// its ground manifold, and one huge field does not merge the levels that unit
// couplings separate. Checked where the tolerance is used: the ground manifold
// (and so p), the excited levels of the outcome analysis and the control-error
// classification, and `gapwise inspect`.
#include <doctest/doctest.h>

#include <cmath>
#include <fmt/format.h>
#include <set>
#include <string>

#include "hamiltonian/transverse_ising.hpp"
#include "io/problem_file.hpp"
#include "problem/classical_spectrum.hpp"
#include "studies/control_error_ensemble.hpp"
#include "studies/outcome_analysis.hpp"
#include "test_support.hpp"

using namespace gapwise;
using gapwise::testing::run_gapwise;
using gapwise::testing::TempDir;

namespace {

IsingProblem scaled(IsingProblem p, double c) {
  for (double& h : p.h) h *= c;
  for (auto& cp : p.couplings) cp.value *= c;
  p.offset *= c;
  return p;
}

// The triangle sample (invented data): three antiferromagnetic unit couplings
// and small fields; unique ground state 101 (q0 = 1, q1 = 0, q2 = 1), energy
// -1.45 (checked by hand in test_cli_basics.cpp).
IsingProblem triangle() {
  IsingProblem p(3);
  p.h = {0.30, -0.10, 0.05};
  p.couplings = {{0, 1, 1.0}, {1, 2, 1.0}, {0, 2, 1.0}};
  return p;
}

// The garden-beds QUBO sample with its terms multiplied by `c` (a QUBO-derived
// problem with real-valued coefficients; ground state 110, next 101).
IsingProblem garden_beds(double c) {
  const std::string text = fmt::format(
      "format = \"gapwise-problem\"\nformat_version = 1\nkind = \"qubo\"\nqubits = 3\n"
      "terms = [[0, 0, {}], [1, 1, {}], [2, 2, {}], [0, 1, {}], [0, 2, {}], [1, 2, {}]]\noffset = {}\n",
      -3.6 * c, -3.5 * c, -3.3 * c, 2.0 * c, 2.0 * c, 2.0 * c, 4.0 * c);
  return parse_problem_text(text, "garden-beds-scaled.toml").ising;
}

// A problem with one field of 1e9 beside unit couplings (invented). Qubit 0
// carries h0 = 1e9 > 0, which pins it to spin -1 (bit 1); qubits 1-3 form an
// antiferromagnetic unit triangle, frustrated: 6 of its 8 states reach the
// coupling energy -1. The coupler J01 = 0.5 adds 0.5 s0 s1 = -0.5 s1, so the 3
// frustrated states with s1 = +1 are the ground manifold at -1e9 - 1.5, and the
// 3 with s1 = -1 lie 1 above it. Derived by hand from E = sum h s + sum J s s.
IsingProblem huge_field() {
  IsingProblem p(4);
  p.h = {1e9, 0.0, 0.0, 0.0};
  p.couplings = {{1, 2, 1.0}, {2, 3, 1.0}, {1, 3, 1.0}, {0, 1, 0.5}};
  return p;
}

std::set<BasisIndex> states_of(const GroundManifold& g) { return {g.states.begin(), g.states.end()}; }

}  // namespace

TEST_CASE("scaling a problem keeps its ground manifold (the argmin of E is invariant under E -> c E, c > 0)") {
  struct Case { const char* what; IsingProblem base; };
  const Case cases[] = {{"triangle (fields, unit couplings)", triangle()},
                        {"garden beds (QUBO-derived, real-valued)", garden_beds(1.0)}};
  for (const Case& c : cases) {
    INFO(c.what);
    const GroundManifold ref = find_ground_manifold(c.base);
    REQUIRE(ref.degeneracy() == 1);
    for (double factor : {1e-9, 1e-13, 1e-5, 1e8}) {
      INFO("factor " << factor);
      const GroundManifold g = find_ground_manifold(scaled(c.base, factor));
      CHECK(states_of(g) == states_of(ref));
      CHECK(g.tolerance > 0.0);
      CHECK(g.energy == doctest::Approx(ref.energy * factor).epsilon(1e-12));
      CHECK(g.first_excited_energy == doctest::Approx(ref.first_excited_energy * factor).epsilon(1e-12));
    }
  }
  // The QUBO written at 1e-9 scale directly (not scaled after conversion) too.
  CHECK(states_of(find_ground_manifold(garden_beds(1e-9))) == states_of(find_ground_manifold(garden_beds(1.0))));
  CHECK(find_ground_manifold(garden_beds(1.0)).states == std::vector<BasisIndex>{0b011});  // bits q0 q1 = 1: "110"
}

TEST_CASE("one field of 1e9 beside unit couplings: the ground manifold found by hand") {
  const GroundManifold g = find_ground_manifold(huge_field());
  CHECK(g.degeneracy() == 3);
  for (BasisIndex b : g.states) {
    CHECK((b & 1U) == 1U);          // qubit 0 at spin -1
    CHECK(((b >> 1) & 1U) == 0U);   // qubit 1 at spin +1
  }
  CHECK(g.first_excited_energy - g.energy == doctest::Approx(1.0));
  // Exact degeneracies still merge: the triangle's frustrated states are exactly
  // degenerate in pairs under the field-free symmetry, computed through a 1e9 term.
  CHECK(g.tolerance < 1e-3);
}

TEST_CASE("the outcome analysis groups excited levels with the same tolerance at any scale") {
  // A uniform final distribution: every level's probability is its state count / 8.
  for (double factor : {1.0, 1e-9, 1e-13}) {
    INFO("factor " << factor);
    const TransverseIsingHamiltonian H(scaled(triangle(), factor));
    const GroundManifold g = find_ground_manifold(H.problem(), H.diagonal());
    const OutcomeAnalysis oa = analyze_outcome(H, g, std::vector<double>(8, 0.125), OutcomeOptions{});
    CHECK(oa.ground_probability == doctest::Approx(0.125));
    // The triangle's 7 excited states have 7 distinct energies, by hand from
    // E = sum h s + sum J s s: 3.25 and 2.75 (aligned), -0.55, -0.65, -0.85,
    // -1.15, -1.35 (frustrated), times the factor.
    std::size_t states = 0;
    for (const SinkLevel& lv : oa.sink_levels) states += lv.states;
    CHECK(states == 7);
    CHECK(oa.sink_levels.size() == 7);
  }
}

TEST_CASE("control errors: an unchanged problem at 1e-9 scale keeps its ground state") {
  const IsingProblem small = scaled(triangle(), 1e-9);
  const GroundManifold intended = find_ground_manifold(small);
  ControlSample sample;
  classify_ground_change(small, intended, sample);
  CHECK(sample.classical_margin > 0.0);
  CHECK_FALSE(sample.ground_changed);
  ControlSample big;
  classify_ground_change(huge_field(), find_ground_manifold(huge_field()), big);
  CHECK(big.classical_margin == doctest::Approx(1.0));
  CHECK_FALSE(big.ground_changed);
}

TEST_CASE("gapwise inspect reports the right degeneracy for tiny and huge coefficients") {
  TempDir dir;
  const auto small = dir.write("small.toml",
                               "qubits = 3\nfields = [0.30e-9, -0.10e-9, 0.05e-9]\n"
                               "couplings = [[0, 1, 1.0e-9], [1, 2, 1.0e-9], [0, 2, 1.0e-9]]\n");
  const auto huge = dir.write("huge.toml",
                              "qubits = 4\nfields = [1e9, 0.0, 0.0, 0.0]\n"
                              "couplings = [[1, 2, 1.0], [2, 3, 1.0], [1, 3, 1.0], [0, 1, 0.5]]\n");
  auto r = run_gapwise("inspect '" + small.string() + "' --json", dir);
  REQUIRE(r.exit_code == 0);
  CHECK(r.out.find("\"ground_degeneracy\" : 1,") != std::string::npos);
  r = run_gapwise("inspect '" + huge.string() + "' --json", dir);
  REQUIRE(r.exit_code == 0);
  CHECK(r.out.find("\"ground_degeneracy\" : 3,") != std::string::npos);
  // The text shows energies to 15 digits: the half units beside 1e9 are not rounded away.
  r = run_gapwise("inspect '" + huge.string() + "'", dir);
  REQUIRE(r.exit_code == 0);
  CHECK(r.out.find("ground       energy -1000000001.5, degeneracy 3") != std::string::npos);
  CHECK(r.out.find("next level   energy -1000000000.5 (classical gap 1)") != std::string::npos);
}
