#pragma once
// Reading a physical outcome back as a logical one: majority vote per chain,
// chain breaks, and the probabilities a user of an embedded problem cares about.
//
// Tie rule (chains with an even number of qubits): when a chain's vote is tied,
// the chain takes the spin of its first qubit as written in the embedding file.
// The rule is deterministic, so "decodes to a logical ground state" is a plain
// set of physical basis states and its probability is exact.
//
//   ChainReadout r = decode_majority(physical_state, embedding);
//   r.logical;          // logical basis index (bit v = decoded z of variable v)
//   r.broken_chains;    // chains whose qubits disagree
//   DecodedOutcomes d = decode_distribution(probabilities(psi), embedding,
//                                           logical_ground, physical_ground);
//   d.logical_ground_probability;  d.mean_broken_fraction;
#include <vector>

#include "problem/classical_spectrum.hpp"
#include "problem/embedding.hpp"

namespace gapwise {

struct ChainReadout {
  BasisIndex logical = 0;  ///< decoded logical basis state
  int broken_chains = 0;   ///< chains not all of one spin
  int tied_chains = 0;     ///< broken chains whose vote was tied (decided by the first qubit)
};

/// Majority vote per chain, ties to the chain's first qubit.
ChainReadout decode_majority(BasisIndex physical, const Embedding& e);

struct DecodedOutcomes {
  double logical_ground_probability = 0;   ///< decoded state in the logical ground manifold
  double physical_ground_probability = 0;  ///< physical state in the physical ground manifold
  double mean_broken_fraction = 0;         ///< expected fraction of chains broken
  double any_break_probability = 0;        ///< probability that at least one chain is broken
  double tie_probability = 0;              ///< probability that at least one chain vote was tied
};

/// Statistics of a distribution over physical basis states (size 2^physical_qubits).
DecodedOutcomes decode_distribution(const std::vector<double>& physical_probabilities, const Embedding& e,
                                    const GroundManifold& logical_ground, const GroundManifold& physical_ground);

/// Sorted physical basis states that decode into the logical ground manifold:
/// the success event of an embedded anneal.
std::vector<BasisIndex> states_decoding_to(const Embedding& e, const GroundManifold& logical_ground);

/// The logical success event as a GroundManifold of the physical problem, so
/// every tool that measures a ground-state probability (anneal runs, duration
/// searches) measures p_logical instead. energy/first_excited_energy are those
/// of the physical problem's classical spectrum over that set and its complement.
GroundManifold logical_success_manifold(const Embedding& e, const GroundManifold& logical_ground,
                                        const IsingProblem& physical);

}  // namespace gapwise
