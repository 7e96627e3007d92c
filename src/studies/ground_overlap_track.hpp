#pragma once
// Perturbative crossings: where the instantaneous ground state stops overlapping the
// classical ground manifold. Along s, each of the lowest levels of H(s) is
// decomposed by classical energy: its weight on the ground manifold, and its
// largest weight on any one excited classical energy level. A perturbative crossing is
// a switch of the ground level from being dominated by an excited classical
// manifold (weight >= `dominance`) to holding most of its weight on the ground
// manifold: the state the anneal follows before the switch leads to the excited
// manifold, and the gap at the switch closes exponentially with the Hamming
// distance between the two (the perturbative crossings of Amin & Choi, Phys.
// Rev. A 80, 062326 (2009); Altshuler, Krovi & Roland, PNAS 107, 12446 (2010)).
// The switch point is refined by bisection on (ground weight - 1/2).
//
//   OverlapTrack tr = track_ground_overlap(H, ground, schedule.scales, {.grid_points = 200});
//   for (const PerturbativeCrossing& x : tr.perturbative_crossings)
//     x.s_switch; x.excited_energy; x.hamming_to_ground; x.gap_at_switch_ghz;
//   tr.points[i].levels[0].ground_weight;   // overlap curve of the ground level
#include <functional>
#include <vector>

#include "hamiltonian/transverse_ising.hpp"
#include "problem/classical_spectrum.hpp"
#include "schedule/energy_scales.hpp"
#include "spectrum/lowest_levels.hpp"

namespace gapwise {

/// Lowest levels of H at (A, B) with eigenvectors in the full computational
/// basis, energies ascending. The default uses lowest_levels().
using LevelSource = std::function<Levels(double a_ghz, double b_ghz, int k)>;

/// The classical energy levels of a problem: distinct energies (ascending) and
/// the level of each basis state.
struct ClassicalLevels {
  std::vector<double> energies;       ///< problem energies, offset included
  std::vector<std::size_t> degeneracy;
  std::vector<std::uint32_t> level_of;///< per basis state
};
ClassicalLevels classical_levels(const TransverseIsingHamiltonian& h, const GroundManifold& ground);

struct LevelComposition {
  double energy_ghz = 0;
  double ground_weight = 0;            ///< sum over the ground manifold of |<b|E_k>|^2
  double dominant_excited_energy = 0;  ///< the excited classical level holding most weight
  double dominant_excited_weight = 0;
};

struct OverlapPoint {
  double s = 0;
  std::vector<LevelComposition> levels;  ///< lowest levels, ascending
};

struct PerturbativeCrossing {
  double s_switch = 0;               ///< ground weight of the ground level crosses 1/2 here
  double s_before = 0, s_after = 0;  ///< grid points that bracketed it
  double excited_energy = 0;         ///< classical level dominating the ground level before the switch
  std::size_t excited_degeneracy = 0;
  int hamming_to_ground = 0;         ///< min over that level's states
  /// Hamming distance to the ground manifold averaged with the ground level's
  /// weights on that excited level at s_before: how many spins must turn together.
  double mean_hamming_before = 0;
  double excited_weight_before = 0;  ///< its weight in the ground level at s_before
  double ground_weight_after = 0;    ///< ground-manifold weight of the ground level at s_after
  int ground_manifold_level_before = -1;  ///< instantaneous level holding most ground weight at s_before
  double gap_at_switch_ghz = 0;      ///< E_1 - E_0 at s_switch
};

struct OverlapTrackOptions {
  int levels = 4;            ///< how many lowest levels to decompose
  int grid_points = 201;     ///< uniform grid over the scales' range of s
  double dominance = 0.5;    ///< weight that makes an excited classical level "dominate"
  double s_tolerance = 1e-7; ///< bisection stops when the bracket is this narrow
};

struct OverlapTrack {
  std::vector<OverlapPoint> points;
  std::vector<PerturbativeCrossing> perturbative_crossings;  ///< ascending in s
};

/// Composition of the lowest levels at one s.
OverlapPoint level_composition(const TransverseIsingHamiltonian& h, const GroundManifold& ground,
                               const ClassicalLevels& classical, double s, double a_ghz, double b_ghz, int k,
                               const LevelSource& source);

OverlapTrack track_ground_overlap(const TransverseIsingHamiltonian& h, const GroundManifold& ground,
                                  const EnergyScales& scales, const OverlapTrackOptions& options = {},
                                  LevelSource source = {});

}  // namespace gapwise
