#pragma once
// The shortest duration whose ground-state probability reaches a target p*,
// found by bracketing on sampled points and bisection (in log t) inside the
// bracket, and reported honestly when p(t_f) is not monotonic.
//
// p(t_f) oscillates (interference between the paths through an avoided crossing
// and the end-point contributions), so "the" duration needed may not exist as
// one number. The search reports:
//   - the first crossing: the shortest bracket [lower, upper] with p(lower) < p*
//     <= p(upper) at or below the first sampled point that reaches p*;
//   - when p falls below p* again at a longer sampled duration, a second bracket
//     beyond which every sampled point reaches p* ("stays reached");
//   - every stretch where p decreases by more than the noise level, so a reader
//     sees where interpolating between samples would be unsafe.
// Points between samples are not known: an oscillation narrower than the grid
// can hide an earlier crossing. The report says which durations were sampled.
//
//   auto p_of = [&](const std::vector<double>& t) { ... return probabilities; };
//   DurationNeeded dn = find_duration_needed(p_of, {{10, 0.5}, {20, 0.9}, {40, 0.995}}, {});
//   if (dn.status == NeededStatus::Reached) use(dn.upper_ns);   // known to reach p*
//
//   // with a duration sweep (journaled points are reused, probes run in parallel):
//   DurationNeeded dn = duration_needed(evaluator, grid, options);
#include <functional>
#include <map>
#include <optional>
#include <vector>

#include "studies/duration_sweep.hpp"
#include "studies/time_to_solution.hpp"

namespace gapwise {

struct DurationNeededOptions {
  double target = kDefaultTargetProbability;
  /// Bisection stops when upper/lower - 1 <= relative_width.
  double relative_width = 5e-3;
  int max_rounds = 40;
  /// Interior points evaluated per round (together, so they can run on separate
  /// threads); the bracket shrinks by a factor probes + 1 (in log t) per round.
  /// Deliberately not tied to the thread count: the probed durations, and so the
  /// answer, are the same for a serial and a threaded run.
  int probes_per_round = 2;
  /// A decrease of p between neighbouring points counts as non-monotonic only when
  /// larger than this (set it above the integration error of p).
  double noise = 1e-5;
};

enum class NeededStatus {
  Reached,             ///< bracket [lower, upper] found and bisected
  ReachedAtShortest,   ///< already p >= p* at the shortest sampled duration: the answer is <= upper
  NotReached,          ///< p < p* at every sampled duration: the answer is > lower (the longest)
};

struct PStretch {
  double from_ns = 0, to_ns = 0;
  double p_from = 0, p_to = 0;
};

struct CrossingBracket {
  double lower_ns = 0, upper_ns = 0;  ///< p(lower) < p* <= p(upper)
  double p_lower = 0, p_upper = 0;
  int rounds = 0;                     ///< bisection rounds spent on it
  bool oscillation_inside = false;    ///< probes in the bracket crossed p* more than once
};

struct DurationNeeded {
  NeededStatus status = NeededStatus::NotReached;
  double target = kDefaultTargetProbability;
  /// Reached: the first crossing. ReachedAtShortest: upper = the shortest duration.
  /// NotReached: lower = the longest duration.
  CrossingBracket first;
  /// Set when p drops below p* again after the first crossing: the last crossing
  /// beyond which every sampled point reaches p*. Unset if p is below p* at the
  /// longest sampled duration (then lost_at_longest is true).
  std::optional<CrossingBracket> stays_reached;
  bool lost_at_longest = false;  ///< reached somewhere but p < p* again at the longest duration
  std::vector<PStretch> decreasing;  ///< stretches of sampled points where p falls by more than noise
  std::map<double, double> points;   ///< every (t_f, p) the search knew or evaluated
};

using ProbabilityBatch = std::function<std::vector<double>(const std::vector<double>& durations_ns)>;

/// Generic search on known samples (duration -> p) and a batch evaluator for new
/// probes. Throws std::invalid_argument for an empty sample set or bad options.
DurationNeeded find_duration_needed(const ProbabilityBatch& p_of, std::map<double, double> samples,
                                    const DurationNeededOptions& options);

/// On a duration sweep: brackets on the sampled `grid` (evaluated first when
/// missing) and bisects with the evaluator, which reuses journaled probes. Only
/// the grid seeds the bracket, so a resumed search probes the same durations as
/// an uninterrupted one.
DurationNeeded duration_needed(DurationEvaluator& evaluator, const std::vector<double>& grid_ns,
                               const DurationNeededOptions& options, int threads = 0);

/// Stretches where p decreases by more than `noise` between neighbouring samples.
std::vector<PStretch> decreasing_stretches(const std::map<double, double>& samples, double noise);

}  // namespace gapwise
