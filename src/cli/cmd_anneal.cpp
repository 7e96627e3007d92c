// `gapwise anneal PROBLEM SCHEDULE`: one anneal of a given duration; the
// ground-state probability, the most probable outcomes, and the checks that
// make the number trustworthy (norm drift, convergence under a tighter tolerance).
#include <algorithm>
#include <cmath>
#include <iostream>
#include <memory>
#include <optional>

#include <fmt/format.h>

#include "cli/cli_common.hpp"
#include "cli/input_loading.hpp"
#include "io/output_paths.hpp"
#include "hamiltonian/memory_budget.hpp"
#include "io/anneal_report.hpp"
#include "io/atomic_file.hpp"
#include "io/hdf5_output.hpp"
#include "io/input_error.hpp"
#include "cli/bath_option.hpp"
#include "io/json_summary.hpp"
#include "io/progress_bar.hpp"
#include "io/terminal_text.hpp"
#include "io/text_table.hpp"
#include "studies/single_anneal.hpp"
#include "studies/work_estimate.hpp"

namespace gapwise::cli {
namespace {

struct AnnealOptions {
  double frame_above = std::numeric_limits<double>::quiet_NaN();  ///< --frame-above (NaN: the cost model)
  std::string problem, schedule, out, csv, propagator = "split-auto", observe_s, durations, bath;
  int bath_levels = 0;
  double tolerance = 1e-6;
  bool p_only = false;
  int trace_points = 20, top = 8, levels = 0;
  bool json = false, no_check = false, strict = false, allow_long = false, quiet = false, progress = false;
};

// Runs estimated below this many seconds of one core show no progress unless --progress asks.
constexpr double kProgressAfterSeconds = 2.0;

void run_anneal(const AnnealOptions& o) {
  const RunInputs loaded = load_run_inputs(RunFiles{}.problem(o.problem).schedule(o.schedule).bath(o.bath).plan(
      FilePlan{}.output(o.out, "--out").output(o.csv, "--csv")));
  const IsingProblem& p = loaded.problem();
  const Schedule& sch = loaded.schedule;
  const std::optional<OhmicBath>& bath = loaded.bath;
  check_bath_levels(o.bath_levels, bath.has_value(), p.qubits);
  check_tolerance(o.tolerance);
  check_frame_above(o.frame_above, o.propagator);
  check_count(o.trace_points, kTracePoints, "--trace-points");
  check_count(o.top, kTopOutcomes, "--top");
  loaded.check_memory(10);
  std::optional<double> duration_ns;
  if (!o.durations.empty()) {
    duration_ns = parse_single_value(o.durations, "--durations", ListOf::Durations, "anneal runs one duration",
                                     "give one duration, or run `gapwise durations` for a list of them");
    check_duration_ns(*duration_ns, {"--durations", 0, 0, "--durations"});
  }
  const AnnealPath path = sch.path_for(duration_ns);
  const WorkEstimate work = anneal_work(p, sch.scales, path.duration_ns(), o.no_check ? 1.0 : 2.0);
  check_work_limit(work, o.allow_long,
                   duration_ns ? SourcePlace{"--durations", 0, 0, "--durations"} : SourcePlace{o.schedule, 0, 0, "path"});

  SingleAnnealOptions so;
  // Observations at chosen s: every passage of the path through each value.
  if (!o.observe_s.empty()) {
    so.observe_s = parse_value_list(o.observe_s, "--observe-s");
    std::sort(so.observe_s.begin(), so.observe_s.end());
    so.observe_s.erase(std::unique(so.observe_s.begin(), so.observe_s.end()), so.observe_s.end());
    for (double s : so.observe_s)
      if (times_at_s(path, s).empty())
        throw InputError({"--observe-s", 0, 0, "--observe-s"},
                         fmt::format("the path of {} never reaches s = {} (it covers s from {} to {})", o.schedule, s,
                                     path.s_min(), path.s_max()),
                         fmt::format("give s values between {} and {}", path.s_min(), path.s_max()));
  }
  if (o.levels < 0 || o.levels > 16)
    throw InputError({"--levels", 0, 0, "--levels"}, fmt::format("{} levels", o.levels), "give 1 to 16 levels (0: none)");
  if (o.levels > 0 && so.observe_s.empty())
    throw InputError({"--levels", 0, 0, "--levels"}, "level populations are recorded at the --observe-s points, and none were given",
                     "add --observe-s, e.g. --observe-s 0.3,0.5,0.7");
  check_levels_fit(o.levels, p.qubits, single_anneal_sector(p, sch));
  so.propagator = o.propagator;
  so.frame_above_ns = o.frame_above;
  so.tolerance = o.tolerance;
  so.p_only = o.p_only;
  so.check = !o.no_check;
  so.trace_points = o.trace_points;
  so.top = o.top;
  so.levels = o.levels;
  if (bath) {
    so.bath = &*bath;
    so.open = open_propagator_options(o.tolerance, o.bath_levels);
  }
  // Progress on stderr for long runs (the passes of the propagator over the path).
  // With a bath the open-system run dominates and is not in the estimate: always show on a terminal.
  const bool show = !o.quiet && (o.progress || bath || work.core_seconds() > kProgressAfterSeconds);
  ProgressBar bar("anneal", 0, 0.0, !show ? 0 : (o.progress ? 1 : -1));
  if (bar.enabled())
    so.progress = [&](const SingleAnnealStage& st, const PropagationProgress& pp) {
      if (st.run > 0)
        bar.stage(fmt::format("run {} of {}{}, pass {}", st.run, st.runs, st.run == 2 ? " (check at tolerance/10)" : "",
                              pp.pass),
                  pp.fraction);
      else
        bar.stage(!st.truncated ? std::string("with the bath")
                  : o.bath_levels > 0 ? fmt::format("with the bath, K = {} (fixed)", o.bath_levels)
                                      : fmt::format("with the bath, K pass {} (K = 6, 10, ... until p settles)", pp.pass),
                  pp.fraction);
    };
  const SingleAnneal a = run_single_anneal(p, sch, path, so);
  bar.done();

  for (const auto& issue : a.accuracy) std::cerr << "gapwise: warning: " << issue.message << "\n";
  if (o.strict && !a.accuracy.empty()) exit_code() = kExitAccuracy;
  for (const auto& issue : a.accuracy)
    if (issue.check == "non_finite")  // never passed off as a result; nothing is written
      throw std::runtime_error("the simulation produced a non-finite result: " + issue.message);

  AnnealReport rep;
  rep.problem_file = o.problem;
  rep.schedule_file = o.schedule;
  rep.tolerance = o.tolerance;
  rep.p_only = o.p_only;
  rep.levels = o.levels;
  rep.observed = !so.observe_s.empty();
  rep.problem = &p;
  rep.schedule = &sch;
  rep.path = &path;
  rep.ground = &a.ground;
  rep.result = &a.result;
  rep.delta_p = a.delta_p;
  rep.accuracy_ok = a.accuracy.empty();
  rep.trace = &a.trace;
  rep.level_rows = a.level_rows;
  rep.sector = a.sector;
  if (a.open) {
    rep.with_bath = true;
    rep.open_text = open_system_text(*bath, *a.open, a.result.ground_probability);
    put_open_system_json(rep.open_json, *bath, *a.open);
    rep.write_open_hdf5 = [&](Hdf5Output& h5) { write_open_system_hdf5(h5, "/anneal/open_system", *bath, *a.open); };
  }
  std::cout << (o.json ? anneal_report_json(rep) : anneal_report_text(rep));
  if (!o.csv.empty()) write_file_atomically(o.csv, anneal_trace_table(rep).csv());
  if (!o.out.empty()) write_anneal_result(o.out, rep, command_line());
}

}  // namespace

void register_anneal(CLI::App& app) {
  auto o = std::make_shared<AnnealOptions>();
  CLI::App* sub = app.add_subcommand("anneal",
      "Simulate one anneal of PROBLEM along SCHEDULE and report the ground-state\n"
      "probability (all classical ground states together), the most probable outcomes,\n"
      "the norm drift, and how much p moves when the tolerance is tightened tenfold.\n"
      "Units: durations in ns, energy scales in GHz; d psi/dt = -i 2 pi H psi.\n"
      "Example: gapwise anneal data-samples/triangle.toml schedules/linear.toml -d 20 --out run.h5");
  sub->add_option("problem", o->problem, "problem file (TOML)")->required()->check(readable_input_file());
  sub->add_option("schedule", o->schedule, "schedule file (TOML)")->required()->check(readable_input_file());
  add_durations_option(sub, o->durations,
                       "anneal duration in ns, one value; stretches the schedule's path (default: the schedule's own)");
  sub->add_option("--tolerance", o->tolerance, "target accuracy of the ground-state probability (checked by a re-run at tolerance/10)")->capture_default_str();
  list_propagator_names(sub->add_option("--propagator", o->propagator,
                  "which propagator runs the dynamics: split-auto (default: second-order split steps while the\n"
                  "splitting threshold sets the step, Blanes-Moan fourth order when accuracy does), split4 (Suzuki\n"
                  "fourth order), split2 (second order), split4-yoshida (triple jump), split4-bm (Blanes-Moan\n"
                  "fourth order: smallest error per step), odeint (the generic reference), frame (long anneals:\n"
                  "the frame of the lowest instantaneous levels), auto (split-auto or frame, whichever its\n"
                  "measured cost model predicts cheaper)")
      ->check(CLI::IsMember(propagator_names()))->capture_default_str(), propagator_names());
  add_frame_above_option(sub, o->frame_above);
  sub->add_option("--trace-points", o->trace_points, "evenly spaced observations inside each piece of the path (trace)")->capture_default_str();
  add_list_option(sub, "--observe-s", o->observe_s,
                  "also observe where the path passes these s values: a LIST such as 0.3,0.5,0.62\n"
                  "or lin:0.3:0.7:5. Recorded in the trace (marked requested) and listed on their own\n"
                  "(terminal, JSON `observations`, HDF5 /anneal/observations). A reverse anneal passes\n"
                  "most s twice: both passages are recorded. With a split propagator they do not change\n"
                  "the result (side branches off the step grid)");
  sub->add_option("--levels", o->levels,
                  "at the --observe-s points also record the populations of the K lowest distinct levels\n"
                  "of H(s) (one eigenproblem each; even spin-flip sector when the problem has no fields\n"
                  "and the anneal starts in the ground state)")->capture_default_str();
  sub->add_option("--top", o->top, "how many most probable outcomes to list")->capture_default_str();
  sub->add_flag("--p-only", o->p_only,
                "hold only the ground-state probability to the tolerance (default: also every other set of\n"
                "outcomes, e.g. the listed outcome probabilities, to 100x it); split propagators then often\n"
                "need fewer steps. The listed outcomes and level populations are then less accurate");
  sub->add_flag("--no-check", o->no_check, "skip the convergence re-run at tolerance/10");
  sub->add_flag("--strict", o->strict,
                "exit with code 3 when an accuracy check fails (norm drift, integrator error estimate or\n"
                "convergence |dp| above the tolerance); outputs are still written, marked accuracy_ok = 0");
  sub->add_option("--out", o->out, "write an HDF5 result file (trace, final probabilities, provenance)");
  sub->add_option("--csv", o->csv, "write the trace (t, s, p_ground, energy, norm) as CSV");
  sub->add_flag("--json", o->json, "print a JSON summary instead of text");
  add_bath_option(sub, o->bath);
  add_bath_levels_option(sub, o->bath_levels);
  add_allow_long_flag(sub, o->allow_long);
  sub->add_flag("-q,--quiet", o->quiet, "no progress on stderr");
  sub->add_flag("--progress", o->progress,
                "show progress on stderr for any run, also when stderr is not a terminal (then a line every\n"
                "few seconds); by default it shows on a terminal for runs estimated above 2 s");
  sub->callback([o] { run_anneal(*o); });
}

}  // namespace gapwise::cli
