// `gapwise compare-paths PROBLEM SCHEDULE [MORE...] -d T[,T2...]`:
// several paths on one problem at equal total duration: p, time to solution,
// and where the instantaneous ground level loses population, per path.
#include <cmath>
#include <filesystem>
#include <iostream>
#include <memory>
#include <optional>

#include <unistd.h>

#include <fmt/format.h>

#include "cli/bath_option.hpp"
#include "cli/cli_common.hpp"
#include "cli/input_loading.hpp"
#include "io/output_paths.hpp"
#include "dynamics/anneal_simulation.hpp"
#include "hamiltonian/memory_budget.hpp"
#include "io/atomic_file.hpp"
#include "io/compare_paths_report.hpp"
#include "io/input_error.hpp"
#include "studies/local_adiabatic_schedule.hpp"
#include "studies/open_path_comparison.hpp"
#include "studies/shape_comparison.hpp"
#include "studies/work_estimate.hpp"

namespace gapwise::cli {
namespace {

struct CompareOptions {
  std::string problem;
  std::vector<std::string> schedules, pauses, quenches;
  std::string durations, out, csv, bath, propagator = SimulationOptions{}.propagator;
  bool local_adiabatic = false, allow_long = false, levels_given = false, quiet = false, json = false;
  int levels = 4, trace_points = 60, threads = 0, waypoints = 200;
  double tolerance = 1e-6, target = kDefaultTargetProbability;
};

/// "S:F" -> {S, F}; InputError naming the option.
std::pair<double, double> two_numbers(const std::string& text, const std::string& option) {
  const auto c = text.find(':');
  if (c == std::string::npos || text.find(':', c + 1) != std::string::npos)
    throw InputError({option, 0, 0, option}, fmt::format("\"{}\" is not S:FRACTION", text),
                     fmt::format("write {} 0.45:0.2 (at s = 0.45, for 20 % of the duration)", option));
  const auto a = parse_value_list(text.substr(0, c), option), b = parse_value_list(text.substr(c + 1), option);
  if (a.size() != 1 || b.size() != 1)
    throw InputError({option, 0, 0, option}, fmt::format("\"{}\" is not S:FRACTION", text), "give one s and one fraction");
  return {a[0], b[0]};
}

/// The generated shape on the base schedule's path, as a schedule of its own.
Schedule with_shape(const Schedule& base, const ForwardShapeSpec& spec, const std::string& option) {
  Schedule s = base;
  s.shape = base.shape.scaled_to(1.0);
  s.time_in_ns = false;
  s.shape_spec.reset();
  try {
    s.shape = forward_shape(s.shape, spec, 1.0);
  } catch (const InputError& e) {
    throw InputError({option, 0, 0, option + " (" + e.place().key + ")"}, e.problem(), e.fix());
  }
  return s;
}

void run_compare(const CompareOptions& o) {
  const RunInputs loaded = load_run_inputs(RunFiles{}.problem(o.problem).bath(o.bath).candidate_schedules(o.schedules).plan(
      FilePlan{}.output(o.out, "--out").output(o.csv, "--csv")));
  const IsingProblem& p = loaded.problem();
  const std::optional<OhmicBath>& bath = loaded.bath;
  loaded.check_memory(10);
  if (!o.out.empty()) check_output_path(o.out, "--out");
  if (!o.csv.empty()) check_output_path(o.csv, "--csv");
  check_target_probability(o.target);
  check_tolerance(o.tolerance);
  check_threads(o.threads);
  std::vector<ShapeCandidate> cands;
  const Schedule& base = loaded.candidate_schedules.front();
  for (std::size_t i = 0; i < o.schedules.size(); ++i)
    cands.push_back({std::filesystem::path(o.schedules[i]).filename().string(), loaded.candidate_schedules[i]});
  for (const auto& text : o.pauses) {
    const auto [s, f] = two_numbers(text, "--pause");
    cands.push_back({fmt::format("pause s={:g} for {:g}%", s, 100 * f), with_shape(base, {.pause = PauseSpec{s, f}}, "--pause")});
  }
  for (const auto& text : o.quenches) {
    const auto [s, f] = two_numbers(text, "--quench");
    cands.push_back({fmt::format("quench from s={:g} in {:g}%", s, 100 * f), with_shape(base, {.quench = QuenchSpec{s, f}}, "--quench")});
  }
  const TransverseIsingHamiltonian H(p);
  // Levels beyond the states of the space followed would be empty columns.
  const int levels = fit_levels(o.levels, o.levels_given, p.qubits, comparison_sector(H, cands));
  std::optional<LocalAdiabaticSchedule> gap;
  if (o.local_adiabatic) {
    if (!o.quiet) std::cerr << "computing the spectrum along s for the local adiabatic schedule...\n";
    gap = local_adiabatic_schedule(H, base, {}, {.waypoints = o.waypoints});
    cands.push_back({"local adiabatic", gap->schedule});
  }
  ShapeComparisonOptions co;
  co.durations_ns = parse_value_list(o.durations, "--durations", ListOf::Durations);
  co.target_probability = o.target;
  co.simulation.propagator = o.propagator;
  co.simulation.propagation.tolerance = o.tolerance;
  co.levels = levels;
  co.population_points = o.trace_points;
  co.threads = o.threads;
  WorkEstimate work;
  for (const auto& c : cands)
    for (double t : co.durations_ns) work += anneal_work(p, c.schedule.scales, t);
  check_work_limit(work, o.allow_long, {"--durations", 0, 0, "--durations"});
  if (!o.quiet)
    std::cerr << fmt::format("running {} anneals ({} paths x {} durations)...\n", cands.size() * co.durations_ns.size(),
                           cands.size(), co.durations_ns.size());
  const ShapeComparison r = compare_shapes(p, cands, co);
  std::optional<OpenPathComparison> open;
  if (bath) {
    OpenPathOptions oo;
    oo.tolerance = o.tolerance;
    oo.target_probability = o.target;
    const bool tty = !o.quiet && ::isatty(STDERR_FILENO);
    if (!o.quiet && !tty)
      std::cerr << fmt::format("running {} anneals with the bath...\n", cands.size() * co.durations_ns.size());
    if (tty)
      oo.progress = [](std::size_t done, std::size_t total, const PropagationProgress& pr) {
        std::cerr << fmt::format("\r[compare-paths] with the bath: run {}/{}, pass {} {:3.0f} %   ", done + 1, total,
                                 pr.pass, 100 * pr.fraction);
      };
    open = compare_paths_open(p, cands, r, *bath, oo);
    if (tty) std::cerr << "\n";
  }
  ComparePathsReport rep;
  rep.problem_file = o.problem;
  rep.schedule_files = o.schedules;
  rep.target_probability = o.target;
  rep.levels = levels;
  rep.problem = &p;
  rep.candidates = &cands;
  rep.comparison = &r;
  if (gap) rep.local_adiabatic = &*gap;
  if (open) {
    rep.open = &*open;
    rep.bath = &*bath;
  }
  std::cout << (o.json ? compare_paths_report_json(rep) : compare_paths_report_text(rep));
  if (!o.csv.empty()) write_file_atomically(o.csv, compare_paths_report_csv(rep));
  if (!o.out.empty()) {
    write_compare_paths_result(o.out, rep, command_line());
    if (!o.json) std::cout << fmt::format("wrote {}\n", o.out);
  }
}

}  // namespace

void register_compare_paths(CLI::App& app) {
  auto o = std::make_shared<CompareOptions>();
  CLI::App* sub = app.add_subcommand("compare-paths",
      "Compare paths on one problem at equal total duration: each path (a schedule file, or a\n"
      "shape generated on the first schedule's path) is stretched to exactly each duration;\n"
      "reports the ground-state probability p, the time to solution, and the populations of the\n"
      "lowest instantaneous levels along s, so you see where population leaks out of the ground\n"
      "level. All schedules must share the same energy scales (paths are compared, not hardware).\n"
      "Example: gapwise compare-paths data-samples/weak-field-ring.toml schedules/linear.toml \\\n"
      "           --pause 0.5:0.2 --local-adiabatic -d 10,20 --out cmp.h5");
  sub->add_option("problem", o->problem, "problem file (TOML)")->required()->check(readable_input_file());
  sub->add_option("schedules", o->schedules, "schedule files; the first is the base for generated shapes")
      ->required()->check(readable_input_file());
  add_durations_option(sub, o->durations, "total durations in ns, a LIST such as 10,20,50 or log:5:80:5")->required();
  sub->add_option("--pause", o->pauses, "add the base path with a pause S:FRACTION (at s = S for FRACTION of the duration); repeatable");
  sub->add_option("--quench", o->quenches, "add the base path quenched from s = S to 1 in FRACTION of the duration; repeatable");
  sub->add_flag("--local-adiabatic", o->local_adiabatic, "add the local adiabatic schedule (see `gapwise gap-path --help`)");
  sub->add_option("--waypoints", o->waypoints, "waypoints of the local adiabatic schedule")->capture_default_str();
  sub->add_option("--levels", o->levels, "instantaneous levels whose populations are followed (a default above the\n"
                  "number of states is lowered to it; a value you give must fit)")->capture_default_str()->check(CLI::Range(1, 64));
  sub->add_option("--trace-points", o->trace_points, "population observations along each run (about)")->capture_default_str()->check(CLI::Range(2, 100000));
  sub->add_option("--target", o->target, "target success probability of the time to solution")->capture_default_str();
  sub->add_option("--tolerance", o->tolerance, "target accuracy of p")->capture_default_str();
  list_propagator_names(sub->add_option("--propagator", o->propagator, "which propagator runs the dynamics")
      ->check(CLI::IsMember(propagator_names()))->capture_default_str(), propagator_names());
  sub->add_option("--threads", o->threads, "OpenMP threads (0: default); results do not depend on it")->capture_default_str();
  sub->add_option("--out", o->out, "HDF5: p, TTS and end times per path and duration; level populations along each run");
  sub->add_option("--csv", o->csv, "the table as CSV (with --bath: p_bath and the TTS with the bath as two more columns)");
  add_bath_option(sub, o->bath)->description(
      "run every path once more coupled to the bath of FILE (format gapwise-bath) with the adiabatic\n"
      "master equation: p and TTS closed and with the bath side by side, and the best path with and\n"
      "without the bath (the lowest K levels from 7 qubits, as far as memory allows; see the user\n"
      "guide, 'compare-paths --bath')");
  sub->add_flag("--json", o->json, "print a JSON summary instead of the text report");
  sub->add_flag("-q,--quiet", o->quiet, "no progress lines on stderr");
  add_allow_long_flag(sub, o->allow_long);
  sub->callback([o, sub] {
    o->levels_given = sub->count("--levels") > 0;
    run_compare(*o);
  });
}

}  // namespace gapwise::cli
