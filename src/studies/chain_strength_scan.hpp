#pragma once
// What embedding costs: the chain-strength scan and the price of embedding.
//
// For each chain strength the logical problem is embedded (split rules in
// problem/embedding.hpp), and on the physical problem gapwise measures
//   - the minimum gap along the schedule (spectrum/gap_search.hpp),
//   - one anneal of duration t_f: p_logical (decoded by majority vote into a
//     logical ground state), p_physical, the broken-chain share,
//   - the duration needed for p_logical >= target (studies/duration_needed.hpp,
//     with the logical success set in place of the ground manifold).
// The same is measured on the logical problem itself (held to the same term
// limit). The best strength is the one whose needed duration is shortest among
// those whose physical ground states are all intact (a weak chain can break in
// the ground state and still decode right by luck of the tie rule); the
// price of embedding is its needed duration over the logical one.
//
//   ChainScanOptions o;
//   o.strengths = {ChainStrength::relative_to_largest(1.0), ChainStrength::relative_to_largest(2.0)};
//   o.duration_ns = 20.0;
//   o.grid_ns = log_spaced_durations(1.0, 1000.0, 13);
//   ChainScanResult r = scan_chain_strength(logical, embedding, schedule, o);
//   r.points[r.best].needed;  r.price.ratio;  r.price.relation;   // "=", "<=", ">=", "<", ">" or "?"
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "problem/chain_decoding.hpp"
#include "problem/embedding.hpp"
#include "schedule/schedule.hpp"
#include "spectrum/gap_search.hpp"
#include "studies/duration_needed.hpp"
#include "studies/duration_sweep.hpp"

namespace gapwise {

/// What a duration search established, as one number and how it bounds the answer.
struct NeededDuration {
  enum class Kind {
    Bracketed,  ///< the first crossing is bracketed: ns reaches the target, ns/(1 + width) does not
    AtMost,     ///< already reached at the shortest sampled duration: the answer is <= ns
    MoreThan,   ///< not reached at the longest sampled duration: the answer is > ns
  };
  Kind kind = Kind::MoreThan;
  double ns = 0;
  double lower_ns = 0;                 ///< Bracketed: the duration known not to reach
  bool lost_again = false;             ///< p falls below the target again at a longer sampled duration
  std::optional<double> stays_reached_ns;  ///< beyond this every sampled duration reaches the target

  static NeededDuration from(const DurationNeeded& d);
  /// "42.1 ns", "<= 1 ns", "> 1000 ns"
  std::string describe() const;
};

/// Ratio of two needed durations with what is known about it.
struct DurationRatio {
  double ratio = 0;
  std::string relation = "?";  ///< "=" (both bracketed), "<=", ">=", "<", ">", or "?" (unknown)
  std::string describe() const;
};
DurationRatio needed_ratio(const NeededDuration& numerator, const NeededDuration& denominator);

struct ChainScanOptions {
  std::vector<ChainStrength> strengths;  ///< scanned in the order of their resolved coupling
  std::optional<double> term_limit;      ///< device limit on |h|, |J| (both problems are held to it)
  double duration_ns = 20;               ///< t_f of the single anneal reporting p_logical(t_f)
  std::vector<double> grid_ns;           ///< sampled durations seeding the needed-duration search
  DurationNeededOptions needed;          ///< target, bisection width, noise
  SimulationOptions simulation;          ///< propagator and tolerance
  GapSearchOptions gap;                  ///< minimum-gap search settings (progress is set by the scan)
  int threads = 0;                       ///< anneals in parallel (0: OpenMP default)
  /// Called with a short description of each stage ("chain strength 2 of 7: gap search").
  std::function<void(const std::string&)> progress;
};

/// One problem (logical or embedded at one chain strength), fully measured.
struct ScanMeasurement {
  MinimumGapReport gap;
  double p_success = 0;          ///< p_logical(t_f) (the logical ground probability for the logical problem)
  double p_physical = 0;         ///< p of the physical ground manifold (== p_success for the logical problem)
  DecodedOutcomes decoded;       ///< chain statistics at t_f (zeros for the logical problem)
  double norm_drift = 0;
  DurationNeeded search;         ///< the raw search, with every sampled point
  NeededDuration needed;
};

struct ChainScanPoint {
  ChainStrength strength;
  double chain_coupling = 0;     ///< resolved magnitude, problem units, before the term limit
  double scale = 1;              ///< term-limit factor applied to the physical problem
  bool above_bound = false;      ///< chain_coupling > chain_coupling_bound: ground states provably intact
  /// By enumeration: every physical ground state has all chains intact. When
  /// false, success relies on broken chains (and for even chains on the tie
  /// rule), so the strength is not eligible as "best".
  bool ground_intact = false;
  /// Every physical ground state decodes into the logical ground manifold.
  bool ground_decodes = false;
  IsingProblem physical;
  ScanMeasurement m;
};

struct ChainScanResult {
  IsingProblem logical;          ///< as compared (term limit applied)
  double logical_scale = 1;
  ScanMeasurement logical_m;
  double chain_bound = 0;        ///< chain_coupling_bound of the logical problem (unscaled units)
  std::vector<ChainScanPoint> points;  ///< by increasing chain coupling
  std::size_t best = 0;          ///< index into points (among ground_intact points when there are any)
  bool best_ground_intact = false;  ///< false: no scanned strength keeps the physical ground states intact
  bool best_at_edge = false;     ///< the best strength is the weakest or the strongest scanned
  DurationRatio price;           ///< needed(embedded, best) / needed(logical)
};

/// Throws InputError for an embedding that does not serve the problem, an empty
/// strength list or a size the spectrum tools refuse.
ChainScanResult scan_chain_strength(const IsingProblem& logical, const Embedding& embedding, const Schedule& schedule,
                                    const ChainScanOptions& options);

/// The measurements for one problem with a given success set (used for both sides).
ScanMeasurement measure_problem(const AnnealSetup& setup, const Embedding* embedding,
                                const GroundManifold* logical_ground, const ChainScanOptions& options);

}  // namespace gapwise
