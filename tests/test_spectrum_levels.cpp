// Lowest levels of H(s): spin-flip sectors, Lanczos against dense, and the
// transverse-field Ising ring against its exact free-fermion spectrum.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <numbers>
#include <random>
#include <vector>

#include "hamiltonian/spin_flip_sector.hpp"
#include "io/input_error.hpp"
#include "spectrum/lowest_levels.hpp"
#include "test_support.hpp"

using namespace gapwise;
using gapwise::testing::ferromagnetic_ring;

namespace {

IsingProblem random_problem(int n, bool fields, unsigned seed) {
  std::mt19937 rng(seed);
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  IsingProblem p(n);
  if (fields)
    for (auto& h : p.h) h = u(rng);
  for (int i = 0; i < n; ++i)
    for (int j = i + 1; j < n; ++j)
      if (u(rng) > -0.2) p.couplings.push_back({i, j, u(rng)});
  return p;
}

/// All levels of the ring H = -G sum X_i - Jz sum Z_i Z_{i+1} in one parity sector of
/// P = prod X_i, from the Jordan-Wigner free-fermion solution (Pfeuty, Ann. Phys. 57,
/// 79 (1970); Lieb, Schultz and Mattis, Ann. Phys. 16, 407 (1961)). With X_i = 1 - 2 n_i,
/// P = (-1)^N: P = +1 takes antiperiodic fermions, k = (2m+1) pi / n; P = -1 takes
/// periodic ones, k = 2 pi m / n. Paired modes (k, -k) contribute
/// eps_k (nu_k - 1/2) each, eps_k = 2 sqrt(G^2 + Jz^2 - 2 G Jz cos k); the unpaired
/// modes k = 0 and k = pi contribute xi_k (n_k - 1/2), xi_k = 2 (G - Jz cos k), and the
/// total occupation parity must match the sector. (Derivation redone for this test.)
std::vector<double> free_fermion_levels(int n, double g, double jz, bool even) {
  std::vector<double> mode_energy;
  std::vector<bool> unpaired;
  for (int m = 0; m < n; ++m) {
    const double k = even ? (2.0 * m + 1.0) * std::numbers::pi / n : 2.0 * std::numbers::pi * m / n;
    const double c = std::cos(k);
    const bool special = std::abs(std::sin(k)) < 1e-12;  // k = 0 or k = pi
    unpaired.push_back(special);
    mode_energy.push_back(special ? 2.0 * (g - jz * c) : 2.0 * std::sqrt(g * g + jz * jz - 2.0 * g * jz * c));
  }
  std::vector<double> levels;
  for (unsigned occ = 0; occ < (1u << n); ++occ) {
    if ((__builtin_popcount(occ) % 2 == 0) != even) continue;
    double e = 0.0;
    for (int m = 0; m < n; ++m) e += mode_energy[static_cast<std::size_t>(m)] * (((occ >> m) & 1u) ? 0.5 : -0.5);
    levels.push_back(e);
  }
  std::sort(levels.begin(), levels.end());
  return levels;
}

void check_close(const std::vector<double>& got, const std::vector<double>& want, double rel) {
  REQUIRE(got.size() <= want.size());
  for (std::size_t i = 0; i < got.size(); ++i) {
    CAPTURE(i);
    CHECK(std::abs(got[i] - want[i]) <= rel * std::max(1.0, std::abs(want[i])));
  }
}

}  // namespace

TEST_CASE("the reduced problem reproduces every energy with the last qubit up") {
  const IsingProblem p = random_problem(6, false, 7);
  const IsingProblem r = fix_last_qubit_up(p);
  REQUIRE(r.qubits == 5);
  for (BasisIndex b = 0; b < 32; ++b) CHECK(r.energy(b) == doctest::Approx(p.energy(b)).epsilon(1e-14));
}

TEST_CASE("even and odd sector spectra together are the full spectrum (P = prod X commutes with H)") {
  // Symmetry fact (common practice): with h = 0, H is block diagonal in the eigenbasis of P.
  const IsingProblem p = random_problem(6, false, 11);
  const TransverseIsingHamiltonian h(p);
  const double a = 1.7, b = 2.3;
  LevelOptions all;
  all.levels = 64;
  all.method = EigenMethod::Dense;
  const Levels full = lowest_levels(SectorHamiltonian(h, SpinFlipSector::Full), a, b, all);
  all.levels = 32;
  const Levels even = lowest_levels(SectorHamiltonian(h, SpinFlipSector::Even), a, b, all);
  const Levels odd = lowest_levels(SectorHamiltonian(h, SpinFlipSector::Odd), a, b, all);
  std::vector<double> both = even.energies_ghz;
  both.insert(both.end(), odd.energies_ghz.begin(), odd.energies_ghz.end());
  std::sort(both.begin(), both.end());
  check_close(both, full.energies_ghz, 1e-12);
  // The forward anneal starts in the even sector: its ground state is the overall one.
  CHECK(even.energies_ghz[0] == doctest::Approx(full.energies_ghz[0]).epsilon(1e-13));
}

