#include "python/keyword_checks.hpp"

#include <algorithm>

#include <fmt/format.h>

#include "dynamics/propagator.hpp"
#include "io/input_error.hpp"
#include "schedule/schedule.hpp"

namespace gapwise::python {
namespace {
SourcePlace keyword(const std::string& function, const std::string& key) { return {"gapwise." + function, 0, 0, key}; }
}  // namespace

void check_tolerance_arg(const std::string& function, double tolerance) {
  if (!(tolerance >= 1e-12 && tolerance <= 1e-2))
    throw InputError(keyword(function, "tolerance"), fmt::format("tolerance {} is out of range", tolerance),
                     "use a value between 1e-12 and 1e-2 (default 1e-6)");
}

void check_target_arg(const std::string& function, double target) {
  if (!(target > 0.0 && target < 1.0))
    throw InputError(keyword(function, "target"), fmt::format("target {} is not inside (0, 1)", target),
                     "give a success probability such as 0.99");
}

void check_propagator_arg(const std::string& function, const std::string& name) {
  const auto names = propagator_names();
  if (std::find(names.begin(), names.end(), name) == names.end())
    throw InputError(keyword(function, "propagator"), fmt::format("unknown propagator \"{}\"", name),
                     fmt::format("use one of {}", fmt::join(names, ", ")));
}

void check_count_arg(const std::string& function, const std::string& key, long long value, long long lo, long long hi) {
  if (value < lo || value > hi)
    throw InputError(keyword(function, key), fmt::format("{} = {} is out of range", key, value),
                     fmt::format("give {} to {}", lo, hi));
}

void check_durations_arg(const std::string& function, const std::vector<double>& durations_ns) {
  if (durations_ns.empty())
    throw InputError(keyword(function, "durations_ns"), "no durations given", "give at least one duration in ns");
  for (double t : durations_ns) check_duration_ns(t, keyword(function, "durations_ns"));
}

}  // namespace gapwise::python
