#include "studies/duration_sweep.hpp"

#include <algorithm>
#include <cmath>
#include <exception>
#include <mutex>

#include <fmt/format.h>

#include "frame/frame_point_cache.hpp"
#include "io/input_error.hpp"
#include "platform/thread_count.hpp"

#ifdef _OPENMP
#include <omp.h>
#endif

namespace gapwise {

AnnealSetup::AnnealSetup(IsingProblem p, Schedule s, SimulationOptions o)
    : problem(std::move(p)),
      schedule(std::move(s)),
      options(std::move(o)),
      hamiltonian(problem),
      ground(find_ground_manifold(problem, hamiltonian.diagonal())),
      start(initial_state(hamiltonian, schedule, schedule.path_for(1.0))) {
  options.top_outcomes = 0;
  options.samples_per_piece = 0;
  // The instantaneous eigenpairs along s do not depend on the duration: every
  // anneal of this setup shares one store of them (used by the frame propagator).
  if (!options.propagation.frame_cache) options.propagation.frame_cache = std::make_shared<FramePointCache>();
  // With "auto", the timings that decide between split and frame are measured once per setup.
  if (!options.cost_ledger) options.cost_ledger = std::make_shared<PropagatorCostLedger>();
}

DurationPoint anneal_for_duration(const AnnealSetup& setup, double duration_ns) {
  const AnnealPath path = setup.schedule.path_for(duration_ns);
  const AnnealResult r =
      simulate_anneal(setup.hamiltonian, setup.ground, setup.schedule.scales, path, setup.start, setup.options);
  DurationPoint p;
  p.duration_ns = duration_ns;
  p.ground_probability = r.ground_probability;
  p.norm_drift = r.norm_drift;
  p.steps = r.stats.steps;
  p.hamiltonian_applications = r.stats.hamiltonian_applications;
  p.wall_seconds = r.wall_seconds;
  p.propagator_used = r.propagator;
  return p;
}

std::vector<double> log_spaced_durations(double first, double last, int count) {
  if (!(first > 0.0) || !std::isfinite(first) || !std::isfinite(last))
    throw InputError({"--durations", 0, 0, "--durations"}, fmt::format("the first duration {} ns is not positive", first),
                     "give durations > 0 ns");
  if (!(last >= first))
    throw InputError({"--durations", 0, 0, "--durations"}, fmt::format("the last duration {} ns is below the first {} ns", last, first),
                     "give the range as log:FIRST:LAST:COUNT with FIRST <= LAST");
  if (count < 1)
    throw InputError({"--durations", 0, 0, "--durations"}, fmt::format("{} durations requested", count), "ask for at least one");
  if (count == 1) return {first};
  std::vector<double> t(static_cast<std::size_t>(count));
  const double l0 = std::log(first), l1 = std::log(last);
  for (int k = 0; k < count; ++k) t[static_cast<std::size_t>(k)] = std::exp(l0 + (l1 - l0) * k / (count - 1));
  t.front() = first;  // exact ends, whatever exp(log(x)) rounds to
  t.back() = last;
  return t;
}

JournalLayout duration_journal_layout() {
  return {"duration-sweep",
          {"duration_ns"},
          {"ground_probability", "norm_drift", "steps", "hamiltonian_applications", "wall_seconds", "propagator_code"}};
}

DurationEvaluator::DurationEvaluator(const AnnealSetup& setup, ResultJournal* journal)
    : setup_(setup), journal_(journal) {
  if (!journal_) return;
  for (const auto& [key, v] : journal_->records()) {
    DurationPoint p;
    p.duration_ns = key[0];
    p.ground_probability = v[0];
    p.norm_drift = v[1];
    p.steps = static_cast<long>(v[2]);
    p.hamiltonian_applications = static_cast<long>(v[3]);
    p.wall_seconds = v[4];
    p.propagator_used = propagator_name_of_code(v[5]);
    p.resumed = true;
    known_[p.duration_ns] = p;
  }
}

std::vector<DurationPoint> DurationEvaluator::evaluate(const std::vector<double>& durations, int threads) {
  std::vector<double> todo;
  for (double d : durations) {
    if (!(d > 0.0) || !std::isfinite(d))
      throw InputError({"--durations", 0, 0, "--durations"}, fmt::format("duration {} ns is not positive", d), "give durations > 0 ns");
    if (!known_.count(d)) todo.push_back(d);
  }
  std::sort(todo.begin(), todo.end(), std::greater<>());  // longest first: the cost grows with t_f
  todo.erase(std::unique(todo.begin(), todo.end()), todo.end());

  if (!todo.empty() && on_batch) on_batch(todo);
  std::mutex lock;
  std::exception_ptr failure;
  bool stop = false;
  const long n = static_cast<long>(todo.size());
#ifdef _OPENMP
  const int nthreads = thread_count_or_default(threads);
#pragma omp parallel for schedule(dynamic, 1) num_threads(nthreads)
#endif
  for (long k = 0; k < n; ++k) {
    {
      std::lock_guard<std::mutex> g(lock);
      if (stop) continue;
    }
    try {
      const DurationPoint p = anneal_for_duration(setup_, todo[static_cast<std::size_t>(k)]);
      std::lock_guard<std::mutex> g(lock);
      if (stop) continue;
      if (journal_)
        journal_->append({p.duration_ns}, {p.ground_probability, p.norm_drift, static_cast<double>(p.steps),
                                           static_cast<double>(p.hamiltonian_applications), p.wall_seconds,
                                           propagator_code(p.propagator_used)});
      known_[p.duration_ns] = p;
      ++simulated_;
      if (on_finished) on_finished(p);
    } catch (...) {
      std::lock_guard<std::mutex> g(lock);
      if (!failure) failure = std::current_exception();
      stop = true;
    }
  }
  (void)threads;
  if (failure) std::rethrow_exception(failure);
  std::vector<DurationPoint> out;
  out.reserve(durations.size());
  for (double d : durations) out.push_back(known_.at(d));
  return out;
}

DurationPoint DurationEvaluator::evaluate(double d) { return evaluate(std::vector<double>{d}, 1).front(); }

std::vector<DurationPoint> sweep_durations(const AnnealSetup& setup, const std::vector<double>& durations, int threads) {
  DurationEvaluator ev(setup);
  return ev.evaluate(durations, threads);
}

}  // namespace gapwise
