#pragma once
// The whole anneal-time study on one problem and schedule: p(t_f) on a grid of
// durations, time to solution on the grid and its optimum, and the shortest
// duration that reaches the target (bracketing + bisection, with oscillations
// reported). Everything goes through one DurationEvaluator, so with a journal
// the study is resumable point by point (see io/result_journal.hpp).
//
//   AnnealSetup setup(problem, schedule, SimulationOptions{});
//   ResultJournal journal("run.h5.journal", duration_journal_layout(), fingerprint);
//   DurationEvaluator ev(setup, &journal);
//   DurationStudyOptions o;
//   o.durations_ns = log_spaced_durations(1, 1000, 13);
//   DurationStudy st = run_duration_study(ev, o);
//   st.optimum.duration_ns;  st.needed->first.upper_ns;
#include <optional>
#include <vector>

#include "studies/anneal_predictions.hpp"
#include "studies/duration_needed.hpp"
#include "studies/duration_sweep.hpp"
#include "studies/time_to_solution.hpp"

namespace gapwise {

struct DurationStudyOptions {
  std::vector<double> durations_ns;  ///< the sampled grid (any order; sorted and de-duplicated)
  double target = kDefaultTargetProbability;
  bool search_needed = true;         ///< bisect for the duration needed
  DurationNeededOptions needed;      ///< its target is replaced by `target`
  int threads = 0;                   ///< 0: OpenMP's default
};

struct DurationStudy {
  double target = kDefaultTargetProbability;
  std::vector<DurationPoint> grid;          ///< the sampled grid, ascending
  std::vector<TimeToSolution> grid_tts;     ///< TTS of each grid point
  TtsOptimum optimum;                       ///< over the grid
  std::optional<DurationNeeded> needed;     ///< when search_needed
};

/// Throws InputError for an empty grid or a target outside (0, 1).
DurationStudy run_duration_study(DurationEvaluator& evaluator, const DurationStudyOptions& options);

/// A default grid when the user gives none: 10 log-spaced durations from a fifth
/// of the smaller to five times the larger of the Landau-Zener and adiabatic
/// durations for the target (rounded to two significant digits, kept within
/// 0.05 .. 10000 ns and at least a factor 20 wide); 1 .. 300 ns without predictions.
std::vector<double> default_duration_grid(const AnnealPredictions* predictions, double target);

/// The grid sorted ascending without duplicates; InputError for an empty or non-positive list.
std::vector<double> normalised_grid(std::vector<double> durations_ns);

}  // namespace gapwise
