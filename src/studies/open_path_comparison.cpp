#include "studies/open_path_comparison.hpp"

#include <algorithm>
#include <cmath>

namespace gapwise {

OpenPathComparison compare_paths_open(const IsingProblem& problem, const std::vector<ShapeCandidate>& candidates,
                                      const ShapeComparison& closed, const OhmicBath& bath,
                                      const OpenPathOptions& o) {
  const TransverseIsingHamiltonian H(problem);
  const GroundManifold gm = find_ground_manifold(problem, H.diagonal());
  OpenPathComparison r;
  r.names = closed.names;
  r.durations_ns = closed.durations_ns;
  const std::size_t ni = r.names.size(), nj = r.durations_ns.size(), total = ni * nj;
  for (std::size_t i = 0; i < ni; ++i) {
    const Schedule& sch = candidates[i].schedule;
    const QuantumState psi0 = initial_state(H, sch, sch.path_for(1.0));
    for (std::size_t j = 0; j < nj; ++j) {
      const double t = r.durations_ns[j];
      OpenPathRun run;
      run.duration_ns = t;
      run.closed_probability = closed.at(i, j).ground_probability;
      OpenPropagatorOptions po;
      po.tolerance = o.tolerance;
      po.method = o.method;
      const std::size_t done = r.runs.size();
      if (o.progress) {
        o.progress(done, total, {});
        po.progress = [&, done](const PropagationProgress& p) { o.progress(done, total, p); };
      }
      run.open = simulate_open_anneal(H, gm, sch.scales, sch.path_for(t), psi0, bath, po);
      run.closed_tts = time_to_solution(t, std::clamp(run.closed_probability, 0.0, 1.0), o.target_probability);
      run.open_tts = time_to_solution(t, std::clamp(run.open.ground_probability, 0.0, 1.0), o.target_probability);
      r.runs.push_back(std::move(run));
    }
  }
  r.best_closed.assign(nj, 0);
  r.best_open.assign(nj, 0);
  for (std::size_t j = 0; j < nj; ++j)
    for (std::size_t i = 1; i < ni; ++i) {
      if (r.at(i, j).closed_probability > r.at(r.best_closed[j], j).closed_probability) r.best_closed[j] = i;
      if (r.at(i, j).open.ground_probability > r.at(r.best_open[j], j).open.ground_probability) r.best_open[j] = i;
    }
  r.best_tts_closed = r.best_tts_open = r.runs.size();
  double bc = INFINITY, bo = INFINITY;
  for (std::size_t k = 0; k < r.runs.size(); ++k) {
    if (r.runs[k].closed_tts.tts_ns < bc) bc = r.runs[k].closed_tts.tts_ns, r.best_tts_closed = k;
    if (r.runs[k].open_tts.tts_ns < bo) bo = r.runs[k].open_tts.tts_ns, r.best_tts_open = k;
  }
  return r;
}

}  // namespace gapwise
