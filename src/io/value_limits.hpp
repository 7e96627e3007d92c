#pragma once
// The limits of the values a user gives to a run, with their refusal texts, in
// one place: the command line's options (cli/option_checks.cpp and the command
// files) and the Python module's keywords (python/keyword_checks.cpp) both
// check through these, so a limit or its message cannot drift between them.
// Each check throws InputError at `place` (the option, or the module's
// "gapwise.<function>" with the keyword as key); problem and fix are the same.
//
//   check_count_value(o.top, kTopOutcomes, {"--top", 0, 0, "--top"});
#include "io/input_error.hpp"

namespace gapwise {

/// A whole-number setting: lo to hi, named `what` in the message.
struct CountLimit {
  long long lo, hi;
  const char* what;
};

inline constexpr double kMinTolerance = 1e-12, kMaxTolerance = 1e-2;  ///< propagator tolerance (the fix text spells them)
inline constexpr long long kMaxThreads = 1024;                       ///< 0 means one per core
inline constexpr CountLimit kTracePoints{0, 10000, "observations per piece"};
inline constexpr CountLimit kTopOutcomes{0, 1000, "outcome count"};
inline constexpr CountLimit kBisectionProbes{1, 64, "probes per round"};
inline constexpr CountLimit kSpectrumLevels{2, 64, "levels followed"};    ///< gap searches, diagnosis
inline constexpr CountLimit kControlSamples{0, 1000000, "control-error samples"};

/// A target success probability, inside (0, 1).
void check_target_value(double p, const SourcePlace& place);
/// A propagator tolerance, in [kMinTolerance, kMaxTolerance].
void check_tolerance_value(double tolerance, const SourcePlace& place);
/// Threads: 0 (one per core) to kMaxThreads.
void check_threads_value(long long threads, const SourcePlace& place);
/// A control-error standard deviation: finite and >= 0.
void check_sigma_value(double sigma, const SourcePlace& place);
/// A whole number within `limit`.
void check_count_value(long long value, const CountLimit& limit, const SourcePlace& place);
/// The relative width at which a bisection stops, inside (0, 1).
void check_resolution_value(double resolution, const SourcePlace& place);
/// The factor within which a prediction and the simulation must agree: finite, > 1.
void check_agreement_value(double factor, const SourcePlace& place);
/// The diagnosis's target loss, inside (0, 1).
void check_target_loss_value(double loss, const SourcePlace& place);
/// The diagnosis's longest simulated check, in ns: >= 0 (0 skips the checks).
void check_max_check_ns_value(double ns, const SourcePlace& place);
/// The diagnosis's crossing-window factor: finite, > 0.
void check_window_value(double factor, const SourcePlace& place);

}  // namespace gapwise
