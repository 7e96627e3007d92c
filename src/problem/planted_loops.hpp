#pragma once
// Planted-solution Ising instances by the frustrated-loop construction of
// Hen, Job, Albash, Ronnow, Troyer and Lidar, Phys. Rev. A 92, 042325 (2015).
//
// Pick a planted spin state s*. Repeat M = round(alpha n) times: walk at random
// on the graph without stepping straight back until the walk meets itself; the
// closed part is a loop of L >= 3 edges. On it put J_e = -s*_i s*_j on every edge
// but one, chosen at random, which gets J_e = +s*_i s*_j. Add the loops' couplings.
// With a ruggedness R > 0, a loop is rejected (and drawn again) when it would
// push some |J_ij| above R; R = 0 sets no bound. (On a ring every loop is the
// whole ring, so the couplings grow with the loop count; bound them there with
// a low loop density.)
//
// Why s* is a ground state: the product of (-J_e s_i s_j) around a loop is
// negative for every s, so every configuration violates at least one of its
// edges and the loop's energy is at least -L + 2; s* violates exactly one edge
// of every loop at once. Hence E_0 = sum over loops of (2 - L_l), exactly, and
// s* (and its global flip) attains it. Other states may attain it too.
//
//   std::mt19937_64 rng(seed);
//   PlantedInstance p = plant_frustrated_loops(8, edges, 1.0, 3, rng);
//   p.problem.energy(p.planted_state) == p.ground_energy;   // always
#include <random>
#include <vector>

#include "problem/instance_families.hpp"

namespace gapwise {

struct PlantedInstance {
  IsingProblem problem;
  BasisIndex planted_state = 0;
  double ground_energy = 0.0;  ///< sum over loops of (2 - L)
  int loops = 0;
  std::vector<int> loop_lengths;
};

/// Throws InputError (key "--ruggedness") when the loops cannot be placed within
/// the ruggedness bound, or (key "--graph") when a vertex has fewer than 2 neighbours.
PlantedInstance plant_frustrated_loops(int n, const std::vector<Edge>& edges, double loops_per_qubit, int ruggedness,
                                       std::mt19937_64& rng);

}  // namespace gapwise
