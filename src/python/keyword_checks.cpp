#include "python/keyword_checks.hpp"

#include <algorithm>

#include <fmt/format.h>

#include "dynamics/propagator.hpp"
#include "schedule/schedule.hpp"

namespace gapwise::python {

SourcePlace keyword_place(const std::string& function, const std::string& key) {
  return {"gapwise." + function, 0, 0, key};
}

void check_tolerance_arg(const std::string& function, double tolerance, const std::string& key) {
  check_tolerance_value(tolerance, keyword_place(function, key));
}

void check_target_arg(const std::string& function, double target) {
  check_target_value(target, keyword_place(function, "target"));
}

void check_threads_arg(const std::string& function, long long threads) {
  check_threads_value(threads, keyword_place(function, "threads"));
}

void check_propagator_arg(const std::string& function, const std::string& name) {
  const auto names = propagator_names();
  if (std::find(names.begin(), names.end(), name) == names.end())
    throw InputError(keyword_place(function, "propagator"), fmt::format("unknown propagator \"{}\"", name),
                     fmt::format("use one of {}", fmt::join(names, ", ")));
}

void check_count_arg(const std::string& function, const std::string& key, long long value, const CountLimit& limit) {
  check_count_value(value, limit, keyword_place(function, key));
}

void check_durations_arg(const std::string& function, const std::vector<double>& durations_ns) {
  if (durations_ns.empty())
    throw InputError(keyword_place(function, "durations_ns"), "no durations given", "give at least one duration in ns");
  for (double t : durations_ns) check_duration_ns(t, keyword_place(function, "durations_ns"));
}

}  // namespace gapwise::python
