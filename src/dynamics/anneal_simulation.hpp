#pragma once
// One anneal, start to end: initial state, propagation piece by piece along the
// path, observers at the waypoints and samples, and the measured outcome.
//
//   TransverseIsingHamiltonian H(problem);
//   GroundManifold gm = find_ground_manifold(problem, H.diagonal());
//   AnnealPath path = schedule.path_for(100.0);
//   AnnealResult r = simulate_anneal(H, gm, schedule.scales, path,
//                                    initial_state(H, schedule, path), {});
//   r.ground_probability;  r.top_outcomes;  r.norm_drift;
#include <string>
#include <vector>

#include "dynamics/anneal_observer.hpp"
#include "dynamics/propagator.hpp"
#include "dynamics/propagator_choice.hpp"
#include "schedule/schedule.hpp"

namespace gapwise {

struct SimulationOptions {
  std::string propagator = "split-auto";  // the fast split-operator propagator (method notes: "Choosing the default"); "odeint" is the reference
  PropagatorOptions propagation;
  /// propagator == "auto": split-auto or frame per anneal (propagator_choice.hpp).
  PropagatorChoiceOptions choice;
  /// Timings shared by the anneals of one study for "auto" (empty: each anneal
  /// probes for itself).
  std::shared_ptr<PropagatorCostLedger> cost_ledger;
  int samples_per_piece = 0;  ///< observations inside each piece, besides the waypoints
  /// Further observations wherever the path passes these s values (every
  /// passage: a reverse anneal passes most s twice; a pause at s is observed at
  /// its start). Observers see them with ObservationPoint::requested = true and
  /// s exactly as given. With a split propagator they are side branches off the
  /// step grid and leave the final state bit for bit unchanged; odeint stops
  /// there, which changes its adaptive steps within the tolerance.
  /// std::invalid_argument for an s the path never reaches (observe_s_times).
  std::vector<double> observe_s;
  int top_outcomes = 8;
};

struct Outcome {
  BasisIndex state = 0;
  double probability = 0;
  double energy = 0;  ///< problem energy, offset included
  bool in_ground_manifold = false;
};

struct AnnealResult {
  double duration_ns = 0;
  double ground_probability = 0;
  double norm_drift = 0;  ///< | <psi|psi> - 1 | at the end
  PropagationStats stats;
  std::vector<Outcome> top_outcomes;
  QuantumState final_state;
  double wall_seconds = 0;
  std::string propagator;  ///< the propagator that ran (propagator_used in results; never "auto")
  std::string kernels;     ///< Propagator::kernels() of it: "" when it has no split kernels
  PropagatorChoice choice; ///< with "auto": the predictions and their basis (choice.chosen empty otherwise)
};

/// Ground state of H at the path's first s (|+>^n when B = 0 there) or the
/// classical start state. Throws InputError when the ground state is not unique
/// (A = 0 at the start) or the start bits do not fit.
QuantumState initial_state(const TransverseIsingHamiltonian& h, const Schedule& schedule, const AnnealPath& path);

AnnealResult simulate_anneal(const TransverseIsingHamiltonian& h, const GroundManifold& ground,
                             const EnergyScales& scales, const AnnealPath& path, QuantumState psi,
                             const SimulationOptions& options, const std::vector<AnnealObserver*>& observers = {});

/// Where the path passes s: every time t with s(t) == s (the first time of a
/// constant-s piece at s), ascending. Empty when the path never reaches s.
std::vector<double> times_at_s(const AnnealPath& path, double s);

/// psi <- exp(-i 2 pi (b/2) D dt) psi: the exact propagator of H = (b/2) D (A = 0)
/// over dt ns. simulate_anneal uses it on constant-s pieces where A(s) = 0.
void apply_diagonal_phases(const TransverseIsingHamiltonian& h, double b_ghz, double dt_ns, QuantumState& psi);

/// The k most probable outcomes (ties broken by basis index).
std::vector<Outcome> most_probable_outcomes(const QuantumState& psi, const TransverseIsingHamiltonian& h,
                                            const GroundManifold& ground, int k);

}  // namespace gapwise
