// Perturbative crossings: the ground level's overlap with the classical ground manifold.
#include <doctest/doctest.h>

#include <cmath>

#include <Eigen/Dense>

#include "perturbative_crossing_instance.hpp"
#include "studies/ground_overlap_track.hpp"

using namespace gapwise;
using gapwise::testing::core_and_leaves;

namespace {

// Independent reference: H built element by element as a dense matrix from the
// definition H = -(A/2) sum X_i + (B/2) E(z) (no shared kernel), ground-state
// weight on the ground manifold from Eigen's dense solver.
double reference_ground_weight(const IsingProblem& p, double a, double b, BasisIndex ground_state) {
  const int n = p.qubits;
  const Eigen::Index dim = Eigen::Index{1} << n;
  Eigen::MatrixXd m = Eigen::MatrixXd::Zero(dim, dim);
  for (Eigen::Index x = 0; x < dim; ++x) {
    m(x, x) = 0.5 * b * p.energy(static_cast<BasisIndex>(x));
    for (int i = 0; i < n; ++i) m(x ^ (Eigen::Index{1} << i), x) += -0.5 * a;
  }
  Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> es(m);
  return es.eigenvectors()(static_cast<Eigen::Index>(ground_state), 0) *
         es.eigenvectors()(static_cast<Eigen::Index>(ground_state), 0);
}

}  // namespace

TEST_CASE("a perturbative crossing is found where the ground level's overlap switches") {
  const int k = 6;
  const double delta = 1.0;
  const IsingProblem p = core_and_leaves(k, delta);
  const TransverseIsingHamiltonian H(p);
  const GroundManifold gm = find_ground_manifold(p, H.diagonal());
  REQUIRE(gm.degeneracy() == 1);
  REQUIRE(gm.energy == doctest::Approx(-k - delta / 2));
  const EnergyScales scales = EnergyScales::linear(5.0, 5.0);
  OverlapTrackOptions opt;
  opt.grid_points = 101;
  const OverlapTrack tr = track_ground_overlap(H, gm, scales, opt);
  REQUIRE(tr.perturbative_crossings.size() == 1);
  const PerturbativeCrossing& x = tr.perturbative_crossings[0];

  // 1. The switch: bisection on the independent dense reference to 1e-9.
  double lo = x.s_before, hi = x.s_after;
  while (hi - lo > 1e-9) {
    const double mid = 0.5 * (lo + hi);
    (reference_ground_weight(p, 5 * (1 - mid), 5 * mid, gm.states[0]) < 0.5 ? lo : hi) = mid;
  }
  CHECK(x.s_switch == doctest::Approx(0.5 * (lo + hi)).epsilon(1e-6));
  // The grid step is 0.01 and the switch (gap about 0.12 GHz here) is a few
  // grid steps wide: the bracketing points lie on either side of it.
  CHECK(reference_ground_weight(p, 5 * (1 - x.s_before), 5 * x.s_before, gm.states[0]) < 0.25);
  CHECK(reference_ground_weight(p, 5 * (1 - x.s_after), 5 * x.s_after, gm.states[0]) > 0.6);

  // 2. Where the physics puts it. With the core frozen the leaves are exact
  // two-level systems: E_ground(s) = (B/2) h_0 - (k/2) sqrt(A^2 + 4 B^2) and
  // E_free(s) = -(B/2) h_0 - k A/2. Their crossing, B h_0 = (k/2)(sqrt(A^2 + 4B^2) - A),
  // gives A/B = r with r = (4 - c^2)/(2c), c = 2 h_0 / k; s = 1/(1 + r) for
  // linear scales. Neglecting the core's own fluctuations (second order in A
  // over the core's energy cost) moves the true crossing by less than 0.01 here.
  const double c = 2 * p.h[0] / k;
  const double r = (4 - c * c) / (2 * c);
  CHECK(std::abs(x.s_switch - 1 / (1 + r)) < 0.01);

  // 3. What it is: the free manifold, 2^k states, delta above the ground state;
  // before the switch the ground manifold sits in the first excited level.
  CHECK(x.excited_energy == doctest::Approx(gm.energy + delta));
  CHECK(x.excited_degeneracy == (std::size_t{1} << k));
  CHECK(x.hamming_to_ground == 1);
  CHECK(x.mean_hamming_before > 3.0);  // free leaves near |+>: on average k/2 + 1 = 4 flips away
  CHECK(x.excited_weight_before > 0.8);
  CHECK(x.ground_manifold_level_before == 1);
  // The gap at the switch is small against the gap scale elsewhere (about A at s = 0.5).
  CHECK(x.gap_at_switch_ghz < 0.2);
}

TEST_CASE("a single qubit has no perturbative crossing and its ground weight matches the closed form") {
  // One qubit, H = -(A/2) X + (B h/2) Z: the ground state's weight on the
  // classical ground state is (1 + |B h| / sqrt(A^2 + B^2 h^2)) / 2 (two-level
  // eigenvector, textbook), never below 1/2: no switch can happen.
  IsingProblem p(1);
  p.h[0] = 0.4;
  const TransverseIsingHamiltonian H(p);
  const GroundManifold gm = find_ground_manifold(p, H.diagonal());
  const EnergyScales scales = EnergyScales::linear(5.0, 5.0);
  OverlapTrackOptions opt;
  opt.levels = 2;
  opt.grid_points = 21;
  const OverlapTrack tr = track_ground_overlap(H, gm, scales, opt);
  CHECK(tr.perturbative_crossings.empty());
  for (const auto& pt : tr.points) {
    const double a = 5 * (1 - pt.s), b = 5 * pt.s * 0.4;
    const double w = 0.5 * (1 + b / std::sqrt(a * a + b * b));
    CHECK(pt.levels[0].ground_weight == doctest::Approx(w).epsilon(1e-10));
    CHECK(pt.levels[1].ground_weight == doctest::Approx(1 - w).epsilon(1e-9));
  }
}

TEST_CASE("a ferromagnetic chain's ordinary crossing is not reported as a perturbative crossing") {
  // Three qubits, J = -1 chain, a field favouring all spins +1: the ground
  // state goes from |+>^3 (weight 1/8 on every state) straight to the aligned
  // state without ever being dominated by an excited classical level
  // (stoquastic ground state, weights largest on the lowest energies; common
  // practice, no source).
  IsingProblem p(3);
  p.h = {-0.2, -0.2, -0.2};
  p.couplings = {{0, 1, -1.0}, {1, 2, -1.0}};
  const TransverseIsingHamiltonian H(p);
  const GroundManifold gm = find_ground_manifold(p, H.diagonal());
  const OverlapTrack tr = track_ground_overlap(H, gm, EnergyScales::linear(5.0, 5.0));
  CHECK(tr.perturbative_crossings.empty());
  CHECK(tr.points.front().levels[0].ground_weight == doctest::Approx(1.0 / 8));
  CHECK(tr.points.back().levels[0].ground_weight == doctest::Approx(1.0));
}
