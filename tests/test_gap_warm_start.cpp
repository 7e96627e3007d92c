// The warm-started gap search (LevelTracker: each point seeded from the previous
// point's eigenvectors, Lanczos tolerance relaxed under Kato-Temple bounds)
// against the cold one and against references outside the project:
//  - Eigen's dense SelfAdjointEigenSolver on the same matrix (a general-purpose
//    reference library) on problems with fields, Gaussian couplings and a
//    QUBO-derived instance;
//  - the free-fermion transverse-field Ising ring (Pfeuty, Ann. Phys. 57, 79
//    (1970)), whose exactly degenerate levels (translation and reflection
//    symmetry) are the case a single-vector warm start could lose;
//  - the Kato-Temple bound itself on a diagonal matrix whose eigenvalues are known.
// Problems are seeded and invented for these tests; n = 9 or 10, so the full space
// (dimension 512 or 1024; 256 for the even sector of 9) is above the dense cut-off and Lanczos is used.
// ctest-labels: slow
#include <cmath>
#include <numbers>
#include <random>

#include <doctest/doctest.h>
#include <fmt/format.h>

#include "problem/instance_families.hpp"
#include "spectrum/gap_search.hpp"
#include "spectrum/level_tracker.hpp"
#include "test_support.hpp"

using namespace gapwise;

namespace {

/// +-1 glass on a ring plus n/2 chords, fields +-0.15, one coupling 0.3.
IsingProblem glass_with_fields(int n, unsigned seed) {
  std::mt19937 rng(seed);
  IsingProblem p(n);
  for (int i = 0; i < n; ++i) p.couplings.push_back({std::min(i, (i + 1) % n), std::max(i, (i + 1) % n), 1.0});
  while (static_cast<int>(p.couplings.size()) < n + n / 2) {
    int i = static_cast<int>(rng() % n), j = static_cast<int>(rng() % n);
    if (i > j) std::swap(i, j);
    bool dup = i == j;
    for (const auto& c : p.couplings) dup = dup || (c.i == i && c.j == j);
    if (!dup) p.couplings.push_back({i, j, 1.0});
  }
  for (auto& c : p.couplings) c.value = rng() % 2 ? 1.0 : -1.0;
  p.couplings[0].value = 0.3;
  for (auto& h : p.h) h = rng() % 2 ? 0.15 : -0.15;
  return p;
}

IsingProblem gaussian_with_fields(int n, unsigned seed) {
  FamilySpec f;
  f.graph = GraphKind::RingPlusChords;
  f.couplings = CouplingKind::Gaussian;
  f.seed = seed;
  IsingProblem p = generate_instance(f, n, 0).problem;
  std::mt19937 rng(seed);
  std::normal_distribution<double> g(0.0, 0.3);
  for (auto& h : p.h) h = g(rng);
  return p;
}

/// A random QUBO (upper triangle, entries uniform in [-1, 1], diagonal in [-2, 1]),
/// converted exactly: fields and offset come from the QUBO.
IsingProblem qubo_derived(int n, unsigned seed) {
  std::mt19937 rng(seed);
  std::uniform_real_distribution<double> u(-1.0, 1.0), d(-2.0, 1.0);
  QuboProblem q;
  q.variables = n;
  for (int i = 0; i < n; ++i)
    for (int j = i; j < n; ++j)
      if (i == j || rng() % 3 == 0) q.terms.push_back({i, j, i == j ? d(rng) : u(rng)});
  return qubo_to_ising(q);
}

MinimumGapReport search(const IsingProblem& p, EigenMethod m, bool warm, int points = 26) {
  const TransverseIsingHamiltonian h(p);
  GapSearchOptions o;
  o.method = m;
  o.warm_start = warm;
  o.coarse_points = points;
  return find_minimum_gap(h, EnergyScales::linear(5.0, 5.0), o);
}

/// |a - b| within the two stated uncertainties (plus a hair for rounding).
void check_same_minimum(const MinimumGapReport& a, const MinimumGapReport& b, const std::string& what) {
  INFO(what);
  INFO(fmt::format("gap {:.14f} +- {:.2e} vs {:.14f} +- {:.2e}", a.gap_ghz, a.gap_uncertainty_ghz, b.gap_ghz,
                   b.gap_uncertainty_ghz));
  INFO(fmt::format("s* {:.10f} +- {:.2e} vs {:.10f} +- {:.2e}", a.s_star, a.s_star_uncertainty, b.s_star,
                   b.s_star_uncertainty));
  CHECK(std::abs(a.gap_ghz - b.gap_ghz) <= a.gap_uncertainty_ghz + b.gap_uncertainty_ghz + 1e-13);
  CHECK(std::abs(a.s_star - b.s_star) <= a.s_star_uncertainty + b.s_star_uncertainty + 1e-12);
  CHECK(a.ground_degeneracy == b.ground_degeneracy);
}

}  // namespace

