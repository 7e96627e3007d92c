#pragma once
// Problem energies of every basis state, and the classical ground manifold found
// by exhaustive enumeration (exact for the sizes gapwise simulates).
//
//   auto diag = problem_diagonal(problem);           // E(b) - offset, all b
//   auto gm = find_ground_manifold(problem, diag);   // gm.energy, gm.states
#include <vector>

#include "problem/ising_problem.hpp"

namespace gapwise {

/// E(b) - offset for every b in [0, 2^n): the diagonal of the problem term.
std::vector<double> problem_diagonal(const IsingProblem& problem);

struct GroundManifold {
  double energy = 0.0;                ///< minimum problem energy, offset included
  std::vector<BasisIndex> states;     ///< every b with E(b) within tolerance of the minimum
  double tolerance = 0.0;             ///< absolute energy tolerance used
  double first_excited_energy = 0.0;  ///< lowest energy above the manifold (== energy if none)

  std::size_t degeneracy() const { return states.size(); }
  bool contains(BasisIndex b) const;
};

/// Tolerance: 1e-9 times max(1, largest |E|), stated in GroundManifold::tolerance.
GroundManifold find_ground_manifold(const IsingProblem& problem, const std::vector<double>& diagonal);
GroundManifold find_ground_manifold(const IsingProblem& problem);

}  // namespace gapwise
