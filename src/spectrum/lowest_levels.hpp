#pragma once
// The lowest levels of H(s) at one point, in the full space or a spin-flip
// sector: dense diagonalization (Eigen) for small dimensions, matrix-free
// Lanczos (Spectra) on the shared Hamiltonian kernel otherwise.
//
//   TransverseIsingHamiltonian H(problem);
//   SectorHamiltonian even(H, SpinFlipSector::Even);
//   LevelOptions lo;  lo.levels = 4;  lo.vectors = true;
//   Levels lv = lowest_levels(even, scales.a_ghz(s), scales.b_ghz(s), lo);
//   double gap = lv.energies_ghz[1] - lv.energies_ghz[0];   // GHz
//   double err = lv.residuals_ghz[0];    // |E_0 - exact| <= this (residual bound)
//
//   // Full space, old call form:
//   Levels lv2 = lowest_levels(H, a_ghz, b_ghz, 4, /*vectors=*/true);
//
// Lanczos from one start vector sees only one direction of an exactly degenerate
// eigenspace. With check_missed_levels (the default) a Lanczos result is
// re-checked whenever exact degeneracies are possible: the found vectors are
// shifted out of the way (H + sigma V V^T) and the lowest level of what remains
// is computed from a fresh random start; any level below the highest one found
// is merged in, until none is left. Degeneracies that persist over a range of s
// need a symmetry of H, and a problem whose diagonal has no repeated values has
// none (only phases commute with D, and only a constant phase also commutes with
// sum X), so for such problems the check is skipped unless B = 0.
// Dense results need no such check.
//
// Error bounds: every level gets the residual (Weinstein) bound ||H v - E v||
// and, where the found neighbours leave room, the quadratic Kato-Temple bound
// r^2 / delta (delta: distance to the nearest other level's interval E_i +- r_i;
// Kato, J. Phys. Soc. Japan 4, 334 (1949); Temple, Proc. R. Soc. A 119, 276
// (1928)); error_bounds_ghz holds the smaller. With `quadratic_bounds` the
// Lanczos tolerance is relaxed as far as these bounds still meet `tolerance`
// (relative) for the first `bounded_levels` levels, and tightened step by step
// to `tolerance` itself where they do not (tight clusters). A warm start
// (`start`: the previous point's vectors as columns) seeds Lanczos with their
// sum; see level_tracker.hpp for the object that carries it along s.
#include <cstddef>
#include <string>
#include <vector>

#include <Eigen/Dense>

#include "hamiltonian/spin_flip_sector.hpp"
#include "hamiltonian/transverse_ising.hpp"

namespace gapwise {

enum class EigenMethod { Auto, Dense, Lanczos };

/// "auto", "dense", "lanczos".
std::string eigen_method_name(EigenMethod m);

struct LevelOptions {
  int levels = 4;                  ///< how many of the lowest levels (capped at the dimension)
  bool vectors = false;            ///< also return eigenvectors (sector basis, columns)
  EigenMethod method = EigenMethod::Auto;
  bool check_missed_levels = true; ///< Lanczos only: deflation check for missed degenerate partners
  double tolerance = 1e-12;        ///< Lanczos: relative residual of each Ritz pair
  /// Lanczos: relax the residual tolerance while the Kato-Temple bounds of the first
  /// `bounded_levels` levels (0: all) stay within tolerance * max(1, |E|) (see above).
  bool quadratic_bounds = false;
  int bounded_levels = 0;
};

struct Levels {
  std::vector<double> energies_ghz;   ///< ascending
  Eigen::MatrixXd vectors;            ///< columns, when requested (sector basis)
  std::vector<double> residuals_ghz;  ///< ||H v - E v|| per level when vectors were computed (error bound on E)
  /// min(residual, Kato-Temple bound) per level when vectors were computed: |E - exact| <= this.
  std::vector<double> error_bounds_ghz;
  int operator_applications = 0;      ///< H x products spent (Lanczos, deflation check and residuals)
  EigenMethod method_used = EigenMethod::Auto;
  int iterations = 0;                 ///< Lanczos restarts (main solve)
  int missed_levels_found = 0;        ///< levels the deflation check added
  bool level_check_run = false;       ///< whether the deflation check ran
};

/// Dimension up to which Auto picks the dense solver.
inline constexpr std::size_t kDenseMaxDim = 128;  // bench/: Lanczos is faster above (k = 4)
/// Largest dimension the dense solver accepts even when asked for explicitly (512 MiB matrix).
inline constexpr std::size_t kDenseHardMaxDim = 8192;

/// Throws std::runtime_error when Lanczos does not converge (never a silent result),
/// InputError when the dense solver is forced on a dimension above kDenseHardMaxDim.
Levels lowest_levels(const SectorHamiltonian& h, double a_ghz, double b_ghz, const LevelOptions& options);
/// The same, warm-started from `start` (columns: approximate eigenvectors, e.g. those
/// of a nearby s; nullptr or an empty matrix: cold start).
Levels lowest_levels(const SectorHamiltonian& h, double a_ghz, double b_ghz, const LevelOptions& options,
                     const Eigen::MatrixXd* start);

/// Per-level error bounds from energies (ascending) and residual norms:
/// min(r_j, r_j^2 / delta_j), delta_j the distance from E_j to the nearest other
/// level's interval [E_i - r_i, E_i + r_i]; the highest level has no known
/// neighbour above and keeps r_j. Assumes no level between the ones given is missing.
std::vector<double> kato_temple_bounds(const std::vector<double>& energies, const std::vector<double>& residuals);

/// Full space.
Levels lowest_levels(const TransverseIsingHamiltonian& h, double a_ghz, double b_ghz, int k, bool vectors,
                     EigenMethod method = EigenMethod::Auto);

}  // namespace gapwise
