#pragma once
// p(t_f): the ground-state probability at the end of anneals of different
// durations along one schedule (the schedule's path shape stretched to each
// duration). Durations run in parallel over OpenMP threads, one whole anneal per
// thread; every anneal is the same deterministic computation whatever the
// thread count, so a threaded sweep gives bit-for-bit the results of a serial one.
// Exception: with the frame propagator the anneals share the eigenpairs solved
// along s (FramePointCache), and which points a duration finds stored depends
// on what ran before it, so its grid, and p within the tolerance, can differ
// between thread counts, resumed runs and orders (never beyond its own checks).
//
//   AnnealSetup setup(problem, schedule, SimulationOptions{});   // the options' default propagator
//   std::vector<double> t = log_spaced_durations(1.0, 1000.0, 13);
//   std::vector<DurationPoint> pts = sweep_durations(setup, t);
//   pts[3].ground_probability;
//
// With a journal (resumable; see io/result_journal.hpp), finished points are
// skipped and every newly finished one is journaled before on_finished runs:
//   DurationEvaluator ev(setup, &journal);
//   ev.on_finished = [](const DurationPoint& p) { ... rewrite result files ... };
//   ev.evaluate(t, /*threads=*/0);
#include <functional>
#include <map>
#include <optional>
#include <vector>

#include "dynamics/anneal_simulation.hpp"
#include "io/result_journal.hpp"
#include "problem/classical_spectrum.hpp"
#include "schedule/schedule.hpp"

namespace gapwise {

/// Everything that stays fixed across a duration sweep: the problem, its
/// Hamiltonian and ground manifold, the schedule and the numerical options.
struct AnnealSetup {
  AnnealSetup(IsingProblem problem, Schedule schedule, SimulationOptions options);
  IsingProblem problem;
  Schedule schedule;
  SimulationOptions options;  ///< top_outcomes and samples are ignored by the sweep
  TransverseIsingHamiltonian hamiltonian;
  GroundManifold ground;
  QuantumState start;  ///< initial_state() of the path (the same for every duration)
};

struct DurationPoint {
  double duration_ns = 0;
  double ground_probability = 0;
  double norm_drift = 0;
  long steps = 0;
  long hamiltonian_applications = 0;
  double wall_seconds = 0;  ///< 0 for points read back from a journal written before wall time was kept
  /// The propagator that ran this anneal (with "auto": the one chosen); from
  /// the journal when resumed.
  std::string propagator_used;
  bool resumed = false;     ///< read from the journal rather than simulated in this run
};

/// One anneal of the given duration. Throws InputError for a duration <= 0.
DurationPoint anneal_for_duration(const AnnealSetup& setup, double duration_ns);

/// `count` durations from first to last, equally spaced in log t (both ends
/// included; count 1 gives {first}). Throws InputError for first <= 0, last < first
/// or count < 1.
std::vector<double> log_spaced_durations(double first_ns, double last_ns, int count);

/// The journal layout of a duration sweep (kind "duration-sweep").
JournalLayout duration_journal_layout();

/// Memoised, optionally journaled evaluation of p(t_f). Not itself thread-safe:
/// call evaluate() from one thread; it spreads the work over OpenMP threads.
class DurationEvaluator {
 public:
  explicit DurationEvaluator(const AnnealSetup& setup, ResultJournal* journal = nullptr);

  /// Called once per newly simulated point, in completion order, under a lock
  /// (after the point is journaled). Exceptions thrown here stop the sweep.
  std::function<void(const DurationPoint&)> on_finished;
  /// Called before simulating, with the durations about to run (not called when
  /// every requested point is known), e.g. to size a progress bar.
  std::function<void(const std::vector<double>&)> on_batch;

  /// p(t_f) for each duration, in the given order; known points are reused and the
  /// missing ones simulated on up to `threads` threads (0: OpenMP's default;
  /// longest first, for balance). Rethrows the first failure after the running
  /// anneals end.
  std::vector<DurationPoint> evaluate(const std::vector<double>& durations_ns, int threads = 0);
  DurationPoint evaluate(double duration_ns);

  /// Every point known so far (journal + simulated), by duration.
  const std::map<double, DurationPoint>& known() const { return known_; }
  std::size_t simulated() const { return simulated_; }

 private:
  const AnnealSetup& setup_;
  ResultJournal* journal_;
  std::map<double, DurationPoint> known_;
  std::size_t simulated_ = 0;
};

/// Convenience: evaluate without a journal.
std::vector<DurationPoint> sweep_durations(const AnnealSetup& setup, const std::vector<double>& durations_ns,
                                           int threads = 0);

}  // namespace gapwise
