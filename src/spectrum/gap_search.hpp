#pragma once
// The instantaneous spectrum of H(s) along s and its minimum gap, located
// precisely and reported with its definition and uncertainty.
//
//   H(s) = -(A(s)/2) sum_i sigma^x_i + (B(s)/2) D      (GHz)
//
// Sector: with every field zero the global spin flip commutes with H(s) and the
// anneal starts in its even sector, so the search works there (half the
// dimension) unless told otherwise. Gap: with g the degeneracy of the final
// classical ground manifold inside the sector, the gap that governs success is
// E_g - E_0 (the ground level to the lowest level that does not end in the
// ground manifold; E_1 - E_0 when g = 1). E_1 - E_0 is reported too, labelled:
// it closes at s = 1 whenever g >= 2.
//
// Method: a uniform coarse scan; adaptive subdivision of every interval where a
// level bends sharply compared with the local gap (Hellmann-Feynman slopes
// dE/ds = <E|dH/ds|E> at both ends), so a narrow avoided crossing between two
// coarse points is not missed; then Brent's method (Boost.Math
// brent_find_minima; Brent, "Algorithms for Minimization without Derivatives",
// 1973) on each local minimum of the gap. Uncertainties: the eigenvalue error
// bound from residual norms (|E - E_exact| <= ||H v - E v||, Weinstein's bound)
// plus Brent's bracket and the curvature of the gap at s*.
//
//   TransverseIsingHamiltonian H(problem);
//   GapSearchOptions opt;                        // 4 levels, sector chosen automatically
//   opt.s_tolerance = 1e-7;
//   MinimumGapReport r = find_minimum_gap(H, schedule.scales, opt);
//   fmt::print("Delta_min = {} +- {} GHz at s* = {} +- {} ({}; {})\n", r.gap_ghz,
//              r.gap_uncertainty_ghz, r.s_star, r.s_star_uncertainty, r.definition,
//              describe_sector(r.sector));
//   for (const SpectrumPoint& p : r.curve) use(p.s, p.energies_ghz, p.gap_ghz);
//
//   // One point only (levels, gaps, matrix elements at s):
//   SectorHamiltonian even(H, SpinFlipSector::Even);
//   SpectrumPoint p = spectrum_at(even, schedule.scales, 0.4, /*levels=*/4, /*g=*/1, LevelOptions{});
#include <cstddef>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "hamiltonian/spin_flip_sector.hpp"
#include "io/input_error.hpp"
#include "hamiltonian/transverse_ising.hpp"
#include "problem/classical_spectrum.hpp"
#include "schedule/energy_scales.hpp"
#include "spectrum/level_tracker.hpp"
#include "spectrum/lowest_levels.hpp"

