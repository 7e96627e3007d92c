#include "studies/shape_comparison.hpp"

#include <algorithm>
#include <cmath>
#include <exception>
#include <mutex>

#include <fmt/format.h>

#include "io/input_error.hpp"
#include "platform/thread_count.hpp"

#ifdef _OPENMP
#include <omp.h>
#endif

namespace gapwise {

bool same_energy_scales(const EnergyScales& x, const EnergyScales& y) {
  if (x.is_linear_ramp() != y.is_linear_ramp()) return false;
  if (x.is_linear_ramp()) return x.a_max_ghz() == y.a_max_ghz() && x.b_max_ghz() == y.b_max_ghz();
  return x.interpolation() == y.interpolation() && x.table_s() == y.table_s() && x.table_a() == y.table_a() &&
         x.table_b() == y.table_b();
}

SpinFlipSector comparison_sector(const TransverseIsingHamiltonian& h, const std::vector<ShapeCandidate>& cands) {
  bool even = !h.problem().has_fields();
  for (const auto& c : cands) {
    if (!even) break;
    const QuantumState psi = initial_state(h, c.schedule, c.schedule.path_for(1.0));
    for (std::size_t b = 0; even && b < psi.size(); ++b)
      if (std::abs(psi[b] - psi[psi.size() - 1 - b]) > 1e-12) even = false;
  }
  return even ? SpinFlipSector::Even : SpinFlipSector::Full;
}

ShapeComparison compare_shapes(const IsingProblem& problem, const std::vector<ShapeCandidate>& cands,
                               const ShapeComparisonOptions& o) {
  if (cands.empty()) throw InputError({"", 0, 0, "shapes"}, "no paths to compare", "give at least one schedule or shape");
  if (o.durations_ns.empty())
    throw InputError({"--durations", 0, 0, "--durations"}, "no durations given", "give one or more durations in ns");
  for (double d : o.durations_ns)
    if (!(d > 0.0) || !std::isfinite(d))
      throw InputError({"--durations", 0, 0, "--durations"}, fmt::format("duration {} ns is not positive", d), "give durations > 0 ns");
  for (const auto& c : cands)
    if (!same_energy_scales(c.schedule.scales, cands.front().schedule.scales))
      throw InputError({c.schedule.source, 0, 0, "scales"},
                       fmt::format("\"{}\" has other energy scales than \"{}\": that compares hardware, not paths", c.name,
                                   cands.front().name),
                       "give every schedule the same [scales]");

  const TransverseIsingHamiltonian H(problem);
  const GroundManifold gm = find_ground_manifold(problem, H.diagonal());
  ShapeComparison out;
  for (const auto& c : cands) out.names.push_back(c.name);
  out.durations_ns = o.durations_ns;
  const std::size_t nd = o.durations_ns.size();
  out.runs.resize(cands.size() * nd);

  std::vector<QuantumState> starts;
  for (const auto& c : cands) starts.push_back(initial_state(H, c.schedule, c.schedule.path_for(1.0)));
  out.sector = comparison_sector(H, cands);

  std::mutex lock;
  std::exception_ptr failure;
  const long n = static_cast<long>(out.runs.size());
#ifdef _OPENMP
  const int nthreads = thread_count_or_default(o.threads);
#pragma omp parallel for schedule(dynamic, 1) num_threads(nthreads)
#endif
  for (long k = 0; k < n; ++k) {
    try {
      const std::size_t i = static_cast<std::size_t>(k) / nd, j = static_cast<std::size_t>(k) % nd;
      const double T = o.durations_ns[j];
      const AnnealPath path = cands[i].schedule.path_for(T);
      LevelPopulationOptions lo;
      lo.levels = o.levels;
      lo.sector = out.sector;
      lo.min_interval_ns = T / std::max(1, o.population_points);
      lo.min_interval_s = 1.0 / std::max(1, o.population_points);
      lo.final_time_ns = path.duration_ns();
      LevelPopulationObserver pops(H, lo);
      SimulationOptions sim = o.simulation;
      // Offer the observer twice as many points as wanted; it keeps those a
      // stride apart in t or in s.
      const int per_piece = static_cast<int>(std::ceil(2.0 * std::max(1, o.population_points) /
                                                       static_cast<double>(path.pieces())));
      sim.samples_per_piece = std::max(0, per_piece - 1);
      sim.top_outcomes = 0;
      const AnnealResult r = simulate_anneal(H, gm, cands[i].schedule.scales, path, starts[i], sim, {&pops});
      ShapeRun& run = out.runs[static_cast<std::size_t>(k)];
      run.name = cands[i].name;
      run.duration_ns = T;
      run.end_time_ns = path.duration_ns();
      run.ground_probability = r.ground_probability;
      run.norm_drift = r.norm_drift;
      run.tts = time_to_solution(run.end_time_ns, std::clamp(r.ground_probability, 0.0, 1.0), o.target_probability);
      run.populations = pops.rows();
      run.leak = largest_ground_level_leak(run.populations);
      run.steps = r.stats.steps;
      run.wall_seconds = r.wall_seconds;
    } catch (...) {
      std::lock_guard<std::mutex> g(lock);
      if (!failure) failure = std::current_exception();
    }
  }
  if (failure) std::rethrow_exception(failure);
  return out;
}

}  // namespace gapwise
