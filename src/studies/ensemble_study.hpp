#pragma once
// Ensemble study: for every instance of a set, the minimum gap (spectrum/
// gap_search), p(t_f) over a list of durations (studies/duration_sweep) and the
// best time to solution among them (studies/time_to_solution); then, per size,
// quantiles of the optimal TTS and of the minimum gap with percentile-bootstrap
// confidence intervals (studies/ensemble_statistics).
//
// Scale-out: instances are the units of work, handed out most expensive first
// (studies/work_distribution: threads, or MPI ranks under mpirun). Every
// instance's numbers are the same deterministic computation wherever it runs,
// and the summary is computed from the records ordered by set index, so results
// are bit-identical for any thread or rank count, for shards merged, and for a
// run resumed from its journal after a kill.
//
//   InstanceSet set = read_instance_set("glasses.h5");
//   Schedule sch = read_schedule_file("schedules/linear.toml");
//   EnsembleSettings st;
//   st.durations_ns = log_spaced_durations(1, 1000, 10);
//   EnsembleRun run{set, sch, read_text_file("schedules/linear.toml"), st};
//   ResultJournal journal("study.h5.journal", ensemble_journal_layout(st.durations_ns.size()),
//                         ensemble_fingerprint(run));
//   run.open_journal = [&](auto&&...) { return &journal; };   // resumable (the CLI uses JournaledRun)
//   EnsembleResult r = run_ensemble_study(run);     // on every rank
//   if (r.complete_here) write_ensemble_result("study.h5", r, command_line);
#include <cstdint>
#include <functional>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "dynamics/anneal_simulation.hpp"
#include "dynamics/master_equation.hpp"
#include "dynamics/ohmic_bath.hpp"
#include "io/result_journal.hpp"
#include "io/instance_set_file.hpp"
#include "schedule/schedule.hpp"
#include "spectrum/gap_search.hpp"
#include "studies/ensemble_statistics.hpp"
#include "studies/time_to_solution.hpp"

namespace gapwise {

struct EnsembleSettings {
  std::vector<double> durations_ns;  ///< ascending, > 0
  double target_probability = kDefaultTargetProbability;
  SimulationOptions simulation;      ///< propagator and tolerance of every anneal
  int gap_coarse_points = 101;       ///< gap search: uniform scan points
  double gap_s_tolerance = 1e-6;     ///< gap search: precision of s*
  // Statistics per size (they do not change the per-instance numbers).
  std::vector<double> quantile_levels = {0.25, 0.5, 0.75};
  double confidence_level = 0.95;
  int bootstrap_resamples = 2000;
  std::uint64_t bootstrap_seed = 1;
  /// --bath: every anneal also runs as the adiabatic master equation with this
  /// bath (p and TTS with the bath beside the closed ones); none: closed only.
  std::optional<OhmicBath> bath;
  OpenPropagatorOptions open;        ///< method, K and tolerance of the runs with the bath

  /// Every setting that decides per-instance numbers, as text (for fingerprints).
  std::string numerics_text() const;
  /// Throws InputError naming the option when a setting is out of range.
  void validate() const;
  /// The per-instance gap search these settings ask for (options named as the CLI spells them).
  GapSearchOptions gap_search_options() const;
};

/// Which instances a run computes: set index i with i % count == index.
struct ShardSpec {
  int index = 0;
  int count = 1;
  bool contains(std::size_t i) const { return static_cast<int>(i % static_cast<std::size_t>(count)) == index; }
  /// "i/N" with 0 <= i < N; InputError (key --shard) otherwise.
  static ShardSpec parse(const std::string& text);
  std::string text() const;
};

/// The numbers of one instance.
struct InstanceOutcome {
  std::size_t set_index = 0;
  std::string name;
  int qubits = 0;
  double ground_energy = 0;            ///< brute force, offset included
  long long ground_states = 0;         ///< classical ground-manifold size
  int planted_check = -1;              ///< -1 not planted; 1 brute force equals the planted energy; 0 it does not
  double gap_ghz = 0, gap_uncertainty_ghz = 0, gap_s = 0;
  int gap_degeneracy = 1;              ///< g of the governing gap E_g - E_0 (in the sector used)
  bool gap_at_end_point = false;
  std::vector<double> ground_probability;  ///< p(t_f), one per duration
  double max_norm_drift = 0;
  double tts_ns = 0;                   ///< best TTS over the durations; +inf when p = 0 everywhere
  double tts_duration_ns = 0;          ///< where it is reached
  bool tts_at_range_edge = false;      ///< at the first or last duration: the optimum may lie outside
  double wall_seconds = 0;             ///< the only number that differs between runs
  /// The propagator that ran each duration's anneal (with --propagator auto:
  /// split-auto or frame), one per duration.
  std::vector<std::string> propagator_used;
  // With a bath (empty / unused otherwise): the same per duration, open system.
  std::vector<double> bath_ground_probability;  ///< p(t_f) with the bath, one per duration
  double bath_tts_ns = 0, bath_tts_duration_ns = 0;
  bool bath_tts_at_range_edge = false;
  double bath_max_trace_error = 0;     ///< largest |Tr rho - 1| along any of the runs
  double bath_min_eigenvalue = 0;      ///< smallest eigenvalue of rho at the end of any run

