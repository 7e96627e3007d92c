#include "io/json_run_keys.hpp"

namespace gapwise {

void put_input_files(toml::table& t, const std::string& problem_file, const std::string& schedule_file) {
  put(t, "problem_file", problem_file);
  put(t, "schedule_file", schedule_file);
}

void put_ground_manifold(toml::table& t, const GroundManifold& ground) {
  put(t, "ground_energy", ground.energy);
  put(t, "ground_degeneracy", static_cast<long long>(ground.degeneracy()));
}

void put_propagation(toml::table& t, const std::string& propagator, double tolerance, bool p_only) {
  put(t, "propagator", propagator);
  put(t, "tolerance", tolerance);
  put(t, "p_only", p_only);
}

}  // namespace gapwise
