// Closed-form one-qubit facts and their many-body consequences.
#include <doctest/doctest.h>

#include <cmath>

#include "dynamics/anneal_simulation.hpp"
#include "problem/classical_spectrum.hpp"
#include "spectrum/lowest_levels.hpp"

using namespace gapwise;

namespace {
double anneal_p(const IsingProblem& p, double duration_ns, double a_max = 5.0, double b_max = 5.0) {
  const TransverseIsingHamiltonian h(p);
  const GroundManifold gm = find_ground_manifold(p, h.diagonal());
  Schedule sch;
  sch.scales = EnergyScales::linear(a_max, b_max);
  const AnnealPath path = sch.shape.scaled_to(duration_ns);
  SimulationOptions opt;
  opt.propagation.tolerance = 1e-8;
  return simulate_anneal(h, gm, sch.scales, path, initial_state(h, sch, path), opt).ground_probability;
}
}  // namespace

TEST_CASE("One-qubit gap is sqrt(A^2 + (B h)^2) (exact diagonalization of a 2x2 matrix)") {
  // H = -(A/2) X + (B h/2) Z has levels +-(1/2) sqrt(A^2 + (B h)^2): textbook
  // two-level algebra (e.g. Cohen-Tannoudji, Diu & Laloe, Quantum Mechanics, 1977, ch. IV).
  for (double hval : {-1.3, -0.2, 0.0, 0.7}) {
    IsingProblem p(1);
    p.h = {hval};
    const TransverseIsingHamiltonian h(p);
    for (auto [a, b] : {std::pair{5.0, 0.0}, std::pair{2.0, 3.0}, std::pair{0.0, 4.0}, std::pair{0.3, 9.0}}) {
      const Levels lv = lowest_levels(h, a, b, 2, false, EigenMethod::Dense);
      const double expect = std::sqrt(a * a + b * b * hval * hval);
      CHECK(lv.energies_ghz[0] == doctest::Approx(-0.5 * expect).epsilon(1e-12));
      CHECK(lv.energies_ghz[1] - lv.energies_ghz[0] == doctest::Approx(expect).epsilon(1e-12));
    }
  }
}

TEST_CASE("Non-interacting qubits: the n-qubit ground-state probability is the product of one-qubit ones") {
  // Without couplings H is a sum of commuting single-qubit terms, so the
  // evolution factorizes (common practice; the conventions' worked check).
  const std::vector<double> fields = {0.3, -0.5, 0.8, -0.15};
  IsingProblem all(static_cast<int>(fields.size()));
  all.h = fields;
  for (double duration : {2.0, 8.0}) {
    double product = 1.0;
    for (double f : fields) {
      IsingProblem one(1);
      one.h = {f};
      product *= anneal_p(one, duration);
    }
    const double p_all = anneal_p(all, duration);
    INFO("duration " << duration << " ns: product " << product << ", many-body " << p_all);
    CHECK(std::abs(p_all - product) < 1e-6);
    CHECK(p_all < 0.999);  // the durations are short enough that the check is not trivial
  }
}

TEST_CASE("h = 0 on one qubit: both outcomes equally likely (common practice: symmetry)") {
  IsingProblem p(1);
  const TransverseIsingHamiltonian h(p);
  const GroundManifold gm = find_ground_manifold(p, h.diagonal());
  CHECK(gm.degeneracy() == 2);
  Schedule sch;
  const AnnealPath path = sch.shape.scaled_to(3.0);
  const AnnealResult r = simulate_anneal(h, gm, sch.scales, path, initial_state(h, sch, path), {});
  const auto probs = probabilities(r.final_state);
  CHECK(probs[0] == doctest::Approx(0.5).epsilon(1e-9));
  CHECK(probs[1] == doctest::Approx(0.5).epsilon(1e-9));
  CHECK(r.ground_probability == doctest::Approx(1.0).epsilon(1e-6));  // the norm, to the tolerance
}

TEST_CASE("A coupler with J < 0 lowers the aligned states relative to the anti-aligned ones (common practice)") {
  IsingProblem p(2);
  p.couplings = {{0, 1, -0.7}};
  // bits 00 and 11 aligned, 01 and 10 anti-aligned
  CHECK(p.energy(0b00) == doctest::Approx(-0.7));
  CHECK(p.energy(0b11) == doctest::Approx(-0.7));
  CHECK(p.energy(0b01) == doctest::Approx(0.7));
  CHECK(p.energy(0b10) == doctest::Approx(0.7));
  const GroundManifold gm = find_ground_manifold(p);
  CHECK(gm.states == std::vector<BasisIndex>{0b00, 0b11});
  // h > 0 favours s = -1 (bit 1), per the conventions
  IsingProblem q(1);
  q.h = {0.4};
  CHECK(find_ground_manifold(q).states == std::vector<BasisIndex>{1});
}
