// The minimum-gap search: closed-form two-level avoided crossings, a degenerate
// ground manifold, sector handling, and the size limit.
#include <doctest/doctest.h>

#include <cmath>
#include <numbers>
#include <string>

#include "io/input_error.hpp"
#include "spectrum/gap_search.hpp"

using namespace gapwise;

namespace {

bool any_flag_contains(const MinimumGapReport& r, const std::string& what) {
  for (const auto& f : r.flags)
    if (f.find(what) != std::string::npos) return true;
  return false;
}

}  // namespace

TEST_CASE("single qubit, linear ramps: the minimum of sqrt(A^2 + (B h)^2) in closed form") {
  // Levels +-(1/2) sqrt(A^2 + (B h)^2) (two-level problem, any quantum mechanics text).
  // With A = a0 (1 - s), B = b0 s: s* = a0^2 / (a0^2 + b0^2 h^2),
  // Delta_min = a0 b0 |h| / sqrt(a0^2 + b0^2 h^2) (minimizing the square; derived here).
  IsingProblem p(1);
  const double h = 0.35, a0 = 5.0, b0 = 5.0;
  p.h = {h};
  const TransverseIsingHamiltonian H(p);
  GapSearchOptions o;
  o.s_tolerance = 1e-7;
  const MinimumGapReport r = find_minimum_gap(H, EnergyScales::linear(a0, b0), o);
  const double s_star = a0 * a0 / (a0 * a0 + b0 * b0 * h * h);
  const double gap = a0 * b0 * h / std::sqrt(a0 * a0 + b0 * b0 * h * h);
  CHECK(r.sector == SpinFlipSector::Full);
  CHECK(r.ground_degeneracy == 1);
  CHECK_FALSE(r.at_end_point);
  CHECK(std::abs(r.s_star - s_star) <= std::max(r.s_star_uncertainty, 1e-12));
  CHECK(r.s_star_uncertainty <= 2e-7);
  CHECK(std::abs(r.gap_ghz - gap) <= r.gap_uncertainty_ghz + 1e-12);
  CHECK(r.gap_uncertainty_ghz < 1e-9);
}

TEST_CASE("a narrow avoided crossing between coarse grid points is found and resolved") {
  // The Landau-Zener two-level form H = -(Delta/2) X + (eps(s)/2) Z (Zener, Proc. R.
  // Soc. A 137, 696 (1932)) with eps = h B(s) sweeping through zero at s0 (B = k |s - s0|,
  // the sign of eps does not change the spectrum): the gap is sqrt(Delta^2 + eps^2),
  // smallest (= Delta) at s0, and its width in s is about Delta / (k h).
  // |<1|dH/ds|0>| = |A eps' - A' eps| / (2 sqrt(A^2 + eps^2)) = k h / 2 at s0.
  IsingProblem p(1);
  p.h = {1.0};
  const TransverseIsingHamiltonian H(p);
  const double s0 = 0.503731, delta = 1e-3, k = 10.0;
  const EnergyScales sc = EnergyScales::table({0.0, s0, 1.0}, {delta, delta, delta},
                                              {k * s0, 0.0, k * (1.0 - s0)}, ScaleInterpolation::Linear);
  GapSearchOptions o;
  o.coarse_points = 21;  // spacing 0.05, fifty times the crossing width
  o.s_tolerance = 1e-8;
  const MinimumGapReport r = find_minimum_gap(H, sc, o);
  CAPTURE(r.s_star);
  CAPTURE(r.gap_ghz);
  CHECK(std::abs(r.s_star - s0) <= std::max(r.s_star_uncertainty, 1e-12));
  CHECK(r.s_star_uncertainty <= 5e-8);
  CHECK(std::abs(r.gap_ghz - delta) <= r.gap_uncertainty_ghz + 1e-12);
  CHECK(r.gap_uncertainty_ghz < 1e-9);  // mostly the curvature times the s* uncertainty squared
  CHECK(r.matrix_element_ghz == doctest::Approx(k / 2.0).epsilon(1e-4));
  // Adiabatic time scale max |M| / (2 pi Delta^2): at the crossing k/2 / (2 pi delta^2).
  CHECK(r.adiabatic_time_ns == doctest::Approx(k / 2.0 / (2.0 * std::numbers::pi * delta * delta)).epsilon(1e-3));
}

