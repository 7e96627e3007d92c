#pragma once
// Where the probability of an anneal ends up: how it is shared among the
// classical ground states (fair or unfair sampling of a degenerate manifold;
// Matsuda, Nishimori & Katzgraber, New J. Phys. 11, 073021 (2009)) and which
// excited classical states collect the rest, with their energies and Hamming
// distance from the nearest ground state.
//
//   AnnealResult r = simulate_anneal(H, gm, ...);
//   OutcomeAnalysis oa = analyze_outcome(H, gm, probabilities(r.final_state));
//   oa.ground_probability;            // p, all ground states together
//   oa.balance.max_over_min;          // 1 for perfectly fair sampling
//   oa.sink_levels[0].energy;         // the excited energy level that collects most
//   oa.sink_states[0].hamming_to_ground;
#include <cstddef>
#include <vector>

#include "hamiltonian/transverse_ising.hpp"
#include "problem/classical_spectrum.hpp"

namespace gapwise {

/// Smallest Hamming distance between b and any state of the ground manifold.
int hamming_to_ground(BasisIndex b, const GroundManifold& ground);

struct GroundStateShare {
  BasisIndex state = 0;
  double probability = 0;  ///< |psi_b|^2 at the end
  double share = 0;        ///< probability / p (1/g each for fair sampling; 0 when p = 0)
};

/// How evenly the anneal samples a g-fold ground manifold (all 1 / 0 when g = 1).
struct GroundBalance {
  double max_over_min = 1;      ///< largest / smallest ground-state probability (+inf when one is 0)
  double spread = 0;            ///< (largest - smallest) / mean
  double distance_from_fair = 0;///< total variation distance of the shares from 1/g each, in [0, 1 - 1/g]
};

/// All excited classical states of one energy, together.
struct SinkLevel {
  double energy = 0;            ///< problem energy, offset included
  std::size_t states = 0;       ///< how many basis states have this energy
  double probability = 0;       ///< their total final probability
  int min_hamming_to_ground = 0;///< over every state of this level
};

struct SinkState {
  BasisIndex state = 0;
  double energy = 0;
  double probability = 0;
  int hamming_to_ground = 0;
};

struct OutcomeAnalysis {
  double ground_probability = 0;
  std::vector<GroundStateShare> ground;  ///< every ground state, in basis order
  GroundBalance balance;
  std::vector<SinkLevel> sink_levels;    ///< excited energy levels by probability, largest first
  std::vector<SinkState> sink_states;    ///< excited basis states by probability, largest first
};

struct OutcomeOptions {
  std::size_t max_sink_levels = 8;
  std::size_t max_sink_states = 8;
  /// Levels and states holding less than this are left out of the lists (not of the totals).
  double min_probability = 1e-6;
};

/// `probabilities` holds |psi_b|^2 for every basis state b.
OutcomeAnalysis analyze_outcome(const TransverseIsingHamiltonian& h, const GroundManifold& ground,
                                const std::vector<double>& probabilities, const OutcomeOptions& options = {});

}  // namespace gapwise