TEST_CASE("Kato-Temple bounds: quadratic in the residual where the neighbours leave room") {
  // Source: Kato, J. Phys. Soc. Japan 4, 334 (1949); Temple, Proc. R. Soc. A 119,
  // 276 (1928): with exactly one eigenvalue in (E - d, E + d), |E - exact| <= r^2 / d.
  // diag(0, 1, 3) with the vector (1, eps, 0): Rayleigh quotient eps^2/(1+eps^2),
  // residual eps/(1+eps^2)^(1/2) * ..., error ~ eps^2, bound r^2 / d ~ eps^2.
  Eigen::Vector3d d(0.0, 1.0, 3.0);
  for (double eps : {1e-2, 1e-4}) {
    Eigen::Vector3d v(1.0, eps, 0.0);
    v.normalize();
    const double e = v.dot(d.cwiseProduct(v));
    const double r = (d.cwiseProduct(v) - e * v).norm();
    const auto b = kato_temple_bounds({e, 1.0, 3.0}, {r, 0.0, 0.0});
    CHECK(b[0] >= std::abs(e - 0.0));      // a bound: never below the true error
    CHECK(b[0] <= 2.0 * r * r);             // quadratic, far below the residual r ~ eps
    CHECK(b[0] < r);
    CHECK(b[2] == 0.0);                     // the highest level keeps its residual bound
  }
  // A neighbour inside the residual interval: no quadratic bound, the residual stays.
  const auto close = kato_temple_bounds({0.0, 1e-6}, {1e-3, 1e-3});
  CHECK(close[0] == doctest::Approx(1e-3));
}

TEST_CASE("warm-started gap search equals the cold one and Eigen's dense solver within the stated uncertainty") {
  struct Case {
    const char* name;
    IsingProblem p;
  };
  const std::vector<Case> cases{{"+-1 glass with fields, n = 9", glass_with_fields(9, 71u)},
                                {"Gaussian couplings and fields, n = 9", gaussian_with_fields(9, 72u)},
                                {"QUBO-derived, n = 9", qubo_derived(9, 73u)}};
  for (const auto& c : cases) {
    CAPTURE(c.name);
    REQUIRE(c.p.has_fields());
    const MinimumGapReport warm = search(c.p, EigenMethod::Lanczos, true);
    const MinimumGapReport cold = search(c.p, EigenMethod::Lanczos, false);
    const MinimumGapReport dense = search(c.p, EigenMethod::Dense, false);
    CHECK(warm.warm_solves > warm.evaluations / 2);  // the warm path did run
    CHECK(cold.warm_solves == 0);
    CHECK(warm.gap_uncertainty_ghz < 1e-9);          // the accuracy is kept, not traded away
    check_same_minimum(warm, cold, "warm vs cold Lanczos");
    check_same_minimum(warm, dense, "warm Lanczos vs dense (Eigen)");
    // Every point of the warm curve against a dense solve at the same s.
    const TransverseIsingHamiltonian h(c.p);
    const SectorHamiltonian full(h, SpinFlipSector::Full);
    LevelOptions lo;
    lo.method = EigenMethod::Dense;
    double dmax = 0.0;
    for (double x : h.diagonal()) dmax = std::max(dmax, std::abs(x));
    for (std::size_t i = 0; i < warm.curve.size(); i += 7) {
      const auto& pt = warm.curve[i];
      const Levels ref = lowest_levels(full, pt.a_ghz, pt.b_ghz, lo);
      // The dense solver is backward stable: its eigenvalues are exact to about
      // dim * eps * ||H|| (common practice; Golub & Van Loan, Matrix Computations, sec. 8.3).
      const double norm = 0.5 * c.p.qubits * pt.a_ghz + 0.5 * pt.b_ghz * dmax;
      const double dense_err = static_cast<double>(full.dim()) * 2.3e-16 * norm;
      const double ref_gap = ref.energies_ghz[static_cast<std::size_t>(warm.ground_degeneracy)] - ref.energies_ghz[0];
      CHECK(std::abs(pt.gap_ghz - ref_gap) <= pt.error_bound_ghz + dense_err);
      CHECK(std::abs(pt.energies_ghz[0] - ref.energies_ghz[0]) <= pt.error_bound_ghz + dense_err);
    }
  }
}

