#include "studies/open_duration_scan.hpp"

#include <algorithm>

namespace gapwise {

std::vector<OpenDurationPoint> open_duration_scan(const AnnealSetup& setup, const OhmicBath& bath,
                                                  const std::vector<double>& durations_ns,
                                                  const OpenPropagatorOptions& options, double target, const std::function<double(double)>& closed_p,
                                                  const std::function<void(std::size_t done)>& on_point) {
  std::vector<OpenDurationPoint> rows;
  for (double t : durations_ns) {
    OpenDurationPoint row;
    row.duration_ns = t;
    row.closed_probability = closed_p(t);
    const AnnealPath path = setup.schedule.path_for(t);
    row.open = simulate_open_anneal(setup.hamiltonian, setup.ground, setup.schedule.scales, path, setup.start, bath,
                                    options);
    row.closed_tts = time_to_solution(t, std::clamp(row.closed_probability, 0.0, 1.0), target);
    row.open_tts = time_to_solution(t, std::clamp(row.open.ground_probability, 0.0, 1.0), target);
    rows.push_back(std::move(row));
    if (on_point) on_point(rows.size());
  }
  return rows;
}

std::vector<OpenDurationPoint> open_duration_scan(const AnnealSetup& setup, const OhmicBath& bath,
                                                  const std::vector<double>& durations_ns, double tolerance,
                                                  double target, const std::function<double(double)>& closed_p,
                                                  const std::function<void(std::size_t done)>& on_point) {
  return open_duration_scan(setup, bath, durations_ns, OpenPropagatorOptions{.tolerance = tolerance}, target, closed_p,
                            on_point);
}

}  // namespace gapwise
