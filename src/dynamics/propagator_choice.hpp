#pragma once
// The automatic choice of propagator ("auto"): for each anneal, the predicted
// wall time of full-space split propagation (split-auto) against that of the
// frame propagator (frame); the cheaper one runs, and the choice is recorded
// in the AnnealResult (and from there in every result file).
//
// Cost models (method notes, "Choosing between split and frame"):
//   split  T x rate x first_pair_work(split-auto, tolerance) exponential stages:
//          the step controller's own first grid (rate = B_max x the largest
//          single-flip energy + 2 A_max; SplitOperatorPropagator::prepare), times
//          the seconds per stage measured by a probe of a few Strang steps on
//          this Hamiltonian, times a calibration factor (1 until a split run of
//          the same dimension in this ledger measured actual / predicted).
//          Linear in T.
//   frame  solves x seconds per solve, flat in T. solves: 300 (the count
//          measured on 10 qubits with fields at 10 us, K = 11: 295 since the
//          strict-level grid bound of h17-fast, 991 before) until a frame
//          run of the same dimension in this ledger counted its own (solved
//          plus reused points). Seconds per solve: one timed lowest_levels call
//          (kProbeLevels levels with vectors, mid-path, in the sector the frame
//          would use) or, after a frame run, that run's wall time per solve.
//          The probe solve is taken only when the split prediction exceeds the
//          least the frame could cost (solves x kLeastStagesPerSolve stages),
//          so short anneals pay for a few probe steps only.
// The frame checks itself and falls back to split4 where it cannot hold the
// tolerance, so the choice changes the cost, never the accuracy guarantee.
//
//   PropagatorCostLedger ledger;   // shared by the anneals of one study
//   PropagatorChoice c = choose_propagator(H, scales, path, 1e-6, {}, ledger);
//   c.chosen;   // "split-auto" or "frame"
#include <cmath>
#include <limits>
#include <map>
#include <mutex>
#include <string>

#include "hamiltonian/transverse_ising.hpp"
#include "schedule/anneal_path.hpp"
#include "schedule/energy_scales.hpp"

namespace gapwise {

struct PropagationStats;

/// The name that asks for the automatic choice.
inline constexpr const char* kAutoPropagator = "auto";

struct PropagatorChoice {
  std::string chosen;  ///< the propagator that ran: "split-auto" or "frame" (empty: no choice was made)
  double split_seconds = std::numeric_limits<double>::quiet_NaN();  ///< predicted wall time of split-auto
  double frame_seconds = std::numeric_limits<double>::quiet_NaN();  ///< predicted (NaN: not needed, split cheaper than the frame's least cost)
  /// "cost model", "forced (frame at or above N ns)" or "split below the frame's least cost".
  std::string basis;
};

struct PropagatorChoiceOptions {
  /// Forced crossover: the frame at durations >= this (ns), split-auto below;
  /// NaN: the cost model decides.
  double frame_above_ns = std::numeric_limits<double>::quiet_NaN();
};

/// Timings measured by probes and by finished runs, per Hilbert-space
/// dimension; shared by the anneals of one study (thread safe).
class PropagatorCostLedger {
 public:
  struct Entry {
    double stage_seconds = 0;     ///< one split exponential stage (probe); 0: not measured
    double solve_seconds = 0;     ///< one eigen-solve of the frame (probe or run); 0: not measured
    double split_factor = 1.0;    ///< actual / predicted split time of the last split run
    double frame_solves = 0;      ///< points of the last frame run (solved + reused); 0: use the model
  };
  Entry get(std::size_t dim) const;
  void put(std::size_t dim, const Entry& e);

 private:
  mutable std::mutex mutex_;
  std::map<std::size_t, Entry> entries_;
};

/// Below this predicted split-auto time (s) the frame is not considered: there
/// both take well under a second, the choice would follow timing noise (the
/// ledger recalibrates from measured wall times), and with it a study's numbers
/// would change from run to run within the tolerance. Found when a resumed
/// 3-qubit duration study took the frame for one probe and split-auto for it in
/// the reference run (test_duration_resume failed about one run in three).
inline constexpr double kMinSplitSecondsForFrame = 0.5;
/// Eigen-solves a frame run is assumed to need before any was measured.
inline constexpr double kModelFrameSolves = 300.0;
/// An eigen-solve costs at least this many split stages (a Lanczos solve of a
/// few levels takes tens of H products; each costs about one stage).
inline constexpr double kLeastStagesPerSolve = 20.0;
/// Levels of the timed probe solve (about the K the frame settles on, 8 to 11
/// measured, plus its guard levels).
inline constexpr int kProbeLevels = 12;

/// T x rate x first_pair_work: the split step controller's first-pair stages.
double predicted_split_stages(const TransverseIsingHamiltonian& h, const EnergyScales& scales, const AnnealPath& path,
                              double tolerance);

PropagatorChoice choose_propagator(const TransverseIsingHamiltonian& h, const EnergyScales& scales,
                                   const AnnealPath& path, double tolerance, const PropagatorChoiceOptions& options,
                                   PropagatorCostLedger& ledger);

/// After a run chosen by choose_propagator: the measured wall time and counts
/// calibrate the ledger's entry for the next choice.
void record_choice_outcome(const TransverseIsingHamiltonian& h, const PropagatorChoice& choice,
                           double wall_seconds, const PropagationStats& stats, PropagatorCostLedger& ledger);

}  // namespace gapwise
