#include "io/value_limits.hpp"

#include <cmath>

#include <fmt/format.h>

namespace gapwise {

void check_target_value(double p, const SourcePlace& place) {
  if (!(p > 0.0 && p < 1.0))
    throw InputError(place, fmt::format("target {} is not inside (0, 1)", p), "give a success probability such as 0.99");
}

void check_tolerance_value(double tolerance, const SourcePlace& place) {
  if (!(tolerance >= kMinTolerance && tolerance <= kMaxTolerance))
    throw InputError(place, fmt::format("tolerance {} is out of range", tolerance),
                     "use a value between 1e-12 and 1e-2 (default 1e-6)");
}

void check_threads_value(long long threads, const SourcePlace& place) {
  if (threads < 0 || threads > kMaxThreads)
    throw InputError(place, fmt::format("{} threads", threads),
                     fmt::format("give 1 to {} threads, or 0 for one per core (OMP_NUM_THREADS)", kMaxThreads));
}

void check_sigma_value(double sigma, const SourcePlace& place) {
  if (!(sigma >= 0.0) || !std::isfinite(sigma))
    throw InputError(place, fmt::format("control-error sigma {} is not a finite number >= 0", sigma),
                     "give a standard deviation >= 0 (0 switches that error off), e.g. 0.03");
}

void check_count_value(long long value, const CountLimit& limit, const SourcePlace& place) {
  if (value < limit.lo || value > limit.hi)
    throw InputError(place, fmt::format("{} {} is outside {} to {}", limit.what, value, limit.lo, limit.hi),
                     fmt::format("give a whole number from {} to {}", limit.lo, limit.hi));
}

void check_resolution_value(double resolution, const SourcePlace& place) {
  if (!(resolution > 0.0 && resolution < 1.0))
    throw InputError(place, fmt::format("resolution {} is not inside (0, 1)", resolution),
                     "give the relative width at which bisection stops, e.g. 0.005");
}

void check_agreement_value(double factor, const SourcePlace& place) {
  if (!(factor > 1.0) || !std::isfinite(factor))
    throw InputError(place, fmt::format("agreement factor {} is not above 1", factor),
                     "give the factor within which 1 - p of a prediction and of the simulation must agree, e.g. 2");
}

void check_target_loss_value(double loss, const SourcePlace& place) {
  if (!(loss > 0 && loss < 1))
    throw InputError(place, fmt::format("target loss {} is outside (0, 1)", loss), "give a loss such as 0.01");
}

void check_max_check_ns_value(double ns, const SourcePlace& place) {
  if (!(ns >= 0))
    throw InputError(place, fmt::format("{} ns is negative", ns), "give a duration in ns, or 0 to skip the simulated checks");
}

void check_window_value(double factor, const SourcePlace& place) {
  if (!(factor > 0) || !std::isfinite(factor))
    throw InputError(place, fmt::format("window factor {} is not a positive number", factor), "give a factor such as 5");
}

}  // namespace gapwise
