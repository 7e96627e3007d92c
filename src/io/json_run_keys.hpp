#pragma once
// Keys that several --json summaries share, written by one function each so
// that they are named the same everywhere (io/json_summary for the format).
#include <string>

#include "io/json_summary.hpp"
#include "problem/classical_spectrum.hpp"

namespace gapwise {

/// The input files of a run, as given: `problem_file`, `schedule_file`.
void put_input_files(toml::table& t, const std::string& problem_file, const std::string& schedule_file);
/// The classical ground manifold of the problem: `ground_energy`, `ground_degeneracy`.
void put_ground_manifold(toml::table& t, const GroundManifold& ground);
/// How the anneals were propagated: `propagator`, `tolerance`, `p_only`.
void put_propagation(toml::table& t, const std::string& propagator, double tolerance, bool p_only);

}  // namespace gapwise