TEST_CASE("degenerate ground manifold: E_g - E_0 stays open while E_1 - E_0 closes at s = 1") {
  // Antiferromagnetic triangle without fields: six of the eight states are classical
  // ground states (energy -1, the other two +3; common practice, frustration), so
  // in the even sector g = 3. At s = 1 (A = 0) the levels are (B/2) times the
  // problem energies: E_3 - E_0 = (B/2)(3 - (-1)) = 2 B, E_1 - E_0 = 0 exactly.
  IsingProblem p(3);
  p.couplings = {{0, 1, 1.0}, {1, 2, 1.0}, {0, 2, 1.0}};
  const TransverseIsingHamiltonian H(p);
  GapSearchOptions o;
  const double b1 = 5.0;
  const MinimumGapReport r = find_minimum_gap(H, EnergyScales::linear(5.0, b1), o);
  CHECK(r.sector == SpinFlipSector::Even);
  CHECK(r.classical_ground_states == 6);
  CHECK(r.ground_degeneracy == 3);
  CHECK(r.levels == 4);
  CHECK(r.definition.find("E_3 - E_0") != std::string::npos);
  CHECK(r.gap_10_end_ghz == doctest::Approx(0.0));
  CHECK(r.curve.back().gap_ghz == doctest::Approx(2.0 * b1).epsilon(1e-12));
  CHECK(r.gap_ghz > 1.0);  // stays open all along
  CHECK(any_flag_contains(r, "E_1 - E_0 closes"));
  // The lowest three levels end in the ground manifold, the fourth does not.
  REQUIRE(r.final_levels.size() == 4);
  for (int j = 0; j < 3; ++j) CHECK(r.final_levels[static_cast<std::size_t>(j)].in_ground_manifold);
  CHECK_FALSE(r.final_levels[3].in_ground_manifold);
}

TEST_CASE("degenerate ground manifold with fields (full space): the gap skips the degenerate partner") {
  // Qubits 0 and 1 antiferromagnetic, qubit 2 alone in a field: ground states 01x, 10x
  // with x = bit 1 -> g = 2 in the full space. The pair (0, 1) and qubit 2 do not
  // interact, so the levels are sums of a 2-qubit and a 1-qubit spectrum.
  IsingProblem p(3);
  p.h = {0.0, 0.0, 0.5};
  p.couplings = {{0, 1, 1.0}};
  const TransverseIsingHamiltonian H(p);
  GapSearchOptions o;
  o.levels = 2;  // too few: the search must raise it to g + 1
  const MinimumGapReport r = find_minimum_gap(H, EnergyScales::linear(4.0, 4.0), o);
  CHECK(r.sector == SpinFlipSector::Full);
  CHECK(r.ground_degeneracy == 2);
  CHECK(r.levels == 3);
  CHECK(any_flag_contains(r, "levels raised"));
  CHECK(r.gap_10_end_ghz == doctest::Approx(0.0));
  CHECK(r.gap_ghz > 0.1);
  // Cross-check the governing gap at s* against a dense solve of the same H.
  LevelOptions lo;
  lo.levels = 3;
  lo.method = EigenMethod::Dense;
  const Levels lv = lowest_levels(SectorHamiltonian(H, SpinFlipSector::Full), 4.0 * (1 - r.s_star), 4.0 * r.s_star, lo);
  CHECK(lv.energies_ghz[2] - lv.energies_ghz[0] == doctest::Approx(r.gap_ghz).epsilon(1e-10));
}

TEST_CASE("the even sector is used without fields; the other sector on request") {
  IsingProblem p(4);
  p.couplings = {{0, 1, -1.0}, {1, 2, 1.0}, {2, 3, -1.0}, {0, 3, -0.5}};
  const TransverseIsingHamiltonian H(p);
  GapSearchOptions o;
  o.other_sector = true;
  o.coarse_points = 21;
  const MinimumGapReport r = find_minimum_gap(H, EnergyScales::linear(5.0, 5.0), o);
  CHECK(r.sector == SpinFlipSector::Even);
  for (const auto& pt : r.curve) {
    REQUIRE(pt.other_energies_ghz.size() == pt.energies_ghz.size());
    // The forward anneal's start state is even: the even ground level is the overall one.
    CHECK(pt.energies_ghz[0] <= pt.other_energies_ghz[0] + 1e-12);
  }
}

TEST_CASE("more than 20 qubits are refused with the memory estimate") {
  CHECK_THROWS_WITH_AS(check_gap_search_size(21, SpinFlipSector::Even, 4, EigenMethod::Auto, "big.toml"),
                       doctest::Contains("at most 20"), InputError);
  CHECK(estimate_gap_search_bytes(20, SpinFlipSector::Full, 4, EigenMethod::Auto) >
        estimate_gap_search_bytes(20, SpinFlipSector::Even, 4, EigenMethod::Auto));
}

