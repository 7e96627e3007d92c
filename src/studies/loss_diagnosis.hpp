#pragma once
// Failure-mode diagnosis: why an anneal of a problem along a schedule loses
// the ground state, channel by channel, with numbers a user can act on.
//
// Channels (each with a one-line verdict, ranked by the probability it costs):
//   avoided crossing   every interior minimum of the governing gap E_g - E_0
//                      (src/spectrum/gap_search.hpp): s*, Delta_min, the
//                      Landau-Zener loss predicted at each duration, and the
//                      population the simulation actually moves out of the
//                      levels that end in the ground manifold across it
//                      (instantaneous-level populations just before and after
//                      s*, from LevelPopulationObserver);
//   end gap            the smallest gap at an end of the path (a small final
//                      classical gap): the population lost between where the
//                      gap has opened and the end (no Landau-Zener number);
//   perturbative crossing  an avoided crossing where the ground level switches
//                      from an excited classical manifold to the ground manifold
//                      (Amin & Choi, Phys. Rev. A 80, 062326 (2009);
//                      studies/ground_overlap_track.hpp);
//   elsewhere          what the crossings do not account for: 1 - p minus the
//                      population moved at the crossings;
// Bookkeeping: a channel's `loss` is never negative. Population that returns to
// the levels ending in the ground manifold (across a crossing window, or outside
// every window) is its `regained` instead, so that for every duration
//   sum over crossing and elsewhere channels of (loss - regained) = 1 - p.
//   unfair sampling    a degenerate ground manifold shared unevenly
//                      (studies/outcome_analysis.hpp; costs no p, ranked by
//                      its distance from fair sampling);
//   control errors     Gaussian errors on h and J (studies/control_error_ensemble.hpp):
//                      the rate at which the perturbed problem's ground state is
//                      not the intended one, and the p it keeps; its loss is
//                      p without errors minus the mean p with them (a further
//                      loss on top of 1 - p, not a share of it).
// Each interior crossing also gets the duration a Landau-Zener extrapolation
// gives for a loss of target_loss there, and (when not longer than
// check_max_ns) one simulated anneal at that duration to check it.
// Where the lost probability goes (excited classical states, energies, Hamming
// distances) is part of each duration's result.
//
//   DiagnosisOptions o;
//   o.durations_ns = {20, 100};
//   o.control = ControlEnsembleOptions{.model = {0.03, 0.03, false}, .samples = 100};
//   Diagnosis d = diagnose_anneal(problem, schedule, o);
//   d.runs[0].channels[0].verdict;     // the channel that limits p at 20 ns
//   d.crossings[0].passages[1].transferred;
#include <functional>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "dynamics/anneal_simulation.hpp"
#include "spectrum/gap_search.hpp"
#include "studies/control_error_ensemble.hpp"
#include "studies/ground_overlap_track.hpp"
#include "studies/outcome_analysis.hpp"

