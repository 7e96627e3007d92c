#pragma once
// The lowest levels of H(s) at one point: dense diagonalization (Eigen) for small
// dimensions, matrix-free Lanczos (Spectra) on the shared Hamiltonian otherwise.
//
//   Levels lv = lowest_levels(H, scales.a_ghz(s), scales.b_ghz(s), 4, /*vectors=*/true);
//   double gap = lv.energies_ghz[1] - lv.energies_ghz[0];
#include <string>
#include <vector>

#include <Eigen/Dense>

#include "hamiltonian/transverse_ising.hpp"

namespace gapwise {

enum class EigenMethod { Auto, Dense, Lanczos };

struct Levels {
  std::vector<double> energies_ghz;  ///< ascending
  Eigen::MatrixXd vectors;           ///< columns, when requested
  EigenMethod method_used = EigenMethod::Auto;
  int iterations = 0;
};

/// Dimension up to which Auto picks the dense solver.
inline constexpr std::size_t kDenseMaxDim = 512;

/// Throws std::runtime_error when Lanczos does not converge (never a silent result).
Levels lowest_levels(const TransverseIsingHamiltonian& h, double a_ghz, double b_ghz, int k, bool vectors,
                     EigenMethod method = EigenMethod::Auto);

}  // namespace gapwise
