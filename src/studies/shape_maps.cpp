#include "studies/shape_maps.hpp"

#include <algorithm>
#include <cmath>
#include <exception>
#include <map>
#include <mutex>

#include <fmt/format.h>

#include "dynamics/propagator.hpp"
#include "io/input_error.hpp"
#include "platform/thread_count.hpp"

#ifdef _OPENMP
#include <omp.h>
#endif

namespace gapwise {
namespace {

const std::vector<std::string> kValues{"ground_probability", "start_probability", "norm_drift", "total_ns",
                                       "propagator_code"};

/// Runs every keyed path not yet known (journal or earlier in this call) and
/// returns the values of all of them.
std::map<std::vector<double>, MapPoint> evaluate_paths(const AnnealSetup& setup,
                                                       const std::map<std::vector<double>, AnnealPath>& jobs,
                                                       std::optional<BasisIndex> start_state, ResultJournal* journal,
                                                       int threads, const MapProgress& progress, std::size_t& simulated,
                                                       std::size_t& resumed) {
  std::map<std::vector<double>, MapPoint> out;
  std::vector<std::pair<std::vector<double>, const AnnealPath*>> todo;
  for (const auto& [key, path] : jobs) {
    if (journal)
      if (auto v = journal->find(key)) {
        out[key] = {(*v)[0], (*v)[1], (*v)[2], (*v)[3], true, propagator_name_of_code((*v)[4])};
        ++resumed;
        continue;
      }
    todo.emplace_back(key, &path);
  }
  // Longest runs first, for balance across threads.
  std::stable_sort(todo.begin(), todo.end(),
                   [](const auto& a, const auto& b) { return a.second->duration_ns() > b.second->duration_ns(); });
  std::mutex lock;
  std::exception_ptr failure;
  bool stop = false;
  std::size_t done = 0;
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
      const auto& [key, path] = todo[static_cast<std::size_t>(k)];
      const AnnealResult r =
          simulate_anneal(setup.hamiltonian, setup.ground, setup.schedule.scales, *path, setup.start, setup.options);
      MapPoint p{r.ground_probability, start_state ? std::norm(r.final_state[*start_state]) : 0.0, r.norm_drift,
                 path->duration_ns(), false, r.propagator};
      std::lock_guard<std::mutex> g(lock);
      if (stop) continue;
      if (journal)
        journal->append(key, {p.ground_probability, p.start_probability, p.norm_drift, p.total_ns,
                              propagator_code(p.propagator_used)});
      out[key] = p;
      ++simulated;
      ++done;
      if (progress) progress(done, todo.size());
    } catch (...) {
      std::lock_guard<std::mutex> g(lock);
      if (!failure) failure = std::current_exception();
      stop = true;
    }
  }
  (void)threads;
  if (failure) std::rethrow_exception(failure);
  return out;
}

void check_list(const std::vector<double>& v, double lo, double hi, const std::string& option, const std::string& what) {
  if (v.empty()) throw InputError({option, 0, 0, option}, fmt::format("no {} given", what), fmt::format("give {} values", what));
  for (double x : v)
    if (!(x >= lo && x <= hi))
      throw InputError({option, 0, 0, option}, fmt::format("{} {} is outside [{}, {}]", what, x, lo, hi),
                       fmt::format("give {} between {} and {}", what, lo, hi));
}

/// Re-raise a shape generator's refusal under a command-line option.
template <class F>
AnnealPath shape_or_refuse(F&& make, const std::string& option) {
  try {
    return make();
  } catch (const InputError& e) {
    throw InputError({option, 0, 0, option + " (" + e.place().key + ")"}, e.problem(), e.fix());
  }
}

}  // namespace

std::vector<std::string> propagators_used(const std::vector<MapPoint>& points) {
  std::vector<std::string> out;
  out.reserve(points.size());
  for (const auto& x : points) out.push_back(x.propagator_used.empty() ? "unknown" : x.propagator_used);
  return out;
}

std::string propagator_tally(const std::vector<MapPoint>& points) { return propagator_tally(propagators_used(points)); }

JournalLayout pause_map_journal_layout() { return {"pause-map", {"pause_s", "pause_ns"}, kValues}; }
JournalLayout reverse_map_journal_layout() { return {"reverse-map", {"turn_s", "dwell_ns"}, kValues}; }

