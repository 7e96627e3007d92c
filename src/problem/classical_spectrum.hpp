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

/// Two problem energies closer than this are the same level (absolute, problem
/// units, offset excluded): the larger of 1e-9 times the smallest nonzero |h_i|,
/// |J_ij| (the finest scale the problem holds) and a rounding floor of
/// 8 m eps sum(|h_i| + |J_ij|) over its m nonzero terms (the error of summing
/// them in double, with room for QUBO conversion and summation order). It
/// scales with the problem: multiplying every coefficient by c multiplies it by
/// c, and one huge coefficient does not swamp unit ones. See the method notes
/// ("What is reported"). Positive even for an all-zero problem.
double classical_energy_tolerance(const IsingProblem& problem);

/// The states within classical_energy_tolerance of the minimum, stated in GroundManifold::tolerance.
GroundManifold find_ground_manifold(const IsingProblem& problem, const std::vector<double>& diagonal);
GroundManifold find_ground_manifold(const IsingProblem& problem);

}  // namespace gapwise
