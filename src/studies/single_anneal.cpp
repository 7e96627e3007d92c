#include "studies/single_anneal.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <memory>

#include "frame/frame_point_cache.hpp"

namespace gapwise {

SpinFlipSector single_anneal_sector(const IsingProblem& problem, const Schedule& schedule) {
  const bool even = !problem.has_fields() && schedule.start.kind == StartKind::Ground;
  return even ? SpinFlipSector::Even : SpinFlipSector::Full;
}

SingleAnneal run_single_anneal(const IsingProblem& problem, const Schedule& schedule, const AnnealPath& path,
                               const SingleAnnealOptions& o) {
  SingleAnneal a;
  const TransverseIsingHamiltonian H(problem);
  a.ground = find_ground_manifold(problem, H.diagonal());
  const QuantumState psi0 = initial_state(H, schedule, path);

  SimulationOptions sim;
  // The run and its accuracy re-run share the solved eigenpairs (frame propagator only).
  sim.propagation.frame_cache = std::make_shared<FramePointCache>();
  sim.propagator = o.propagator;
  sim.choice.frame_above_ns = o.frame_above_ns;
  sim.propagation.tolerance = o.tolerance;
  if (o.p_only) sim.propagation.others_factor = std::numeric_limits<double>::infinity();
  sim.samples_per_piece = std::max(0, o.trace_points);
  sim.top_outcomes = o.top;
  sim.observe_s = o.observe_s;
  TraceObserver trace(H, a.ground);
  // Populations of the lowest levels of H(s), at the requested s only (one
  // eigenproblem each).
  LevelPopulationOptions lpo;
  lpo.levels = std::max(o.levels, 1);
  lpo.requested_only = true;
  lpo.sector = a.sector = single_anneal_sector(problem, schedule);
  std::optional<LevelPopulationObserver> pops;
  std::vector<AnnealObserver*> observers{&trace};
  if (o.levels > 0) observers.push_back(&pops.emplace(H, lpo));

  SingleAnnealStage stage;
  stage.runs = o.check ? 2 : 1;
  if (o.progress) sim.propagation.progress = [&](const PropagationProgress& pp) { o.progress(stage, pp); };
  a.result = simulate_anneal(H, a.ground, schedule.scales, path, psi0, sim, observers);
  if (o.check) {
    SimulationOptions tight = sim;
    tight.propagation.tolerance = o.tolerance / 10.0;
    tight.top_outcomes = 0;
    stage.run = 2;
    a.delta_p = std::abs(simulate_anneal(H, a.ground, schedule.scales, path, psi0, tight).ground_probability -
                         a.result.ground_probability);
  }
  if (o.bath) {
    OpenPropagatorOptions oo = o.open;
    stage.run = 0;
    stage.truncated = resolve_open_method(oo.method, problem.qubits) == "ame-truncated";
    if (o.progress) oo.progress = [&](const PropagationProgress& pp) { o.progress(stage, pp); };
    a.open = simulate_open_anneal(H, a.ground, schedule.scales, path, psi0, *o.bath, oo);
  }
  a.accuracy = check_accuracy(a.result, o.tolerance, a.delta_p);
  a.trace = trace.rows();
  if (pops) a.level_rows = pops->rows();
  return a;
}

}  // namespace gapwise
