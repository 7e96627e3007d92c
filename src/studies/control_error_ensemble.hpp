#pragma once
// Control-error sensitivity by Monte Carlo: the programmed fields and couplings
// are perturbed by independent Gaussian errors (absolute, or relative to each
// term's size), and every perturbed problem is analysed again: does its
// classical ground state still lie in the intended ground manifold, what are its
// minimum gap and s*, and with what probability does an anneal of it end in
// the intended ground manifold.
//
// Reproducibility: sample k draws its errors from its own generator, seeded from
// (seed, k) through std::seed_seq (fully specified by the C++ standard) into
// boost::random::mt19937_64, with Boost.Random's normal distribution. Samples
// are independent, so the results are bit-identical for any thread count and a
// run can be continued sample by sample.
//
//   ControlErrorModel m{.sigma_h = 0.05, .sigma_j = 0.05, .relative = false};
//   ControlEnsembleOptions opt{.model = m, .samples = 500, .seed = 7};
//   ControlEnsemble e = run_control_error_ensemble(problem, ground, opt,
//       [&](const IsingProblem& perturbed, ControlSample& out) {
//         out.p_intended = {simulated p for each duration};   // optional
//       });
//   e.ground_change_rate;  quantile(e.column(&ControlSample::delta_min_ghz), 0.5);
#include <cstdint>
#include <functional>
#include <limits>
#include <string>
#include <vector>

#include "problem/classical_spectrum.hpp"

#include "studies/ensemble_statistics.hpp"  // quantile()

namespace gapwise {

struct ControlErrorModel {
  double sigma_h = 0;     ///< standard deviation of the error on each h_i
  double sigma_j = 0;     ///< standard deviation of the error on each programmed J_ij
  /// When true the sigmas are fractions of |h_i| and |J_ij| (a zero term stays
  /// zero); otherwise absolute, in the problem's energy units. Couplers that are
  /// not programmed are never perturbed.
  bool relative = false;
};

/// The problem with the errors of sample `sample`: h_0..h_{n-1} are drawn first,
/// then the couplings in their stored order.
IsingProblem perturb_problem(const IsingProblem& problem, const ControlErrorModel& model, std::uint64_t seed,
                             std::uint64_t sample);

inline constexpr double kNotComputed = std::numeric_limits<double>::quiet_NaN();

struct ControlSample {
  std::uint64_t index = 0;
  /// min over states outside the intended ground manifold of the perturbed
  /// energy, minus the min over states inside it: > 0 while an intended state
  /// is still the perturbed ground state.
  double classical_margin = 0;
  /// True when the perturbed ground state is not (only) an intended one: margin <= tolerance.
  bool ground_changed = false;
  double delta_min_ghz = kNotComputed;  ///< filled by the evaluator, when asked for
  double s_star = kNotComputed;
  std::vector<double> p_intended;       ///< per duration: final probability of the intended ground manifold
};

struct ControlEnsembleOptions {
  ControlErrorModel model;
  std::uint64_t samples = 200;
  std::uint64_t seed = 1;
  int threads = 0;  ///< 0: OpenMP's default
  /// Called now and then with (done, total) from one thread at a time.
  std::function<void(std::uint64_t, std::uint64_t)> progress;
};

/// Fills the costly parts of a sample (gap, dynamics) for a perturbed problem;
/// the classical part is already filled when it is called. Must be thread-safe.
using ControlSampleEvaluator = std::function<void(const IsingProblem& perturbed, ControlSample& sample)>;

struct ControlEnsemble {
  ControlEnsembleOptions options;
  std::vector<ControlSample> samples;  ///< in index order
  double ground_change_rate = 0;       ///< fraction of samples with ground_changed
  double ground_change_stderr = 0;     ///< binomial standard error sqrt(r (1 - r) / N)

  /// One field of every sample, in index order (NaN where not computed).
  std::vector<double> column(double ControlSample::*field) const;
  /// p_intended[duration] of every sample.
  std::vector<double> p_column(std::size_t duration) const;
};

/// Throws std::invalid_argument for negative sigmas or zero samples; rethrows the
/// first exception an evaluator threw (after all threads stop).
ControlEnsemble run_control_error_ensemble(const IsingProblem& problem, const GroundManifold& intended,
                                           const ControlEnsembleOptions& options,
                                           const ControlSampleEvaluator& evaluate = {});

/// Margin and ground_changed of one perturbed problem against the intended manifold.
void classify_ground_change(const IsingProblem& perturbed, const GroundManifold& intended, ControlSample& sample);

}  // namespace gapwise
