#pragma once
// Checks of keyword arguments of the module's functions. The limits and texts
// are the command line's (io/value_limits.hpp, one place for both); only the
// place differs: "gapwise.<function>" with the keyword as key, e.g.
// "gapwise.anneal: key 'tolerance': ...".
#include <string>
#include <vector>

#include "io/input_error.hpp"
#include "io/value_limits.hpp"

namespace gapwise::python {

/// The place of keyword `key` of gapwise.<function>.
SourcePlace keyword_place(const std::string& function, const std::string& key);

void check_tolerance_arg(const std::string& function, double tolerance, const std::string& key = "tolerance");
void check_target_arg(const std::string& function, double target);
void check_threads_arg(const std::string& function, long long threads);
void check_propagator_arg(const std::string& function, const std::string& name);
void check_count_arg(const std::string& function, const std::string& key, long long value, const CountLimit& limit);
/// Durations in ns, each finite, positive and within the schedule's limit.
void check_durations_arg(const std::string& function, const std::vector<double>& durations_ns);

}  // namespace gapwise::python