namespace gapwise {

enum class ChannelKind { AvoidedCrossing, PerturbativeCrossing, EndGap, Elsewhere, UnfairSampling, ControlErrors };
/// "avoided crossing", "perturbative crossing", "end gap", "elsewhere", "unfair sampling", "control errors".
const char* channel_kind_name(ChannelKind k);

/// One passage of the anneal through one avoided crossing, at one duration.
struct CrossingPassage {
  double duration_ns = 0;
  double s_before = 0, s_after = 0;    ///< where the populations are taken
  double t_before_ns = 0, t_after_ns = 0;
  double population_before = 0;        ///< in the levels that end in the ground manifold
  double population_after = 0;
  double transferred = 0;              ///< population_before - population_after
  double sweep_rate_ghz_per_ns = 0;    ///< v = d(diabatic energy difference)/dt at s*
  double landau_zener_loss = 0;        ///< predicted fraction leaving at this crossing (NaN for an end gap)
};

struct AvoidedCrossing {
  GapMinimum minimum;                  ///< s*, Delta_min (GHz), uncertainties, curvature
  double diabatic_slope_ghz = 0;       ///< |d eps/ds| of the fitted crossing (GHz per unit s)
  double window_s_before = 0, window_s_after = 0;  ///< where the gap is window_factor * Delta_min
  std::optional<std::size_t> perturbative_crossing;       ///< index into the overlap track's perturbative crossings
  /// An end gap: the minimum sits at an end of the path, or so close to one that
  /// the gap does not reopen to window_factor * Delta_min before the path ends.
  bool at_end_point = false;
  std::vector<CrossingPassage> passages;          ///< one per duration
  /// The window (gap below window_factor * Delta_min) covers more than
  /// broad_window_fraction of the path's s range: not an isolated two-level
  /// crossing; the loss across it is all that leaves over that stretch.
  bool broad = false;
  /// Landau-Zener extrapolation: the duration of this path shape for which the
  /// predicted loss here is target_loss (NaN for an end gap).
  double landau_zener_duration_ns = std::numeric_limits<double>::quiet_NaN();
  /// One anneal simulated at landau_zener_duration_ns (unset when not run).
  std::optional<CrossingPassage> check;
  double check_ground_probability = std::numeric_limits<double>::quiet_NaN();
};

struct Channel {
  ChannelKind kind = ChannelKind::Elsewhere;
  std::size_t index = 0;   ///< which crossing (for crossing kinds)
  double loss = 0;         ///< probability this channel costs at this duration (rank key; >= 0)
  double regained = 0;     ///< population it returns to the ground-manifold levels instead (>= 0)
  std::string verdict;     ///< one line, with the numbers to act on
};

struct DurationDiagnosis {
  double duration_ns = 0;
  AnnealResult anneal;               ///< p, outcomes, final state
  OutcomeAnalysis outcome;           ///< ground shares and sinks
  double unattributed_loss = 0;      ///< 1 - p - sum of crossing transfers
  std::vector<Channel> channels;     ///< ranked, largest loss first
};

struct DiagnosisProgress {
  std::string stage;
  std::size_t done = 0, total = 0;
};

struct DiagnosisOptions {
  std::vector<double> durations_ns;
  SimulationOptions simulation;      ///< propagator and tolerance
  /// Levels, precision (s range: the path's). The crossing windows are read off
  /// the points of the gap curve, so the diagnosis keeps a 101-point scan where
  /// the plain gap search starts from 26: with 26 the windows snap to a 0.04 grid
  /// in s and the loss read across them changes (worked example 02).
  GapSearchOptions gap = [] {
    GapSearchOptions g;
    g.coarse_points = 101;
    return g;
  }();
  OverlapTrackOptions overlap;
  OutcomeOptions outcome;
  /// The populations around a crossing are read where the gap has opened to this
  /// many times Delta_min (or at the gap maximum towards a neighbouring minimum).
  double window_factor = 5.0;
  double target_loss = 0.01;         ///< the loss per crossing the verdicts size durations for
  /// A crossing window wider than this fraction of the path's s range is "broad".
  double broad_window_fraction = 0.5;
  /// Longest Landau-Zener duration that is checked by simulation (0: no checks).
  double check_max_ns = 10000.0;
  /// Whether the user chose sigma_h and sigma_J (false: illustrative defaults;
  /// the verdicts say so).
  bool control_sigma_h_given = true, control_sigma_j_given = true;
  std::optional<ControlEnsembleOptions> control;  ///< Monte Carlo over control errors, when set
  bool control_gaps = true;          ///< also locate Delta_min, s* of every perturbed problem
  /// Propagator tolerance of the perturbed anneals (unset: the same as the
  /// unperturbed ones, so that sigma = 0 reproduces them bit for bit).
  std::optional<double> control_tolerance;
  std::function<void(const DiagnosisProgress&)> progress;
};

struct Diagnosis {
  GroundManifold ground;
  MinimumGapReport gap;
  OverlapTrack overlap;
  std::vector<AvoidedCrossing> crossings;  ///< interior gap minima by s, then an end gap when the smallest gap sits at an end
  std::vector<DurationDiagnosis> runs;     ///< one per duration, in the order given
  std::optional<ControlEnsemble> control;
  bool control_sigma_h_given = true, control_sigma_j_given = true;
  double target_loss = 0.01, check_max_ns = 0, broad_window_fraction = 0.5, window_factor = 5.0;
  /// p and gap of the unperturbed problem in the ensemble's own terms (for comparison).
  std::vector<double> durations_ns;
};

/// "sigma_h = 0.03, sigma_J = 0.03 (absolute), the illustrative defaults, ..."
/// as the verdicts and the report say it (names the defaults as such).
std::string control_sigma_phrase(const Diagnosis& d);

/// Landau-Zener sweep rate of a crossing passed with ds/dt (1/ns): v = alpha |ds/dt|,
/// with alpha = sqrt(Delta_min * curvature) the diabatic slope of the hyperbola
/// gap(s) = sqrt(Delta^2 + alpha^2 (s - s*)^2) fitted at the minimum.
double crossing_diabatic_slope_ghz(const GapMinimum& m);

/// The path must be non-decreasing in s (forward anneal, pauses allowed);
/// throws InputError naming the schedule otherwise.
Diagnosis diagnose_anneal(const IsingProblem& problem, const Schedule& schedule, const DiagnosisOptions& options);

/// The same path with waypoints added where s(t) first reaches each value in
/// `s_values` (the path itself does not change; observers are called there).
AnnealPath with_waypoints_at(const AnnealPath& path, const std::vector<double>& s_values);

}  // namespace gapwise
