// Populations of instantaneous levels (src/dynamics/level_population_observer.hpp).
#include <doctest/doctest.h>

#include <cmath>

#include "dynamics/anneal_simulation.hpp"
#include "dynamics/level_population_observer.hpp"

using namespace gapwise;

TEST_CASE("single qubit: |+> on the ground level of -(A/2)X + (Bh/2)Z has weight (1 + A/Delta)/2") {
  // Closed form for a spin-1/2: the ground state points along (A, 0, -Bh)/Delta,
  // |+> along x, and |<u|v>|^2 = (1 + u.v)/2 for spin states along unit vectors
  // u and v (any quantum-mechanics text, e.g. Sakurai, Modern QM, ch. 1).
  IsingProblem p(1);
  p.h = {0.7};
  const TransverseIsingHamiltonian H(p);
  const QuantumState plus = uniform_superposition(1);
  for (double a : {0.3, 1.0, 4.0}) {
    for (double b : {0.1, 2.0, 5.0}) {
      const double delta = std::hypot(a, b * 0.7);
      const LevelPopulations lp = level_populations(H, a, b, plus, {.levels = 2});
      CHECK(lp.populations[0] == doctest::Approx((1 + a / delta) / 2).epsilon(1e-12));
      CHECK(lp.populations[1] == doctest::Approx((1 - a / delta) / 2).epsilon(1e-12));
      CHECK(lp.energies_ghz[1] - lp.energies_ghz[0] == doctest::Approx(delta).epsilon(1e-12));
    }
  }
}

TEST_CASE("degenerate levels are whole eigenspaces: |000> under the transverse term alone") {
  // Common practice (binomial counting): -(A/2) sum X on 3 qubits has levels
  // -3A/2, -A/2, A/2, 3A/2 with degeneracies 1, 3, 3, 1, and |000> puts weight
  // C(3, k)/8 on the level with k qubits in |->. The split inside a degenerate
  // level depends on the solver's basis; the eigenspace weight does not.
  IsingProblem p(3);
  p.couplings = {{0, 1, -1.0}, {1, 2, 0.5}};
  const TransverseIsingHamiltonian H(p);
  const QuantumState z = basis_state(3, 0);
  const LevelPopulations lp = level_populations(H, 2.0, 0.0, z, {.levels = 4});
  const int deg[4] = {1, 3, 3, 1};
  for (int k = 0; k < 4; ++k) {
    CHECK(lp.degeneracy[static_cast<std::size_t>(k)] == deg[k]);
    CHECK(lp.populations[static_cast<std::size_t>(k)] == doctest::Approx(deg[k] / 8.0).epsilon(1e-12));
    CHECK(lp.energies_ghz[static_cast<std::size_t>(k)] == doctest::Approx(-1.5 * 2.0 + 2.0 * k).epsilon(1e-12));
  }
}

TEST_CASE("Lanczos and dense give the same level populations") {
  // Common practice: two independent eigensolvers must agree.
  IsingProblem p(6);
  p.h = {0.2, -0.1, 0.05, 0.3, -0.25, 0.1};
  p.couplings = {{0, 1, 1.0}, {1, 2, -0.7}, {2, 3, 0.4}, {3, 4, 1.0}, {4, 5, -0.3}, {0, 5, 0.8}};
  const TransverseIsingHamiltonian H(p);
  QuantumState psi(H.dim());
  for (std::size_t k = 0; k < psi.size(); ++k) psi[k] = Complex(std::cos(0.3 * k), std::sin(0.11 * k * k));
  const double nrm = std::sqrt(norm_squared(psi));
  for (auto& c : psi) c /= nrm;
  const auto dense = level_populations(H, 1.3, 2.1, psi, {.levels = 4, .method = EigenMethod::Dense});
  const auto lanczos = level_populations(H, 1.3, 2.1, psi, {.levels = 4, .method = EigenMethod::Lanczos});
  for (std::size_t k = 0; k < 4; ++k) {
    CHECK(lanczos.populations[k] == doctest::Approx(dense.populations[k]).epsilon(1e-8));
    CHECK(lanczos.energies_ghz[k] == doctest::Approx(dense.energies_ghz[k]).epsilon(1e-10));
  }
}

TEST_CASE("a slow anneal stays on the instantaneous ground level (adiabatic theorem)") {
  // Born & Fock, Z. Phys. 51, 165 (1928): a slow enough sweep with a gap keeps
  // the state in the instantaneous ground level. Single qubit, linear scales,
  // gap >= 5 h / sqrt(1 + h^2) GHz; 40 ns is deep in the adiabatic regime. The
  // observer's level-0 weight must also equal the driver's final p at s = 1.
  IsingProblem p(1);
  p.h = {1.0};
  const TransverseIsingHamiltonian H(p);
  const GroundManifold gm = find_ground_manifold(p, H.diagonal());
  Schedule sch;
  const AnnealPath path = sch.shape.scaled_to(40.0);
  LevelPopulationObserver pops(H, {.levels = 2});
  SimulationOptions sim;
  sim.samples_per_piece = 10;
  const AnnealResult r = simulate_anneal(H, gm, sch.scales, path, initial_state(H, sch, path), sim, {&pops});
  REQUIRE(pops.rows().size() == 12);
  for (const auto& row : pops.rows()) CHECK(row.levels.populations[0] > 1 - 1e-3);
  CHECK(pops.rows().back().levels.populations[0] == doctest::Approx(r.ground_probability).epsilon(1e-12));
  const PopulationLeak leak = largest_ground_level_leak(pops.rows());
  CHECK(leak.drop < 1e-3);
  CHECK(leak.final_ground_level == doctest::Approx(r.ground_probability).epsilon(1e-12));
}