double PauseMap::tts_ns(std::size_t i, std::size_t j) const {
  const MapPoint& p = at(i, j);
  return time_to_solution(p.total_ns, std::clamp(p.ground_probability, 0.0, 1.0), options.target_probability).tts_ns;
}

std::map<std::vector<double>, AnnealPath> pause_map_paths(const AnnealSetup& setup, const PauseMapOptions& o) {
  if (setup.schedule.start.kind != StartKind::Ground || setup.schedule.shape.points().front().s != 0.0)
    throw InputError({setup.schedule.source, 0, 0, "path"}, "a pause map needs a forward anneal from s = 0",
                     "use a forward schedule (for reverse anneals see `gapwise reverse-map`)");
  check_list(o.pause_s, 0.0, 1.0, "--at", "pause location s");
  check_list(o.pause_ns, 0.0, 1e12, "--pause-ns", "pause duration (ns)");
  check_duration_ns(o.duration_ns, {"--durations", 0, 0, "--durations"});
  const AnnealPath base = setup.schedule.shape.scaled_to(1.0);
  std::map<std::vector<double>, AnnealPath> jobs;
  auto total = [&](double d) { return o.cost == PauseCost::EqualTotal ? o.duration_ns : o.duration_ns + d; };
  for (double d : o.pause_ns)
    jobs.emplace(pause_map_reference_key(o, d), shape_or_refuse([&] { return base.scaled_to(total(d)); }, "--durations"));
  for (double s : o.pause_s)
    for (double d : o.pause_ns)
      if (d > 0)
        jobs.emplace(std::vector<double>{s, d}, shape_or_refuse([&] {
                       return forward_shape(base, {.pause = PauseSpec{s, d}}, total(d));
                     }, "--pause-ns"));
  return jobs;
}

std::vector<double> pause_map_reference_key(const PauseMapOptions& o, double pause_ns) {
  return {-1.0, o.cost == PauseCost::EqualTotal ? 0.0 : pause_ns};
}

PauseMap pause_map(const AnnealSetup& setup, const PauseMapOptions& o, ResultJournal* journal, const MapProgress& progress) {
  const auto jobs = pause_map_paths(setup, o);
  PauseMap m;
  m.options = o;
  const auto values = evaluate_paths(setup, jobs, std::nullopt, journal, o.threads, progress, m.simulated, m.resumed);
  for (double d : o.pause_ns) m.reference.push_back(values.at(pause_map_reference_key(o, d)));
  for (double s : o.pause_s)
    for (double d : o.pause_ns) m.points.push_back(d > 0 ? values.at({s, d}) : values.at(pause_map_reference_key(o, d)));
  return m;
}

ReverseMap reverse_map(const AnnealSetup& setup, const ReverseMapOptions& o, ResultJournal* journal,
                       const MapProgress& progress) {
  if (setup.schedule.start.kind != StartKind::Classical)
    throw InputError({setup.schedule.source, 0, 0, "path.start_bits"}, "a reverse anneal needs a classical start state",
                     "give --start-bits 0,1,... or a schedule with start_bits");
  check_list(o.turn_s, 0.0, 1.0, "--turn", "turn point s");
  check_list(o.dwell_ns, 0.0, 1e12, "--dwell-ns", "dwell (ns)");
  ReverseMap m;
  m.options = o;
  m.start_state = start_basis_state(setup.schedule, setup.problem.qubits);
  m.start_in_ground_manifold = setup.ground.contains(m.start_state);
  std::map<std::vector<double>, AnnealPath> jobs;
  for (double s : o.turn_s)
    for (double d : o.dwell_ns)
      jobs.emplace(std::vector<double>{s, d}, shape_or_refuse([&] {
                     return reverse_anneal_path({.turn_s = s, .down = o.ramp_ns, .dwell = d, .up = o.ramp_ns});
                   }, o.ramp_ns > 0 ? "--dwell-ns" : "--ramp-ns"));
  const auto values = evaluate_paths(setup, jobs, m.start_state, journal, o.threads, progress, m.simulated, m.resumed);
  for (double s : o.turn_s)
    for (double d : o.dwell_ns) m.points.push_back(values.at({s, d}));
  return m;
}

}  // namespace gapwise
