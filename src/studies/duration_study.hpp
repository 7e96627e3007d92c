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
//
//   // the default grid, extended until the TTS optimum is bracketed:
//   o.durations_ns = default_duration_grid(&predictions, 0.99);
//   o.extend_to_bracket = true;
//   o.random_guess_probability = sudden_limit_probability(setup);
#include <functional>
#include <limits>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "studies/anneal_predictions.hpp"
#include "studies/duration_needed.hpp"
#include "studies/duration_sweep.hpp"
#include "studies/time_to_solution.hpp"

namespace gapwise {

/// Bounds of the default grid and of its extension (ns).
inline constexpr double kGridMinNs = 0.05, kGridMaxNs = 10000.0;

struct DurationStudyOptions {
  std::vector<double> durations_ns;  ///< the sampled grid (any order; sorted and de-duplicated)
  double target = kDefaultTargetProbability;
  bool search_needed = true;         ///< bisect for the duration needed
  DurationNeededOptions needed;      ///< its target is replaced by `target`
  int threads = 0;                   ///< 0: OpenMP's default
  /// The ground-state probability at t_f -> 0 (sudden_limit_probability); lets the
  /// optimum be recognised as random-guess limited (see TtsOptimum). NaN: unknown.
  double random_guess_probability = std::numeric_limits<double>::quiet_NaN();
  /// While the TTS optimum sits at an end of the grid (and is not random-guess
  /// limited), add points beyond that end at the grid's log spacing, two per round,
  /// within [extend_min_ns, extend_max_ns] and at most extend_max_points in all.
  bool extend_to_bracket = false;
  double extend_min_ns = kGridMinNs, extend_max_ns = kGridMaxNs;
  int extend_max_points = 12;
};

struct DurationStudy {
  double target = kDefaultTargetProbability;
  std::vector<DurationPoint> grid;          ///< the sampled grid, ascending
  std::vector<TimeToSolution> grid_tts;     ///< TTS of each grid point
  TtsOptimum optimum;                       ///< over the grid
  /// Points added by extend_to_bracket below and above the given grid, and why
  /// the extension stopped ("" when it was not needed or not asked for).
  int extended_below = 0, extended_above = 0;
  std::string extension_stop;
  std::optional<DurationNeeded> needed;     ///< when search_needed
};

/// The grid and its TTS optimum, extended as DurationStudyOptions::extend_to_bracket
/// says; p_of returns p(t_f) for a list of durations (known ones may be memoised).
struct GridExtension {
  std::vector<double> grid;  ///< ascending
  TtsOptimum optimum;
  int below = 0, above = 0;  ///< points added below and above the given grid
  std::string stop;          ///< why the extension stopped short ("" when bracketed or not asked for)
};
GridExtension extend_grid_to_bracket(const std::function<std::vector<double>(const std::vector<double>&)>& p_of,
                                    std::vector<double> grid, const DurationStudyOptions& options);

/// Throws InputError for an empty grid or a target outside (0, 1).
DurationStudy run_duration_study(DurationEvaluator& evaluator, const DurationStudyOptions& options);

/// A default grid when the user gives none: 10 log-spaced durations from a fifth
/// of the smaller to five times the larger of the Landau-Zener and adiabatic
/// durations for the target (rounded to two significant digits, kept within
/// 0.05 .. 10000 ns and at least a factor 20 wide); 1 .. 300 ns without predictions.
std::vector<double> default_duration_grid(const AnnealPredictions* predictions, double target);

/// The simulated duration needed for the target when the search found it (the
/// upper end of the first-crossing bracket, known to reach p*); NaN when it is only
/// bounded (reached at the shortest duration, not reached) or was not searched.
double simulated_duration_needed(const DurationStudy& study);

/// The Landau-Zener and adiabatic predictions judged against every known point
/// (grid and probes) and against the simulated duration needed; see judge_prediction.
struct PredictionVerdicts {
  std::optional<PredictionVerdict> lz, adiabatic;  ///< empty when not applicable
};
PredictionVerdicts judge_predictions(const AnnealPredictions& predictions, const std::map<double, DurationPoint>& known,
                                     const DurationStudy& study, double factor, double floor);

/// The ground-state probability of the start state itself: what an anneal of
/// vanishing duration returns (g/2^n for |+>^n and a g-fold ground manifold).
double sudden_limit_probability(const AnnealSetup& setup);

/// The grid sorted ascending without duplicates; InputError for an empty or non-positive list.
std::vector<double> normalised_grid(std::vector<double> durations_ns);

}  // namespace gapwise
