#pragma once
// The perturbative-crossing instance shared by the diagnosis tests ("core and leaves"),
// built for these tests in the spirit of the perturbative crossings of Amin &
// Choi, Phys. Rev. A 80, 062326 (2009): a core qubit 0 and k leaves, each leaf
// with field h_i = 1 and coupling J_0i = +1 to the core. With the core at spin
// +1 each leaf feels (h + J) s_i = 2 s_i and is pinned at -1; with the core at
// -1 the leaf terms cancel and the leaves are free. The core field
// h_0 = k - delta/2 makes
//   E_ground  = -k - delta/2   (core +1, leaves -1; unique)
//   E_excited = -k + delta/2   (core -1, leaves anything; 2^k-fold degenerate).
// The transverse field lowers the free manifold in first order (-A/2 per free
// leaf) but the pinned state only in second order, so for A/B above about
// delta/k the ground level lives in the excited manifold and switches to the
// ground state late in the anneal, through an isolated avoided crossing whose
// gap shrinks with k (about 0.30, 0.16, 0.09 GHz for k = 3, 4, 5 at
// delta = 0.5 with linear 5 GHz scales, as measured by the gap search).
//
//   IsingProblem p = core_and_leaves(6, 1.0);   // 7 qubits
#include "problem/ising_problem.hpp"

namespace gapwise::testing {

inline IsingProblem core_and_leaves(int k, double delta) {
  IsingProblem p(k + 1);
  p.h[0] = k - delta / 2;
  for (int i = 1; i <= k; ++i) {
    p.h[static_cast<std::size_t>(i)] = 1.0;
    p.couplings.push_back({0, i, 1.0});
  }
  return p;
}

}  // namespace gapwise::testing
