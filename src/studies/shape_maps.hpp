#pragma once
// Maps over schedule-shape parameters, threaded and resumable:
//
//  * pause map: ground-state probability p over pause location s_p x pause
//    duration d_p, for a forward anneal of total duration T. Cost models:
//    EqualTotal (the pause eats into the ramp: the run always takes T, so p
//    itself compares at equal cost) and AddedTime (the ramp keeps T, the run
//    takes T + d_p; compare with the unpaused path stretched to T + d_p, which is
//    computed as the reference of every column, and by TTS, which counts it).
//  * reverse map: for a classical start state, p of ending in the ground state
//    and of ending back in the start state, over turn point x dwell, with ramps
//    down and up of fixed duration.
//
// Each point is one whole anneal on one OpenMP thread, the same deterministic
// computation at any thread count (results identical to a serial run). With a
// journal (io/result_journal.hpp), finished points are skipped on a rerun and
// each new one is journaled as it completes.
//
//   AnnealSetup setup(problem, schedule, SimulationOptions{});
//   PauseMap m = pause_map(setup, {.pause_s = {0.3, 0.5}, .pause_ns = {0, 10}, .duration_ns = 50});
//   m.at(1, 1).ground_probability;   m.reference[1];  // unpaused at the same cost
//   ReverseMap r = reverse_map(setup, {.turn_s = {0.4, 0.6}, .dwell_ns = {0, 10}, .ramp_ns = 5});
#include <functional>
#include <map>
#include <vector>

#include "io/result_journal.hpp"
#include "studies/duration_sweep.hpp"
#include "studies/time_to_solution.hpp"

namespace gapwise {

struct MapPoint {
  double ground_probability = 0;
  double start_probability = 0;  ///< reverse map: weight on the start state at the end
  double norm_drift = 0;
  double total_ns = 0;           ///< the run's end time
  bool resumed = false;
  /// The propagator that ran this cell (with --propagator auto: split-auto or
  /// frame); "" when read back from a journal that did not record it.
  std::string propagator_used;
};

/// Called after each newly simulated point (under a lock): done, total.
using MapProgress = std::function<void(std::size_t done, std::size_t total)>;

enum class PauseCost { EqualTotal, AddedTime };

struct PauseMapOptions {
  std::vector<double> pause_s;   ///< locations, in [0, 1]
  std::vector<double> pause_ns;  ///< durations, >= 0 (0: no pause)
  double duration_ns = 0;        ///< T
  PauseCost cost = PauseCost::EqualTotal;
  double target_probability = kDefaultTargetProbability;
  int threads = 0;
};

struct PauseMap {
  PauseMapOptions options;
  std::vector<MapPoint> points;     ///< location-major: points[i * pause_ns.size() + j]
  std::vector<MapPoint> reference;  ///< per duration column: the unpaused path at the same cost
  std::size_t simulated = 0, resumed = 0;
  const MapPoint& at(std::size_t i, std::size_t j) const { return points[i * options.pause_ns.size() + j]; }
  double tts_ns(std::size_t i, std::size_t j) const;
};

struct ReverseMapOptions {
  std::vector<double> turn_s;    ///< in [0, 1]
  std::vector<double> dwell_ns;  ///< >= 0
  double ramp_ns = 0;            ///< each of the ramps down and up, > 0
  double target_probability = kDefaultTargetProbability;
  int threads = 0;
};

struct ReverseMap {
  ReverseMapOptions options;
  BasisIndex start_state = 0;
  bool start_in_ground_manifold = false;
  std::vector<MapPoint> points;  ///< turn-major: points[i * dwell_ns.size() + j]
  std::size_t simulated = 0, resumed = 0;
  const MapPoint& at(std::size_t i, std::size_t j) const { return points[i * options.dwell_ns.size() + j]; }
};

/// "split-auto 40, frame 8": how many of the points (and references) each
/// propagator ran, in order of first appearance; "unknown" for unrecorded ones.
std::string propagator_tally(const std::vector<MapPoint>& points);
/// Each point's propagator_used ("unknown" where empty), in the points' order.
std::vector<std::string> propagators_used(const std::vector<MapPoint>& points);

JournalLayout pause_map_journal_layout();
JournalLayout reverse_map_journal_layout();

/// Throws InputError for a bad grid (the option named), a start state that is not
/// forward (pause map) or not classical (reverse map).
/// The paths a pause map simulates, keyed {s, pause_ns} for paused runs and
/// pause_map_reference_key for the unpaused run of the same cost (same refusals
/// as pause_map). For studies that run the same paths another way (with a bath).
std::map<std::vector<double>, AnnealPath> pause_map_paths(const AnnealSetup& setup, const PauseMapOptions& options);
std::vector<double> pause_map_reference_key(const PauseMapOptions& options, double pause_ns);
PauseMap pause_map(const AnnealSetup& setup, const PauseMapOptions& options, ResultJournal* journal = nullptr,
                   const MapProgress& progress = {});
ReverseMap reverse_map(const AnnealSetup& setup, const ReverseMapOptions& options, ResultJournal* journal = nullptr,
                       const MapProgress& progress = {});

}  // namespace gapwise