  /// Flat, exact encoding (journal records and messages between ranks); the
  /// bath values follow the closed ones when `with_bath`, then one propagator
  /// code (propagator_code) per duration.
  std::vector<double> to_values() const;
  static InstanceOutcome from_values(std::size_t set_index, const std::vector<double>& v, std::size_t durations,
                                     bool with_bath = false);
  static std::vector<std::string> value_names(std::size_t durations, bool with_bath = false);
};

InstanceOutcome evaluate_instance(const Instance& instance, std::size_t set_index, const Schedule& schedule,
                                  const EnsembleSettings& settings);

struct SizeSummary {
  int qubits = 0;
  SampleSummary tts_ns;     ///< optimal TTS over the instances of this size
  SampleSummary gap_ghz;    ///< minimum gap
  std::size_t tts_at_range_edge = 0;
  std::size_t never_solved = 0;  ///< instances with p = 0 at every duration (TTS infinite)
  // With a bath: the optimal TTS with the bath (stream {n, 2}) and its counts.
  SampleSummary bath_tts_ns;
  std::size_t bath_tts_at_range_edge = 0, bath_never_solved = 0;
};

/// Per size, ascending; the bootstrap stream of size n is derive_seed(seed, {n, 0})
/// for the TTS, {n, 1} for the gap and {n, 2} for the TTS with the bath.
std::vector<SizeSummary> summarize_by_size(const std::vector<InstanceOutcome>& outcomes, const EnsembleSettings& settings);

struct EnsembleResult {
  std::string set_source, set_fingerprint, schedule_text, numerics_fingerprint;
  EnsembleSettings settings;
  ShardSpec shard;
  std::size_t set_size = 0;                 ///< instances in the whole set
  std::vector<InstanceOutcome> instances;   ///< this shard's, by set index
  std::vector<SizeSummary> sizes;
  bool complete_here = false;               ///< true on the collecting rank (the one that writes)
  std::size_t resumed = 0, computed = 0;
  double wall_seconds = 0;
  std::string distribution;                 ///< "threads (2)" or "MPI, 4 ranks"
};

struct EnsembleProgress {
  std::size_t done = 0, total = 0;  ///< this run's instances (resumed ones count as done)
  const InstanceOutcome* last = nullptr;
  double elapsed_seconds = 0;
  /// Estimated work (n 2^n per instance) computed so far and to compute in this run,
  /// resumed instances left out: the time left is about
  /// elapsed_seconds * (cost_total - cost_done) / cost_done, which a plain count
  /// overestimates many times since the largest instances go first.
  double cost_done = 0, cost_total = 0;
  double seconds_left() const { return cost_done > 0 ? elapsed_seconds * (cost_total - cost_done) / cost_done : 0; }
};

/// The relative cost the work order and the progress estimate use: n 2^n (one
/// sweep of the transverse-field term touches n 2^n amplitudes).
double instance_cost(int qubits);

struct EnsembleRun {
  const InstanceSet& set;
  const Schedule& schedule;
  std::string schedule_text;   ///< stored in the result, and fingerprinted
  EnsembleSettings settings;
  ShardSpec shard{};
  int threads = 1;             ///< compute threads without MPI
  std::function<void(const EnsembleProgress&)> progress;  ///< on the collector, after each instance
  /// On the collector, once every instance has passed the size and memory
  /// checks (so a refused run leaves no journal): opens the journal with this
  /// layout and fingerprint and returns it (owned by the caller; the command
  /// line's JournaledRun), or nullptr to keep none. Unset: no journal.
  std::function<ResultJournal*(JournalLayout layout, const std::string& fingerprint)> open_journal;
};

/// The journal record layout of an ensemble with `durations` durations.
JournalLayout ensemble_journal_layout(std::size_t durations, bool with_bath = false);
/// What a journal must match to be resumed: set, schedule and per-instance numerics.
std::string ensemble_fingerprint(const EnsembleRun& run);

/// Call on every rank. Validates everything before any work is handed out.
EnsembleResult run_ensemble_study(const EnsembleRun& run);

/// Whole result from shard results of one study: checks that they belong together
/// (same set, numerics, statistics and shard count) and cover every shard once;
/// InputError naming the file otherwise.
EnsembleResult merge_shards(const std::vector<EnsembleResult>& shards, const std::vector<std::string>& names);

}  // namespace gapwise
