#pragma once
// The checks that make a simulated number trustworthy, run after every anneal:
// norm drift, the propagator's own accumulated error estimate, and (when the
// run was repeated at a tighter tolerance) the measured change of the
// ground-state probability, each compared with the requested tolerance.
// The error estimate (summed local errors, pessimistic) is checked only when no
// re-run was made: a measured |dp| supersedes it. Commands print every failed
// check as a warning; with --strict they exit with
// kExitAccuracy (3) after writing their outputs (marked accuracy_ok = 0).
//
//   AnnealResult r = simulate_anneal(...);
//   auto failed = check_accuracy(r, 1e-6, delta_p);
//   for (const auto& f : failed) std::cerr << "gapwise: warning: " << f.message << "\n";
#include <optional>
#include <string>
#include <vector>

#include "dynamics/anneal_simulation.hpp"

namespace gapwise {

struct AccuracyIssue {
  std::string check;    ///< "norm_drift", "integrator_error_estimate", "convergence_delta_p", "non_finite"
  double value = 0.0;   ///< what was measured (NaN for non_finite)
  double limit = 0.0;   ///< what was allowed
  std::string message;  ///< one line for the user, with the fix
};

/// Every check of `result` that exceeds `tolerance` (empty when all pass).
/// `convergence_delta_p` is |p(tol) - p(tol/10)| when the re-run was done.
std::vector<AccuracyIssue> check_accuracy(const AnnealResult& result, double tolerance,
                                          std::optional<double> convergence_delta_p);

}  // namespace gapwise