TEST_CASE("warm-started search on the free-fermion ring: exact gap and exactly degenerate levels") {
  // Ferromagnetic ring, J = -1, no fields, even sector, linear 5 GHz scales. In the
  // even sector the fermions are antiperiodic, k = +-(2m - 1) pi / n, with
  // quasi-particle energies eps_k = sqrt((A - B cos k)^2 + (B sin k)^2) (Pfeuty,
  // Ann. Phys. 57, 79 (1970), rescaled to our coefficients as in
  // test_free_fermion_ring.cpp). The lowest even excitation is two quasi-particles
  // at +-pi/n: gap 2 eps_{pi/n}, smallest at A = B (s = 1/2): 10 sin(pi / (2n)) GHz.
  // The ring's translations and reflection make many excited levels exactly
  // degenerate, which a single start vector cannot resolve alone.
  const int n = 10;
  const IsingProblem p = gapwise::testing::ferromagnetic_ring(n);
  const MinimumGapReport warm = search(p, EigenMethod::Lanczos, true);
  const MinimumGapReport cold = search(p, EigenMethod::Lanczos, false);
  CHECK(warm.sector == SpinFlipSector::Even);
  CHECK(warm.ground_degeneracy == 1);
  const double exact = 10.0 * std::sin(std::numbers::pi / (2.0 * n));
  CHECK(std::abs(warm.gap_ghz - exact) <= warm.gap_uncertainty_ghz + 1e-12);
  CHECK(std::abs(warm.s_star - 0.5) <= warm.s_star_uncertainty + 1e-12);
  check_same_minimum(warm, cold, "free-fermion ring, warm vs cold");
  // The full curve: the levels followed are degenerate pairs here (E_1 = E_2 at
  // every s: two quasi-particles at (pi/n, -pi/n) and the pair with +-3 pi/n do
  // not coincide, but k and -k enter symmetrically); the warm search must return
  // the same levels as the cold one at every point it shares with it.
  const auto find = [&](double s) -> const SpectrumPoint* {
    for (const auto& q : cold.curve)
      if (q.s == s) return &q;
    return nullptr;
  };
  int compared = 0;
  for (const auto& pt : warm.curve) {
    const SpectrumPoint* c = find(pt.s);
    if (!c) continue;
    ++compared;
    for (std::size_t j = 0; j < pt.energies_ghz.size(); ++j)
      CHECK(std::abs(pt.energies_ghz[j] - c->energies_ghz[j]) <= 1e-9);
    // Exact gap on every shared point: 2 eps at k = pi / n.
    const double a = pt.a_ghz, b = pt.b_ghz, k = std::numbers::pi / n;
    const double two_eps = 2.0 * std::hypot(a - b * std::cos(k), b * std::sin(k));
    if (pt.a_ghz > 0.0) CHECK(std::abs(pt.gap_ghz - two_eps) <= pt.error_bound_ghz + 1e-12);
  }
  CHECK(compared >= 26);
}

TEST_CASE("warm-started search with a degenerate ground manifold (g = 2) follows E_2 - E_0") {
  // A +-1 glass without fields searched in the full space: every classical ground
  // state comes with its mirror image, so g >= 2 and the governing gap is E_g - E_0
  // (physics-conventions: the lowest g levels all end in the ground manifold). The
  // reference is Eigen's dense solver on the same matrix.
  IsingProblem p = glass_with_fields(9, 74u);
  for (auto& h : p.h) h = 0.0;
  const TransverseIsingHamiltonian h(p);
  GapSearchOptions o;
  o.sector = SpinFlipSector::Full;
  o.coarse_points = 26;
  o.method = EigenMethod::Lanczos;
  const MinimumGapReport warm = find_minimum_gap(h, EnergyScales::linear(5.0, 5.0), o);
  o.method = EigenMethod::Dense;
  const MinimumGapReport dense = find_minimum_gap(h, EnergyScales::linear(5.0, 5.0), o);
  REQUIRE(warm.ground_degeneracy >= 2);
  CHECK(warm.definition.find("E_" + std::to_string(warm.ground_degeneracy) + " - E_0") != std::string::npos);
  check_same_minimum(warm, dense, "g >= 2, warm Lanczos vs dense");
  CHECK(warm.gap_10_end_ghz < 1e-6);  // E_1 - E_0 closes at s = 1, labelled, not the governing gap
}

TEST_CASE("LevelTracker: warm solves agree with cold ones along s and start cold when far") {
  const IsingProblem p = gaussian_with_fields(10, 75u);
  const TransverseIsingHamiltonian h(p);
  const SectorHamiltonian full(h, SpinFlipSector::Full);
  const EnergyScales scales = EnergyScales::linear(5.0, 5.0);
  LevelOptions lo;
  lo.levels = 4;
  lo.method = EigenMethod::Lanczos;
  LevelTracker tr(full, scales, lo);
  for (double s : {0.2, 0.21, 0.22, 0.5, 0.51}) {
    const Levels& lv = tr.at(s);
    LevelOptions cold = lo;
    cold.vectors = true;
    const Levels ref = lowest_levels(full, scales.a_ghz(s), scales.b_ghz(s), cold);
    for (std::size_t j = 0; j < lv.energies_ghz.size(); ++j) {
      // Common practice: relative accuracy 1e-12 of each level, as the cold solve is asked for.
      CHECK(std::abs(lv.energies_ghz[j] - ref.energies_ghz[j]) <= lv.error_bounds_ghz[j] + ref.residuals_ghz[j] + 1e-13);
      CHECK(lv.error_bounds_ghz[j] <= std::max(lv.residuals_ghz[j], 1e-300));
    }
    // The levels that carry the gaps (E_0 .. E_2 here) meet the wanted accuracy.
    for (std::size_t j = 0; j < 3; ++j)
      CHECK(lv.error_bounds_ghz[j] <= 1e-12 * std::max(1.0, std::abs(lv.energies_ghz[j])));
  }
  // 0.2 cold; 0.21, 0.22 warm; 0.5 too far (cold); 0.51 warm.
  CHECK(tr.stats().solves == 5);
  CHECK(tr.stats().warm_solves == 3);
}
