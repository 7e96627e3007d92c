#include "studies/ensemble_study.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <limits>
#include <map>
#include <memory>

#include <fmt/format.h>

#include "hamiltonian/memory_budget.hpp"
#include "io/input_error.hpp"
#include "io/result_journal.hpp"
#include "problem/seeded_random.hpp"
#include "dynamics/propagator.hpp"
#include "studies/duration_sweep.hpp"
#include "studies/work_distribution.hpp"

namespace gapwise {
namespace {

InputError option_error(const std::string& key, const std::string& problem, const std::string& fix) {
  return InputError({key, 0, 0, key}, problem, fix);
}

constexpr std::size_t kFixedValues = 14;  // to_values() fields before the p(t_f) list
constexpr std::size_t kBathFixedValues = 5;  // with a bath: fields after the p(t_f) list, before the bath's p list

std::string bytes_of(const std::vector<double>& v) {
  return std::string(reinterpret_cast<const char*>(v.data()), v.size() * sizeof(double));
}
std::vector<double> values_of(const std::string& s) {
  std::vector<double> v(s.size() / sizeof(double));
  if (!v.empty()) std::memcpy(v.data(), s.data(), v.size() * sizeof(double));
  return v;
}

}  // namespace

JournalLayout ensemble_journal_layout(std::size_t durations, bool with_bath) {
  return {"ensemble", {"set_index"}, InstanceOutcome::value_names(durations, with_bath)};
}

std::string ensemble_fingerprint(const EnsembleRun& run) {
  return input_fingerprint({run.set.fingerprint(), run.schedule_text, run.settings.numerics_text()});
}

std::string EnsembleSettings::numerics_text() const {
  std::string d;
  for (double t : durations_ns) d += fmt::format("{}{:a}", d.empty() ? "" : ",", t);
  std::string text =
      fmt::format("durations_ns=[{}] target={:a} propagator={} tolerance={:a} gap_coarse_points={} gap_s_tolerance={:a}",
                  d, target_probability, simulation.propagator, simulation.propagation.tolerance, gap_coarse_points,
                  gap_s_tolerance);
  // Without a bath the text is the one of earlier versions, so their journals still resume.
  if (bath)
    text += fmt::format(" bath: temperature_mk={:a} coupling={:a} cutoff_ghz={:a} method={} levels={} check_levels={} "
                        "open_tolerance={:a}",
                        bath->temperature_mk, bath->coupling, bath->cutoff_ghz, open.method, open.levels,
                        open.check_levels ? 1 : 0, open.tolerance);
  return text;
}

void EnsembleSettings::validate() const {
  if (durations_ns.empty())
    throw option_error("--durations", "no durations given", "give durations such as 1,10,100 or a range log:1:1000:10");
  for (std::size_t k = 0; k < durations_ns.size(); ++k) {
    if (!(durations_ns[k] > 0) || !std::isfinite(durations_ns[k]))
      throw option_error("--durations", fmt::format("duration {} must be a positive number of ns", durations_ns[k]),
                         "give positive durations");
    if (k && !(durations_ns[k] > durations_ns[k - 1]))
      throw option_error("--durations", "durations must be strictly ascending", "sort them and drop repeats");
  }
  if (!(target_probability > 0 && target_probability < 1))
    throw option_error("--target", fmt::format("target probability {} is outside (0, 1)", target_probability),
                       "use e.g. 0.99");
  for (double q : quantile_levels)
    if (!(q >= 0 && q <= 1))
      throw option_error("--quantiles", fmt::format("quantile level {} is outside [0, 1]", q), "use e.g. 0.25,0.5,0.75");
  if (quantile_levels.empty()) throw option_error("--quantiles", "no quantile levels", "use e.g. 0.25,0.5,0.75");
  if (!(confidence_level > 0 && confidence_level < 1))
    throw option_error("--confidence", fmt::format("confidence level {} is outside (0, 1)", confidence_level),
                       "use e.g. 0.95");
  if (bootstrap_resamples < 1 || bootstrap_resamples > 1000000)
    throw option_error("--resamples", fmt::format("{} bootstrap resamples is outside 1..1000000", bootstrap_resamples),
                       "use e.g. 2000");
  if (gap_coarse_points < 3)
    throw option_error("--gap-points", "the gap scan needs at least 3 points", "use e.g. 101");
  check_gap_point_budget(gap_search_options());
  if (!(gap_s_tolerance > 0 && gap_s_tolerance < 0.1))
    throw option_error("--gap-s-tolerance", "the precision of s* must lie in (0, 0.1)", "use e.g. 1e-6");
  if (!(simulation.propagation.tolerance >= 1e-12 && simulation.propagation.tolerance <= 1e-2))
    throw option_error("--tolerance", fmt::format("tolerance {} is out of range", simulation.propagation.tolerance),
                       "use a value between 1e-12 and 1e-2");
}

GapSearchOptions EnsembleSettings::gap_search_options() const {
  GapSearchOptions g;
  g.coarse_points = gap_coarse_points;
  g.s_tolerance = gap_s_tolerance;
  g.points_option = "--gap-points";
  return g;
}

ShardSpec ShardSpec::parse(const std::string& text) {
  const std::string fix = "write --shard i/N with 0 <= i < N, e.g. --shard 0/8 ... --shard 7/8";
  const auto slash = text.find('/');
  ShardSpec s;
  try {
    std::size_t a = 0, b = 0;
    if (slash == std::string::npos) throw std::invalid_argument("no slash");
    s.index = std::stoi(text.substr(0, slash), &a);
    s.count = std::stoi(text.substr(slash + 1), &b);
    if (a != slash || b != text.size() - slash - 1) throw std::invalid_argument("trailing");
  } catch (const std::exception&) {
    throw option_error("--shard", fmt::format("\"{}\" is not of the form i/N", text), fix);
  }
  if (s.count < 1 || s.index < 0 || s.index >= s.count)
    throw option_error("--shard", fmt::format("shard {} of {} does not exist", s.index, s.count), fix);
  return s;
}

std::string ShardSpec::text() const { return fmt::format("{}/{}", index, count); }

std::vector<std::string> InstanceOutcome::value_names(std::size_t durations, bool with_bath) {
  std::vector<std::string> n = {"qubits", "ground_energy", "ground_states", "planted_check", "gap_ghz",
                                "gap_uncertainty_ghz", "gap_s", "gap_degeneracy", "gap_at_end_point", "max_norm_drift",
                                "tts_ns", "tts_duration_ns", "tts_at_range_edge", "wall_seconds"};
  for (std::size_t k = 0; k < durations; ++k) n.push_back(fmt::format("p{}", k));
  if (with_bath) {
    for (const char* b : {"bath_tts_ns", "bath_tts_duration_ns", "bath_tts_at_range_edge", "bath_max_trace_error",
                          "bath_min_eigenvalue"})
      n.push_back(b);
    for (std::size_t k = 0; k < durations; ++k) n.push_back(fmt::format("bath_p{}", k));
  }
  for (std::size_t k = 0; k < durations; ++k) n.push_back(fmt::format("propagator_code{}", k));
  return n;
}

std::vector<double> InstanceOutcome::to_values() const {
  std::vector<double> v = {static_cast<double>(qubits), ground_energy, static_cast<double>(ground_states),
                           static_cast<double>(planted_check), gap_ghz, gap_uncertainty_ghz, gap_s,
                           static_cast<double>(gap_degeneracy), gap_at_end_point ? 1.0 : 0.0, max_norm_drift,
                           tts_ns, tts_duration_ns, tts_at_range_edge ? 1.0 : 0.0, wall_seconds};
  v.insert(v.end(), ground_probability.begin(), ground_probability.end());
  if (!bath_ground_probability.empty()) {
    v.insert(v.end(), {bath_tts_ns, bath_tts_duration_ns, bath_tts_at_range_edge ? 1.0 : 0.0, bath_max_trace_error,
                       bath_min_eigenvalue});
    v.insert(v.end(), bath_ground_probability.begin(), bath_ground_probability.end());
  }
  for (std::size_t k = 0; k < ground_probability.size(); ++k)
    v.push_back(propagator_code(k < propagator_used.size() ? propagator_used[k] : std::string()));
  return v;
}

InstanceOutcome InstanceOutcome::from_values(std::size_t set_index, const std::vector<double>& v, std::size_t durations,
                                             bool with_bath) {
  const std::size_t expected = kFixedValues + 2 * durations + (with_bath ? kBathFixedValues + durations : 0);
  if (v.size() != expected)
    throw std::runtime_error(fmt::format("instance record {} has {} numbers, expected {}", set_index, v.size(),
                                         expected));
  InstanceOutcome o;
  o.set_index = set_index;
  o.qubits = static_cast<int>(v[0]);
  o.ground_energy = v[1];
  o.ground_states = static_cast<long long>(v[2]);
  o.planted_check = static_cast<int>(v[3]);
  o.gap_ghz = v[4];
  o.gap_uncertainty_ghz = v[5];
  o.gap_s = v[6];
  o.gap_degeneracy = static_cast<int>(v[7]);
  o.gap_at_end_point = v[8] != 0;
  o.max_norm_drift = v[9];
  o.tts_ns = v[10];
  o.tts_duration_ns = v[11];
  o.tts_at_range_edge = v[12] != 0;
  o.wall_seconds = v[13];
  const auto closed_end = v.begin() + static_cast<long>(kFixedValues + durations);
  o.ground_probability.assign(v.begin() + kFixedValues, closed_end);
  if (with_bath) {
    o.bath_tts_ns = closed_end[0];
    o.bath_tts_duration_ns = closed_end[1];
    o.bath_tts_at_range_edge = closed_end[2] != 0;
    o.bath_max_trace_error = closed_end[3];
    o.bath_min_eigenvalue = closed_end[4];
    o.bath_ground_probability.assign(closed_end + kBathFixedValues,
                                     closed_end + static_cast<long>(kBathFixedValues + durations));
  }
  for (auto c = v.end() - static_cast<long>(durations); c != v.end(); ++c) o.propagator_used.push_back(propagator_name_of_code(*c));
  return o;
}

double instance_cost(int qubits) { return qubits * std::ldexp(1.0, qubits); }

/// Where an instance came from, for messages: its problem file (directory sets)
/// or the set file and the instance's group (HDF5 sets).
SourcePlace instance_place(const InstanceSet& set, const Instance& instance, const std::string& key) {
  if (!instance.source.empty()) return {instance.source, 0, 0, key};
  return {set.source, 0, 0, fmt::format("/instances/{}{}", instance.name, key.empty() ? "" : "/" + key)};
}

/// Every instance this run computes fits the gap search and the dynamics: refused
/// before any work, naming the instance's file.
void check_instance_sizes(const EnsembleRun& run, const std::vector<std::size_t>& mine) {
  for (std::size_t i : mine) {
    const Instance& inst = run.set.instances[i];
    const SourcePlace where = instance_place(run.set, inst, "qubits");
    const GapSearchOptions gopt;
    check_gap_search_size(inst.problem.qubits, default_sector(inst.problem), gopt.levels, gopt.method, where);
    check_memory(inst.problem.qubits, 10, 0, where);
  }
}

InstanceOutcome evaluate_instance(const Instance& instance, std::size_t set_index, const Schedule& schedule,
                                  const EnsembleSettings& settings) {
  const auto t0 = std::chrono::steady_clock::now();
  const AnnealSetup setup(instance.problem, schedule, settings.simulation);
  const GapSearchOptions gopt = settings.gap_search_options();
  const MinimumGapReport gap = find_minimum_gap(setup.hamiltonian, schedule.scales, gopt);
  const std::vector<DurationPoint> pts = sweep_durations(setup, settings.durations_ns, 1);

  InstanceOutcome o;
  o.set_index = set_index;
  o.name = instance.name;
  o.qubits = instance.problem.qubits;
  o.ground_energy = setup.ground.energy;
  o.ground_states = static_cast<long long>(setup.ground.degeneracy());
  if (instance.planted_energy)
    o.planted_check = std::abs(setup.ground.energy - *instance.planted_energy) <= setup.ground.tolerance ? 1 : 0;
  o.gap_ghz = gap.gap_ghz;
  o.gap_uncertainty_ghz = gap.gap_uncertainty_ghz;
  o.gap_s = gap.s_star;
  o.gap_degeneracy = gap.ground_degeneracy;
  o.gap_at_end_point = gap.at_end_point;
  std::vector<double> p;
  for (const auto& pt : pts) {
    p.push_back(pt.ground_probability);
    o.propagator_used.push_back(pt.propagator_used);
    o.max_norm_drift = std::max(o.max_norm_drift, pt.norm_drift);
  }
  const TtsOptimum best = best_time_to_solution(settings.durations_ns, p, settings.target_probability);
  o.ground_probability = std::move(p);
  o.tts_ns = best.tts_ns;
  o.tts_duration_ns = best.duration_ns;
  o.tts_at_range_edge = best.at_range_edge;
  if (settings.bath) {
    // The same anneals with the bath: the schedule stretched to each duration,
    // from the same start state, one master-equation run each.
    std::vector<double> pb;
    o.bath_min_eigenvalue = std::numeric_limits<double>::infinity();
    for (double t : settings.durations_ns) {
      const OpenAnnealResult open = simulate_open_anneal(setup.hamiltonian, setup.ground, schedule.scales,
                                                         setup.schedule.path_for(t), setup.start, *settings.bath,
                                                         settings.open);
      pb.push_back(open.ground_probability);
      o.bath_max_trace_error = std::max(o.bath_max_trace_error, open.stats.max_trace_deviation);
      o.bath_min_eigenvalue = std::min(o.bath_min_eigenvalue, open.min_eigenvalue);
    }
    std::vector<double> clamped;
    for (double x : pb) clamped.push_back(std::clamp(x, 0.0, 1.0));
    const TtsOptimum bbest = best_time_to_solution(settings.durations_ns, clamped, settings.target_probability);
    o.bath_ground_probability = std::move(pb);
    o.bath_tts_ns = bbest.tts_ns;
    o.bath_tts_duration_ns = bbest.duration_ns;
    o.bath_tts_at_range_edge = bbest.at_range_edge;
  }
  o.wall_seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return o;
}

std::vector<SizeSummary> summarize_by_size(const std::vector<InstanceOutcome>& outcomes, const EnsembleSettings& st) {
  std::map<int, std::vector<const InstanceOutcome*>> by;
  for (const auto& o : outcomes) by[o.qubits].push_back(&o);
  std::vector<SizeSummary> out;
  for (auto& [n, list] : by) {
    std::sort(list.begin(), list.end(), [](auto* a, auto* b) { return a->set_index < b->set_index; });
    SizeSummary s;
    s.qubits = n;
    std::vector<double> tts, gap, bath_tts;
    for (const auto* o : list) {
      if (st.bath) {
        bath_tts.push_back(o->bath_tts_ns);
        s.bath_tts_at_range_edge += o->bath_tts_at_range_edge;
        s.bath_never_solved += std::isinf(o->bath_tts_ns);
      }
      tts.push_back(o->tts_ns);
      gap.push_back(o->gap_ghz);
      s.tts_at_range_edge += o->tts_at_range_edge;
      s.never_solved += std::isinf(o->tts_ns);
    }
    const auto key = static_cast<std::uint64_t>(n);
    s.tts_ns = summarize_sample(tts, st.quantile_levels, st.bootstrap_resamples, st.confidence_level,
                                derive_seed(st.bootstrap_seed, {key, 0}));
    s.gap_ghz = summarize_sample(gap, st.quantile_levels, st.bootstrap_resamples, st.confidence_level,
                                 derive_seed(st.bootstrap_seed, {key, 1}));
    if (st.bath)
      s.bath_tts_ns = summarize_sample(bath_tts, st.quantile_levels, st.bootstrap_resamples, st.confidence_level,
                                       derive_seed(st.bootstrap_seed, {key, 2}));
    out.push_back(std::move(s));
  }
  return out;
}

EnsembleResult run_ensemble_study(const EnsembleRun& run) {
  const auto t0 = std::chrono::steady_clock::now();
  run.settings.validate();
  if (run.set.instances.empty())
    throw InputError({run.set.source, 0, 0, ""}, "the instance set is empty", "give a set with at least one instance");
  ProcessGroup& group = ProcessGroup::instance();
  const std::size_t k_durations = run.settings.durations_ns.size();
  const bool with_bath = run.settings.bath.has_value();

  EnsembleResult r;
  r.set_source = run.set.source;
  r.set_fingerprint = run.set.fingerprint();
  r.schedule_text = run.schedule_text;
  r.numerics_fingerprint = ensemble_fingerprint(run);
  r.settings = run.settings;
  r.shard = run.shard;
  r.set_size = run.set.instances.size();
  r.distribution = group.uses_mpi() ? group.describe() : fmt::format("threads ({})", std::max(1, run.threads));

  std::vector<std::size_t> mine;
  for (std::size_t i = 0; i < run.set.instances.size(); ++i)
    if (run.shard.contains(i)) mine.push_back(i);
  check_instance_sizes(run, mine);  // before the journal exists: a refused run leaves nothing behind

  std::map<std::size_t, InstanceOutcome> known;
  ResultJournal* journal = nullptr;
  if (group.is_collector() && run.open_journal)
    journal = run.open_journal(ensemble_journal_layout(k_durations, with_bath), r.numerics_fingerprint);
  if (journal) {
    for (const auto& [key, values] : journal->records()) {
      const auto i = static_cast<std::size_t>(key.at(0));
      if (i < run.set.instances.size() && run.shard.contains(i)) {
        known.emplace(i, InstanceOutcome::from_values(i, values, k_durations, with_bath));
        known.at(i).name = run.set.instances[i].name;
      }
    }
  }
  r.resumed = known.size();

  // Most expensive first (the cost grows like 2^n; the durations are the same for all).
  std::vector<std::size_t> pending;
  for (std::size_t i : mine)
    if (!known.count(i)) pending.push_back(i);
  std::stable_sort(pending.begin(), pending.end(), [&](std::size_t a, std::size_t b) {
    return run.set.instances[a].problem.qubits > run.set.instances[b].problem.qubits;
  });

  std::size_t done = known.size();
  double cost_total = 0, cost_done = 0;
  for (std::size_t i : pending) cost_total += instance_cost(run.set.instances[i].problem.qubits);
  auto task = [&](std::size_t i) {
    const Instance& inst = run.set.instances.at(i);
    try {
      return bytes_of(evaluate_instance(inst, i, run.schedule, run.settings).to_values());
    } catch (const InputError& e) {
      // A refusal about one instance names its file, whatever part of the library raised it.
      if (e.place().file == inst.source && !inst.source.empty()) throw;
      throw InputError(instance_place(run.set, inst, e.place().key),
                       fmt::format("instance '{}': {}", inst.name, e.problem()), e.fix());
    }
  };
  auto collect = [&](std::size_t i, std::string bytes) {
    InstanceOutcome o = InstanceOutcome::from_values(i, values_of(bytes), k_durations, with_bath);
    o.name = run.set.instances.at(i).name;
    if (journal) journal->append({static_cast<double>(i)}, o.to_values());
    auto it = known.insert_or_assign(i, std::move(o)).first;
    ++done;
    ++r.computed;
    cost_done += instance_cost(run.set.instances.at(i).problem.qubits);
    if (run.progress) {
      EnsembleProgress p;
      p.done = done;
      p.total = mine.size();
      p.last = &it->second;
      p.elapsed_seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
      p.cost_done = cost_done;
      p.cost_total = cost_total;
      run.progress(p);
    }
  };
  WorkOptions wo;
  wo.threads = std::max(1, run.threads);
  distribute_work(pending, task, collect, wo);

  r.complete_here = group.is_collector();
  if (r.complete_here) {
    for (auto& [i, o] : known) r.instances.push_back(std::move(o));
    r.sizes = summarize_by_size(r.instances, r.settings);
  }
  r.wall_seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return r;
}

EnsembleResult merge_shards(const std::vector<EnsembleResult>& shards, const std::vector<std::string>& names) {
  if (shards.empty()) throw option_error("shards", "no shard results given", "give every shard's result file");
  const EnsembleResult& first = shards[0];
  auto mismatch = [&](std::size_t k, const std::string& what) {
    return InputError({names.at(k), 0, 0, ""}, fmt::format("this shard result does not belong with {}: {} differs", names[0], what),
                      "merge the shards of one study only (same instance set, schedule, settings and shard count)");
  };
  std::vector<int> seen(static_cast<std::size_t>(first.shard.count), -1);
  EnsembleResult m = first;
  m.instances.clear();
  m.resumed = m.computed = 0;
  m.wall_seconds = 0;
  for (std::size_t k = 0; k < shards.size(); ++k) {
    const EnsembleResult& s = shards[k];
    if (s.set_fingerprint != first.set_fingerprint) throw mismatch(k, "the instance set");
    if (s.numerics_fingerprint != first.numerics_fingerprint) throw mismatch(k, "the schedule or the numerical settings");
    if (s.settings.quantile_levels != first.settings.quantile_levels ||
        s.settings.confidence_level != first.settings.confidence_level ||
        s.settings.bootstrap_resamples != first.settings.bootstrap_resamples ||
        s.settings.bootstrap_seed != first.settings.bootstrap_seed)
      throw mismatch(k, "the statistics settings (quantiles, confidence, resamples, seed)");
    if (s.shard.count != first.shard.count) throw mismatch(k, "the shard count");
    int& slot = seen[static_cast<std::size_t>(s.shard.index)];
    if (slot >= 0)
      throw InputError({names[k], 0, 0, ""}, fmt::format("shard {} is given twice (also in {})", s.shard.text(),
                                                         names[static_cast<std::size_t>(slot)]),
                       "give each shard once");
    slot = static_cast<int>(k);
    for (const auto& o : s.instances) m.instances.push_back(o);
    m.resumed += s.resumed;
    m.computed += s.computed;
    m.wall_seconds += s.wall_seconds;
  }
  for (std::size_t i = 0; i < seen.size(); ++i)
    if (seen[i] < 0)
      throw InputError({names[0], 0, 0, ""}, fmt::format("shard {}/{} is missing", i, first.shard.count),
                       fmt::format("run it (--shard {}/{}) and give its result too", i, first.shard.count));
  std::sort(m.instances.begin(), m.instances.end(), [](const auto& a, const auto& b) { return a.set_index < b.set_index; });
  if (m.instances.size() != first.set_size)
    throw InputError({names[0], 0, 0, ""}, fmt::format("the shards hold {} instances, the set {}", m.instances.size(), first.set_size),
                     "finish every shard before merging (a shard run resumes from its journal)");
  m.shard = ShardSpec{};
  m.sizes = summarize_by_size(m.instances, m.settings);
  m.distribution = fmt::format("{} shards merged", shards.size());
  m.complete_here = true;
  return m;
}

}  // namespace gapwise