TEST_CASE("a sector eigenvector written in the full basis is an eigenvector of the full H") {
  const IsingProblem p = random_problem(5, false, 3);
  const TransverseIsingHamiltonian h(p);
  const SectorHamiltonian odd(h, SpinFlipSector::Odd);
  LevelOptions lo;
  lo.levels = 2;
  lo.vectors = true;
  const Levels lv = lowest_levels(odd, 0.9, 1.4, lo);
  const std::vector<double> v = odd.to_full(lv.vectors.col(1).data());
  std::vector<double> hv(v.size());
  h.apply(0.9, 1.4, v.data(), hv.data());
  double res = 0.0, norm = 0.0;
  for (std::size_t i = 0; i < v.size(); ++i) {
    res += std::pow(hv[i] - lv.energies_ghz[1] * v[i], 2);
    norm += v[i] * v[i];
  }
  CHECK(norm == doctest::Approx(1.0).epsilon(1e-12));
  CHECK(std::sqrt(res) < 1e-10);
  // Odd under the flip: v(~b) = -v(b).
  CHECK(v[3] == doctest::Approx(-v[v.size() - 1 - 3]).epsilon(1e-12));
}

TEST_CASE("sectors are refused when fields break the spin-flip symmetry") {
  IsingProblem p = random_problem(4, true, 5);
  const TransverseIsingHamiltonian h(p);
  CHECK_THROWS_WITH_AS(SectorHamiltonian(h, SpinFlipSector::Even), doctest::Contains("field"), InputError);
}

TEST_CASE("Lanczos agrees with dense diagonalization on random problems, n <= 10") {
  // Reference: Eigen's dense SelfAdjointEigenSolver (general-purpose library).
  for (int n = 4; n <= 10; n += 2) {
    for (int fields = 0; fields < 2; ++fields) {
      CAPTURE(n);
      CAPTURE(fields);
      const IsingProblem p = random_problem(n, fields == 1, 100u + static_cast<unsigned>(n));
      const TransverseIsingHamiltonian h(p);
      const SpinFlipSector sec = fields ? SpinFlipSector::Full : SpinFlipSector::Even;
      const SectorHamiltonian sh(h, sec);
      for (double s : {0.2, 0.5, 0.8}) {
        const double a = 4.0 * (1.0 - s), b = 4.0 * s;
        LevelOptions lo;
        lo.levels = 6;
        lo.vectors = true;
        lo.method = EigenMethod::Dense;
        const Levels d = lowest_levels(sh, a, b, lo);
        lo.method = EigenMethod::Lanczos;
        const Levels l = lowest_levels(sh, a, b, lo);
        if (sh.dim() >= 8) CHECK(l.method_used == EigenMethod::Lanczos);
        check_close(l.energies_ghz, d.energies_ghz, 1e-9);
        for (double r : l.residuals_ghz) CHECK(r < 1e-8);
      }
    }
  }
}

TEST_CASE("transverse-field Ising ring, n = 8..12: both sectors match the free-fermion levels") {
  // H = -(A/2) sum X + (B/2) sum J Z Z with J = -1 is the ring with G = A/2, Jz = B/2.
  for (int n = 8; n <= 12; ++n) {
    const TransverseIsingHamiltonian h(ferromagnetic_ring(n));
    for (double ratio : {0.6, 1.0, 1.7}) {  // ordered, critical, disordered
      const double b = 2.0, a = ratio * b;
      for (bool even : {true, false}) {
        CAPTURE(n);
        CAPTURE(ratio);
        CAPTURE(even);
        const std::vector<double> want = free_fermion_levels(n, a / 2.0, b / 2.0, even);
        const SectorHamiltonian sh(h, even ? SpinFlipSector::Even : SpinFlipSector::Odd);
        LevelOptions lo;
        lo.levels = 6;  // includes the degenerate (k, -k) excitations
        lo.method = EigenMethod::Lanczos;
        check_close(lowest_levels(sh, a, b, lo).energies_ghz, want, 1e-9);
        if (n <= 10) {
          lo.method = EigenMethod::Dense;
          check_close(lowest_levels(sh, a, b, lo).energies_ghz, want, 1e-9);
        }
      }
    }
  }
}

TEST_CASE("Lanczos finds both partners of an exactly degenerate level") {
  // Ring translation symmetry makes the (k, -k) excitations of the free-fermion
  // spectrum exactly degenerate (Pfeuty 1970); one Krylov space sees only one
  // direction of each, so the second partner comes from the deflation check.
  const TransverseIsingHamiltonian h(ferromagnetic_ring(10));
  const SectorHamiltonian even(h, SpinFlipSector::Even);
  LevelOptions lo;
  lo.levels = 6;
  lo.method = EigenMethod::Lanczos;
  const Levels l = lowest_levels(even, 1.2, 2.0, lo);
  const std::vector<double> want = free_fermion_levels(10, 0.6, 1.0, true);
  REQUIRE(std::abs(want[2] - want[5]) < 1e-9);  // the reference really is 4-fold degenerate there
  check_close(l.energies_ghz, want, 1e-9);
}
