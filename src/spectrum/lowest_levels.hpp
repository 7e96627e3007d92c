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
};

struct Levels {
  std::vector<double> energies_ghz;   ///< ascending
  Eigen::MatrixXd vectors;            ///< columns, when requested (sector basis)
  std::vector<double> residuals_ghz;  ///< ||H v - E v|| per level when vectors were computed (error bound on E)
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

/// Full space.
Levels lowest_levels(const TransverseIsingHamiltonian& h, double a_ghz, double b_ghz, int k, bool vectors,
                     EigenMethod method = EigenMethod::Auto);

}  // namespace gapwise
