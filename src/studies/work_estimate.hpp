#pragma once
// How much work a run asks for, estimated before it starts, and the one limit
// every command holds it to: a run that would take days is refused (exit 2)
// with the estimate in the message, unless the user lifts the limit
// (`--allow-long` on every command).
//
// The estimate follows what the split propagators do
// (split_operator_propagator.cpp): their first step is about
// 1 / (B_max x largest single-flip energy change + 2 A_max) ns, so the time
// steps of one anneal grow with the largest energy times the duration, and
// each step passes over all 2^n amplitudes about n + 2 times. Spectrum points
// and generated instances are counted too. It is an order-of-magnitude
// figure (the adaptive grid may double a few times; a tighter tolerance needs
// more steps), good for telling an hour from a month, not for scheduling.
//
//   WorkEstimate w = anneal_work(problem, schedule.scales, 1e9);   // one anneal of one second
//   w += anneal_work(problem, schedule.scales, 100.0, 50);          // fifty more of 100 ns
//   check_work_limit(w, allow_long, {"--durations", 0, 0, "--durations"});  // InputError above the limit
#include <string>

#include "io/input_error.hpp"
#include "problem/ising_problem.hpp"
#include "schedule/energy_scales.hpp"

namespace gapwise {

struct WorkEstimate {
  double anneals = 0;          ///< simulated anneals
  double time_steps = 0;       ///< propagation steps of all anneals together
  double spectrum_points = 0;  ///< eigenproblems (gap searches)
  double instances = 0;        ///< generated problem instances
  double operations = 0;       ///< amplitude updates, all of the above together: the unit of the limit

  WorkEstimate& operator+=(const WorkEstimate& other);
  /// Rough time on one core of the machine the constant was measured on (see the .cpp).
  double core_seconds() const;
  /// "about 2.6e+12 time steps in 1 anneal over 2^3 amplitudes, ..." (the parts that are not zero).
  std::string describe() const;
};

/// The propagators' step rate in GHz: B_max x (largest single-flip change of the
/// problem energy, bounded by 2 (|h_i| + sum_j |J_ij|)) + 2 A_max.
double propagation_rate_ghz(const IsingProblem& problem, const EnergyScales& scales);

/// `count` anneals of `duration_ns` each (a pause or dwell included in the duration).
WorkEstimate anneal_work(const IsingProblem& problem, const EnergyScales& scales, double duration_ns,
                         double count = 1.0);
/// The same for a problem whose fields and couplings carry random control errors of
/// standard deviation sigma_h, sigma_j (relative: fractions of |h_i|, |J_ij|), taken at 5 sigma.
WorkEstimate perturbed_anneal_work(const IsingProblem& problem, const EnergyScales& scales, double sigma_h,
                                   double sigma_j, bool relative, double duration_ns, double count = 1.0);
/// `points` eigenproblems for the lowest `levels` levels of an n-qubit problem.
WorkEstimate spectrum_work(int qubits, int levels, double points);
/// `count` generated instances of `qubits` qubits.
WorkEstimate instance_work(int qubits, double count);

/// The limit: roughly 13 hours of one core on the machine the constants were measured on (see the .cpp).
/// Everything in the test suite, the worked examples and the README tour stays below it.
inline constexpr double kWorkLimitOperations = 2e13;

/// Throws InputError at `place` when w is above kWorkLimitOperations and !allow_long;
/// the message holds the estimate and names the flag that lifts the limit.
void check_work_limit(const WorkEstimate& w, bool allow_long, const SourcePlace& place);

}  // namespace gapwise