TEST_CASE("near-degeneracy flag: fires for a narrow avoided crossing, stays quiet for a wide one") {
  // The two-level form of the test above (Zener, Proc. R. Soc. A 137, 696 (1932)):
  // the spacing E_1 - E_0 = sqrt(Delta^2 + eps(s)^2) has its only interior minimum,
  // Delta, at s0. The search calls two levels close when an interior minimum of
  // their spacing is below 1e-3 of the largest energy scale (here max B = k s0 =
  // 5.04 GHz, so 5.04e-3 GHz; the threshold is this project's choice, see
  // gap_search.cpp). Delta = 1e-3 GHz is below it: the flag must fire, as "come
  // close" (the levels do not touch: Delta is far above the eigenvalue error).
  // Delta = 0.1 GHz is twenty times above it: no flag, since by the closed form
  // no spacing anywhere is smaller than Delta.
  IsingProblem p(1);
  p.h = {1.0};
  const TransverseIsingHamiltonian H(p);
  const double s0 = 0.503731, k = 10.0;
  auto search = [&](double delta) {
    const EnergyScales sc = EnergyScales::table({0.0, s0, 1.0}, {delta, delta, delta},
                                                {k * s0, 0.0, k * (1.0 - s0)}, ScaleInterpolation::Linear);
    GapSearchOptions o;
    o.coarse_points = 21;
    o.s_tolerance = 1e-8;
    return find_minimum_gap(H, sc, o);
  };
  const MinimumGapReport narrow = search(1e-3);
  INFO("narrow: " << (narrow.flags.empty() ? std::string("no flags") : narrow.flags.front()));
  CHECK(any_flag_contains(narrow, "levels 0 and 1 come close at s = 0.5037"));
  CHECK(any_flag_contains(narrow, "this enters the governing gap"));
  CHECK_FALSE(any_flag_contains(narrow, "touch"));
  const MinimumGapReport wide = search(0.1);
  std::string wide_flags;
  for (const auto& f : wide.flags) wide_flags += f + "\n";
  INFO("wide: " << wide_flags);
  CHECK_FALSE(any_flag_contains(wide, "come close"));
  CHECK_FALSE(any_flag_contains(wide, "touch"));
  CHECK_FALSE(any_flag_contains(wide, "levels 0 and 1"));  // other notes (A(s_last) > 0) may remain
  CHECK(wide.gap_ghz == doctest::Approx(0.1).epsilon(1e-9));  // the closed form the "no flag" rests on
}

TEST_CASE("crossing flag: fires for an exact crossing of decoupled subsystems, not for the single qubit") {
  // Qubit 0 alone with field h, decoupled from a ferromagnetic pair (qubits 1, 2,
  // J = -1, no fields). H is a sum of commuting parts, so its levels are sums of
  // the parts' levels and cross exactly (no avoided crossing between product
  // states of decoupled systems). Qubit 0: +-(1/2) g1, g1 = sqrt(A^2 + (B h)^2)
  // (two-level formula). Pair (worked out here in the basis (|00>+|11>)/sqrt2,
  // (|01>+|10>)/sqrt2 and the two odd states): +-P with P = sqrt(A^2 + B^2/4),
  // and +-B/2. The top pair level of the lower qubit-0 level, -g1/2 + P, meets
  // the bottom one of the upper, g1/2 - P, where g1 = 2P, i.e. B^2 (h^2 - 1) =
  // 3 A^2. With h = 2 and A = 5 (1 - s), B = 5 s that is s = 1/2, where the
  // sorted levels are -5.59, -4.05, -1.55, 0, 0 (levels 3 and 4 cross at 0).
  IsingProblem p(3);
  p.h = {2.0, 0.0, 0.0};
  p.couplings = {{1, 2, -1.0}};
  const TransverseIsingHamiltonian H(p);
  GapSearchOptions o;
  o.levels = 5;
  o.coarse_points = 101;  // s = 0.5 is a grid point
  const MinimumGapReport r = find_minimum_gap(H, EnergyScales::linear(5.0, 5.0), o);
  std::string all;
  for (const auto& f : r.flags) all += f + "\n";
  INFO(all);
  CHECK(any_flag_contains(r, "levels 3 and 4 touch (crossing or exact degeneracy) at s = 0.500000"));
  // Single qubit, h = 0.35: one spacing, sqrt(A^2 + (B h)^2) >= 1.65 GHz for all
  // s (closed form, first test case): nothing to flag.
  IsingProblem q(1);
  q.h = {0.35};
  const TransverseIsingHamiltonian Hq(q);
  const MinimumGapReport rq = find_minimum_gap(Hq, EnergyScales::linear(5.0, 5.0), GapSearchOptions{});
  CHECK_FALSE(any_flag_contains(rq, "come close"));
  CHECK_FALSE(any_flag_contains(rq, "touch"));
}
