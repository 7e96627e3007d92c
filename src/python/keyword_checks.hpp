#pragma once
// Checks of keyword arguments of the module's functions, with the command line's
// limits; a refusal is an InputError whose place is "gapwise.<function>" and
// whose key is the keyword, e.g. "gapwise.anneal: key 'tolerance': ...".
#include <string>
#include <vector>

namespace gapwise::python {

void check_tolerance_arg(const std::string& function, double tolerance);
void check_target_arg(const std::string& function, double target);
void check_propagator_arg(const std::string& function, const std::string& name);
void check_count_arg(const std::string& function, const std::string& key, long long value, long long lo, long long hi);
/// Durations in ns, each finite, positive and within the schedule's limit.
void check_durations_arg(const std::string& function, const std::vector<double>& durations_ns);

}  // namespace gapwise::python