TEST_CASE("a sudden sweep leaks population, and the leak is located where it happens") {
  // Sudden limit (Messiah, Quantum Mechanics vol. II, ch. XVII (1962)): a sweep
  // much faster than 1/gap leaves |+> unchanged, so at s = 1 the ground-level
  // weight is |<0|+>|^2 = 1/2 for a single qubit with h != 0.
  IsingProblem p(1);
  p.h = {1.0};
  const TransverseIsingHamiltonian H(p);
  const GroundManifold gm = find_ground_manifold(p, H.diagonal());
  Schedule sch;
  const AnnealPath path = sch.shape.scaled_to(1e-4);
  LevelPopulationObserver pops(H, {.levels = 2});
  SimulationOptions sim;
  sim.samples_per_piece = 9;
  simulate_anneal(H, gm, sch.scales, path, initial_state(H, sch, path), sim, {&pops});
  const PopulationLeak leak = largest_ground_level_leak(pops.rows());
  CHECK(leak.final_ground_level == doctest::Approx(0.5).epsilon(1e-3));
  // The state stays |+>, whose level-0 weight is (1 + A/Delta)/2 in closed form
  // (first test above): the step with the largest drop is found from that.
  auto w0 = [](double s) { return 0.5 * (1 + (1 - s) / std::hypot(1 - s, s)); };
  double best = 0, s_best = -1;
  for (int k = 0; k < 10; ++k)
    if (w0(0.1 * k) - w0(0.1 * (k + 1)) > best) { best = w0(0.1 * k) - w0(0.1 * (k + 1)); s_best = 0.1 * k; }
  CHECK(leak.s_from == doctest::Approx(s_best));
  CHECK(leak.s_to == doctest::Approx(s_best + 0.1));
  CHECK(leak.drop == doctest::Approx(best).epsilon(1e-3));
  CHECK(leak.drop > 0.05);
}

TEST_CASE("even-sector populations equal the full-space ones for a state in that sector") {
  // Common practice: with no fields the global spin flip commutes with H, so the
  // levels of a state in the even sector are the even-sector levels; the odd
  // levels carry no weight and the even ones carry all of it.
  IsingProblem p(4);
  p.couplings = {{0, 1, 1.0}, {1, 2, -1.0}, {2, 3, 1.0}, {0, 3, 1.0}, {0, 2, 0.5}};
  const TransverseIsingHamiltonian H(p);
  const GroundManifold gm = find_ground_manifold(p, H.diagonal());
  const Schedule sch;
  const AnnealResult r = simulate_anneal(H, gm, sch.scales, AnnealPath({{0, 0}, {1.5, 0.6}}), uniform_superposition(4), {});
  const auto full = level_populations(H, 2.0, 3.0, r.final_state, {.levels = 16});
  const auto even = level_populations(H, 2.0, 3.0, r.final_state, {.levels = 3, .sector = SpinFlipSector::Even});
  double total_even = 0, total_full = 0;
  for (std::size_t k = 0; k < 16; ++k)
    if (!std::isnan(full.populations[k])) total_full += full.populations[k];
  CHECK(total_full == doctest::Approx(norm_squared(r.final_state)).epsilon(1e-12));  // completeness
  // Each even level appears among the full-space levels with the same energy and weight.
  for (std::size_t k = 0; k < 3; ++k) {
    total_even += even.populations[k];
    bool found = false;
    for (std::size_t j = 0; j < 16; ++j)
      if (std::abs(full.energies_ghz[j] - even.energies_ghz[k]) < 1e-9) {
        found = true;
        CHECK(full.populations[j] == doctest::Approx(even.populations[k]).epsilon(1e-10));
      }
    CHECK(found);
  }
  CHECK(total_even > 0.5);
}

TEST_CASE("highly degenerate levels are resolved: 8 qubits under the transverse term alone") {
  // Common practice (binomial counting): -(A/2) sum X on 8 qubits has levels of
  // degeneracy C(8, k) = 1, 8, 28, 56; |0...0> weighs C(8, k)/256 on each.
  IsingProblem p(8);
  p.couplings = {{0, 1, -1.0}};
  const TransverseIsingHamiltonian H(p);
  const auto lp = level_populations(H, 5.0, 0.0, basis_state(8, 0), {.levels = 4});
  const int deg[4] = {1, 8, 28, 56};
  for (std::size_t k = 0; k < 4; ++k) {
    CHECK(lp.degeneracy[k] == deg[k]);
    CHECK(lp.populations[k] == doctest::Approx(deg[k] / 256.0).epsilon(1e-10));
  }
}