namespace gapwise {

/// Largest qubit count the spectrum tools accept (Lanczos vectors of 2^n doubles).
inline constexpr int kMaxSpectrumQubits = 20;

/// The spectrum at one s.
struct SpectrumPoint {
  double s = 0.0;
  double a_ghz = 0.0, b_ghz = 0.0;
  std::vector<double> energies_ghz;  ///< lowest levels, ascending (sector used)
  std::vector<double> slopes_ghz;    ///< dE_j/ds (Hellmann-Feynman, GHz per unit s)
  double gap_ghz = 0.0;              ///< E_g - E_0 (governs success)
  double gap_10_ghz = 0.0;           ///< E_1 - E_0 (closes at s = 1 when g >= 2)
  /// |<g|dH/ds|0>| in GHz; when level g is degenerate, the norm over its
  /// degenerate subspace (basis-independent).
  double matrix_element_ghz = 0.0;
  double matrix_element_10_ghz = 0.0;  ///< |<1|dH/ds|0>|, same treatment for level 1
  double error_bound_ghz = 0.0;        ///< residual bound on E_0 plus that on E_g, plus rounding (never 0)
  int origin = 0;                      ///< 0 coarse grid, 1 subdivision, 2 refinement
  std::vector<double> other_energies_ghz;  ///< other spin-flip sector, on request
};

/// Levels, slopes, gaps and matrix elements at one s; g is the ground degeneracy in the sector.
SpectrumPoint spectrum_at(const SectorHamiltonian& h, const EnergyScales& scales, double s, int levels, int g,
                          const LevelOptions& base);
/// The same from levels already computed at s (with vectors), e.g. by a LevelTracker.
SpectrumPoint spectrum_from_levels(const SectorHamiltonian& h, const EnergyScales& scales, double s, int g,
                                   const Levels& levels);

struct GapSearchProgress {
  std::size_t evaluations = 0;  ///< eigenproblems solved so far
  std::size_t planned = 0;      ///< current estimate of the total
  double s = 0.0;               ///< last point
  const char* stage = "";       ///< "coarse scan", "subdivision", "refinement"
};

struct GapSearchOptions {
  int levels = 4;                       ///< k; raised to g + 1 when the ground manifold needs it
  std::optional<SpinFlipSector> sector; ///< unset: even sector when no fields, else full space
  EigenMethod method = EigenMethod::Auto;
  int coarse_points = 26;               ///< uniform scan points, end points included (>= 3); subdivision adds more where levels bend
  double s_tolerance = 1e-6;            ///< wanted precision of s* (Brent)
  int max_points = 3000;                ///< cap on all evaluated points; hitting it is flagged
  /// The command-line options that set coarse_points and max_points, so that a
  /// refusal names what the user typed; an empty max_points_option means the
  /// command has no such option (the budget is fixed at max_points).
  std::string points_option = "the gap search's coarse points";
  std::string max_points_option;
  double bend_threshold = 0.25;         ///< split when |dE/ds(b) - dE/ds(a)| (b - a) > this * local gap
  bool other_sector = false;            ///< also the levels of the other spin-flip sector at each point
  bool check_missed_levels = true;      ///< Lanczos deflation check where degeneracies are possible (lowest_levels.hpp)
  double lanczos_tolerance = 1e-12;
  /// Lanczos: follow the levels with a LevelTracker (each point warm-started from
  /// the previous one's vectors, tolerance relaxed under Kato-Temple bounds, the
  /// deflation check skipped during refinement when the scan never needed it).
  /// false: every point a cold solve at lanczos_tolerance (the reference).
  bool warm_start = true;
  std::optional<double> s_first, s_last;  ///< default: the range the energy scales cover
  std::function<void(const GapSearchProgress&)> progress;  ///< called after each point
  /// Resuming a long search: `lookup` is asked before each eigenproblem (return the
  /// point when it is already known), `record` is told every newly computed point.
  /// The command line backs both with a ResultJournal (see spectrum_point_values).
  std::function<std::optional<SpectrumPoint>(double s)> lookup;
  std::function<void(const SpectrumPoint&)> record;
};

/// A point as a flat list of numbers (for journals) and back; `levels` is k.
std::vector<double> spectrum_point_values(const SpectrumPoint& p);
std::vector<std::string> spectrum_point_value_names(int levels);
SpectrumPoint spectrum_point_from_values(double s, const std::vector<double>& values, int levels);

/// A minimum whose gap reopens on both sides to at least this multiple of
/// Delta_min before the s range ends is passed through; below it the path stops
/// inside the crossing (an end gap). sqrt(2) is one crossing width Delta/alpha
/// on the two-level hyperbola sqrt(Delta^2 + alpha^2 x^2).
inline constexpr double kSweptCrossingReopening = 1.4142135623730951;

/// A local minimum of the governing gap, after refinement.
struct GapMinimum {
  double s = 0.0, s_uncertainty = 0.0;
  double gap_ghz = 0.0, gap_uncertainty_ghz = 0.0;
  double curvature_ghz = 0.0;   ///< d^2 gap / ds^2 at s (GHz)
  bool at_end_point = false;
  /// How far the gap reopens: over the two sides of s, the smaller of the largest
  /// gap between s and that end of the range, over gap_ghz (1 at an end point).
  double reopening = 1.0;
};

/// What a lowest level becomes at the last s: its dominant classical states.
struct FinalLevel {
  int level = 0;
  double energy_ghz = 0.0;
  std::vector<BasisIndex> states;  ///< dominant basis states (full-space indices, sector partners included)
  std::vector<double> weights;     ///< their probabilities in the eigenvector
  double problem_energy = 0.0;     ///< classical energy of the dominant state, offset included
  bool in_ground_manifold = false;
};

struct MinimumGapReport {
  // The answer.
  double s_star = 0.0, s_star_uncertainty = 0.0;
  double gap_ghz = 0.0, gap_uncertainty_ghz = 0.0;
  bool at_end_point = false;      ///< the smallest gap is at an end of the s range (not interior)
  double reopening = 1.0;         ///< GapMinimum::reopening of the answer (< kSweptCrossingReopening: an end gap)
  std::string definition;         ///< e.g. "E_2 - E_0 (g = 2: ...)"
  int ground_degeneracy = 1;      ///< g, in the sector used
  std::size_t classical_ground_states = 1;  ///< ground manifold size in the full space
  SpinFlipSector sector = SpinFlipSector::Full;
  double matrix_element_ghz = 0.0;          ///< |<g|dH/ds|0>| at s*
  // E_1 - E_0, labelled (differs from the above only when g >= 2).
  double gap_10_end_ghz = 0.0;              ///< at the last s
  std::optional<GapMinimum> gap_10_interior_minimum;  ///< smallest interior minimum on the curve
  // Adiabatic time scale for s = t / t_f: t_ad = max_s |<g|dH/ds|0>| / (2 pi Delta(s)^2) in ns
  // (the 2 pi turns GHz into angular frequency; see method notes).
  double adiabatic_time_ns = 0.0;
  double adiabatic_time_s = 0.0;            ///< where the maximum sits
  double adiabatic_time_crude_ns = 0.0;     ///< max_s |M| / (2 pi Delta_min^2), the coarser bound
  // Everything found along the way.
  std::vector<GapMinimum> minima;           ///< refined local minima of the governing gap, by s
  std::vector<SpectrumPoint> curve;         ///< every evaluated point, sorted by s
  std::vector<FinalLevel> final_levels;     ///< at the last s
  std::vector<std::string> flags;           ///< near-degeneracies, crossings, unresolved regions
  int levels = 4;                           ///< k actually used
  EigenMethod method = EigenMethod::Auto;   ///< solver actually used
  double s_first = 0.0, s_last = 1.0;
  std::size_t evaluations = 0;              ///< eigenproblems solved (main sector)
  std::size_t resumed_points = 0;           ///< points taken from `lookup` instead
  long operator_applications = 0;           ///< H x products of the main-sector solves (Lanczos only)
  std::size_t warm_solves = 0;              ///< main-sector solves that were warm-started
  double wall_seconds = 0.0;
};

/// "E_1 - E_0" for g = 1, "E_g - E_0 (g = ...)" otherwise, with a short explanation.
std::string gap_definition(int ground_degeneracy);

/// Memory the search needs (bytes) for this size, sector, level count and solver.
double estimate_gap_search_bytes(int qubits, SpinFlipSector sector, int levels, EigenMethod method);

/// Refuses (InputError naming `what`) more than kMaxSpectrumQubits qubits or more
/// memory than is available; the message gives the estimate.
void check_gap_search_size(int qubits, SpinFlipSector sector, int levels, EigenMethod method, const std::string& what);
/// The same, with the refusal placed at `where` (e.g. the `qubits` line of the problem file).
void check_gap_search_size(int qubits, SpinFlipSector sector, int levels, EigenMethod method, const SourcePlace& where);

/// The sector the search uses for this problem when none is requested.
SpinFlipSector default_sector(const IsingProblem& problem);

/// What a search will do before it starts: sector, dimension, ground degeneracy g,
/// levels k, solver and memory. find_minimum_gap follows exactly this plan.
struct GapSearchPlan {
  SpinFlipSector sector = SpinFlipSector::Full;
  std::size_t dimension = 0;        ///< of the sector
  GroundManifold ground;            ///< classical ground manifold (full space)
  int ground_degeneracy = 1;        ///< g in the sector
  int levels = 4;                   ///< k = max(requested, g + 1)
  EigenMethod method = EigenMethod::Auto;  ///< resolved: Dense or Lanczos
  double memory_bytes = 0.0;
};
/// Throws InputError for an impossible request (see find_minimum_gap).
GapSearchPlan plan_gap_search(const TransverseIsingHamiltonian& h, const GapSearchOptions& options);

/// Eigenvectors of the lowest levels at one s, written in the full 2^n
/// computational basis whatever sector they were computed in.
struct EigenvectorsAt {
  double s = 0.0, a_ghz = 0.0, b_ghz = 0.0;
  SpinFlipSector sector = SpinFlipSector::Full;  ///< where they were computed
  std::vector<double> energies_ghz;   ///< ascending
  std::vector<double> residuals_ghz;  ///< ||H v - E v|| in the sector (error bound on E)
  /// Row-major, levels x 2^n: entry (j, b) is the amplitude of basis state b
  /// (bit i of b = qubit i) in level j. A sector vector x (representatives b <
  /// 2^(n-1)) is expanded as v[b] = x_b / sqrt(2), v[~b] = +-x_b / sqrt(2)
  /// (+ even, - odd), so every row has norm 1 in the full basis. Real (H(s) is
  /// real symmetric); overall sign arbitrary; a degenerate level's rows are one
  /// orthonormal basis of its eigenspace.
  std::vector<double> vectors;
  std::size_t dimension = 0;  ///< 2^n
};

/// The lowest `levels` eigenpairs of H(s) in `sector`, expanded to the full basis.
EigenvectorsAt eigenvectors_at(const TransverseIsingHamiltonian& h, const EnergyScales& scales, double s, int levels,
                               SpinFlipSector sector, EigenMethod method = EigenMethod::Auto);

/// Refuses (InputError naming the gap command's option) an empty s range or one
/// outside the scales, fewer than 3 coarse points, an s tolerance outside (0, 0.1).
void check_gap_search_options(const GapSearchOptions& options, const EnergyScales& scales);

/// Refuses more coarse points than the point budget for the whole search, naming
/// options.points_option and, where the command has one, options.max_points_option.
/// plan_gap_search calls it too; commands call it early, before any work.
void check_gap_point_budget(const GapSearchOptions& options);

/// The full search. Throws InputError for an impossible request (sector with fields,
/// no level outside the ground manifold, too many qubits), std::runtime_error when an
/// eigensolver fails.
MinimumGapReport find_minimum_gap(const TransverseIsingHamiltonian& h, const EnergyScales& scales,
                                  const GapSearchOptions& options);

/// The scanned curve of a report as columns, one entry per point (energies,
/// slopes and other-sector energies row-major, points x levels): what the HDF5
/// file and the Python module both store.
struct GapCurveColumns {
  std::vector<double> s, a, b, gap, gap10, m, m10, err, energies, slopes, others;
  std::vector<long long> origin;
};
GapCurveColumns gap_curve_columns(const MinimumGapReport& r);

}  // namespace gapwise
