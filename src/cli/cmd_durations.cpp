// `gapwise durations PROBLEM SCHEDULE`: the anneal-time study. Simulates p(t_f)
// over a list or log-spaced range of durations, reports time to solution and
// its optimum, finds the shortest duration that reaches the target by
// bisection, and sets the Landau-Zener and adiabatic-condition predictions
// beside the simulation. Resumable: finished points go to a journal beside the
// output file and a rerun of the same command skips them.
#include <limits>
#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <memory>
#include <optional>
#include <set>
#include <sstream>

#include <unistd.h>

#include <fmt/format.h>

#include "cli/cli_common.hpp"
#include "cli/input_loading.hpp"
#include "cli/journaled_run.hpp"
#include "io/infinite_tts.hpp"
#include "hamiltonian/memory_budget.hpp"
#include "io/atomic_file.hpp"
#include "io/duration_report.hpp"
#include "io/duration_study_file.hpp"
#include "io/input_error.hpp"
#include "io/toml_reader.hpp"
#include "io/output_paths.hpp"
#include "io/json_summary.hpp"
#include "io/progress_bar.hpp"
#include "io/result_journal.hpp"
#include "io/terminal_text.hpp"
#include "io/text_table.hpp"
#include "studies/anneal_predictions.hpp"
#include "studies/duration_study.hpp"
#include "studies/open_duration_scan.hpp"
#include "cli/bath_option.hpp"
#include "studies/work_estimate.hpp"
#include "platform/thread_count.hpp"

#ifdef _OPENMP
#include <omp.h>
#endif

namespace gapwise::cli {
namespace {

struct DurationsOptions {
  double frame_above = std::numeric_limits<double>::quiet_NaN();  ///< --frame-above (NaN: the cost model)
  std::string problem, schedule, out, csv, durations, propagator = "auto", bath;
  bool p_only = false;
  double target = kDefaultTargetProbability, tolerance = 1e-6, resolution = 5e-3, agreement = kDefaultAgreementFactor;
  int threads = 0, probes = 2, bath_levels = 0;
  bool json = false, no_search = false, no_predictions = false, fresh = false, quiet = false, allow_long = false;
};

void run_durations(const DurationsOptions& o) {
  const RunInputs loaded = load_run_inputs(RunFiles{}.problem(o.problem).schedule(o.schedule).bath(o.bath).plan(
      FilePlan{}.output(o.out, "--out").output(o.csv, "--csv").journal_of(!o.out.empty() ? o.out : o.csv)
          // the bath points' journal (below)
          .journal_of(!o.bath.empty() && (!o.out.empty() || !o.csv.empty()) ? (!o.out.empty() ? o.out : o.csv) + ".bath"
                                                                            : std::string())));
  const IsingProblem& problem = loaded.problem();
  const Schedule& schedule = loaded.schedule;
  const std::optional<OhmicBath>& bath = loaded.bath;
  check_bath_levels(o.bath_levels, bath.has_value(), problem.qubits);
  check_tolerance(o.tolerance);
  check_frame_above(o.frame_above, o.propagator);
  check_target_probability(o.target);
  check_threads(o.threads);
  check_resolution_value(o.resolution, {"--resolution", 0, 0, "--resolution"});
  check_agreement_value(o.agreement, {"--agreement", 0, 0, "--agreement"});
  check_count(o.probes, kBisectionProbes, "--probes");
  std::vector<double> grid;
  if (!o.durations.empty()) grid = normalised_grid(parse_value_list(o.durations, "--durations", ListOf::Durations));
  if (!o.out.empty()) check_output_path(o.out, "--out");
  if (!o.csv.empty()) check_output_path(o.csv, "--csv");
#ifdef _OPENMP
  const int threads = thread_count_or_default(o.threads);
#else
  const int threads = 1;
#endif
  loaded.check_memory(10 * std::max(1, threads));

  SimulationOptions sim;
  sim.propagator = o.propagator;
  sim.choice.frame_above_ns = o.frame_above;
  sim.propagation.tolerance = o.tolerance;
  if (o.p_only) sim.propagation.others_factor = std::numeric_limits<double>::infinity();
  const AnnealSetup setup(problem, schedule, sim);

  std::optional<AnnealPredictions> predictions;
  if (!o.no_predictions) predictions = predict_anneal(setup);
  const bool grid_chosen = grid.empty();
  if (grid_chosen) grid = default_duration_grid(predictions ? &*predictions : nullptr, o.target);
  {
    // The grid, and about as much again for the search of the needed duration.
    WorkEstimate work;
    for (double t : grid) work += anneal_work(problem, schedule.scales, t, o.no_search ? 1.0 : 2.0);
    check_work_limit(work, o.allow_long, {"--durations", 0, 0, "--durations"});
  }

  DurationStudyInputs in;
  in.problem_file = o.problem;
  in.schedule_file = o.schedule;
  in.command_line = command_line();
  in.propagator = o.propagator;
  in.tolerance = o.tolerance;
  in.p_only = o.p_only;
  in.target = o.target;
  in.grid_ns = grid;
  in.setup = &setup;
  in.predictions = predictions ? &*predictions : nullptr;
  in.agreement_factor = o.agreement;
  // 1 - p is known to about the noise level the duration search uses.
  const double p_noise = std::max(10.0 * o.tolerance, 1e-9);
  in.agreement_floor = p_noise;

  // The journal lives beside the first output file; without one nothing is kept.
  std::vector<std::string> inputs{read_text_file(o.problem), read_text_file(o.schedule), o.propagator,
                                  fmt::format("{:a}", o.tolerance)};
  if (o.p_only) inputs.push_back("p-only");
  JournaledRun run(!o.out.empty() ? o.out : o.csv, o.fresh, duration_journal_layout(), input_fingerprint(inputs),
                   {o.out, o.csv});
  ResultJournal* journal = run.journal();
  // The bath points have a journal of their own ("<result>.bath.journal"; its
  // inputs add the bath file and --bath-levels), opened here so that a journal
  // of another bath is refused before any work.
  std::unique_ptr<ResultJournal> open_journal;
  if (bath && journal) {
    const std::string path = journal_path_for((!o.out.empty() ? o.out : o.csv) + ".bath");
    if (o.fresh) std::filesystem::remove(path);
    std::vector<std::string> open_inputs = inputs;
    open_inputs.push_back(read_text_file(o.bath));
    open_inputs.push_back(fmt::format("levels={}", o.bath_levels));
    open_journal = std::make_unique<ResultJournal>(path, open_duration_journal_layout(), input_fingerprint(open_inputs));
  }
  DurationEvaluator ev(setup, journal);
  if (journal && journal->resumed() > 0 && !o.quiet)
    std::cerr << fmt::format("gapwise: resuming from {}: {} finished duration(s) reused\n", journal->path(),
                             journal->resumed());

  // The bar grows as work is scheduled (grid first, then bisection probes).
  ProgressBar bar("durations", 0, 0.0, o.quiet ? 0 : -1);
  auto write_outputs = [&](const DurationStudy* finished) {
    if (!o.out.empty()) write_duration_study_hdf5(o.out, in, ev.known(), finished);
    if (!o.csv.empty()) write_file_atomically(o.csv, duration_points_table(in, ev.known()).csv());
  };
  ev.on_batch = [&](const std::vector<double>& todo) {
    double cost = 0;
    for (double t : todo) cost += t;  // the work of an anneal grows with its duration
    bar.add_items(todo.size(), cost);
  };
  ev.on_finished = [&](const DurationPoint& p) {
    write_outputs(nullptr);
    bar.finished_item(p.duration_ns);
  };

  DurationStudyOptions so;
  so.durations_ns = grid;
  so.target = o.target;
  so.search_needed = !o.no_search;
  so.needed.relative_width = o.resolution;
  so.needed.probes_per_round = o.probes;
  so.needed.noise = p_noise;
  so.threads = threads;
  so.random_guess_probability = sudden_limit_probability(setup);
  so.extend_to_bracket = grid_chosen;  // a grid the user chose is kept as given
  const DurationStudy st = run_duration_study(ev, so);
  grid.clear();
  for (const auto& pt : st.grid) grid.push_back(pt.duration_ns);
  in.grid_ns = grid;
  bar.done();
  write_outputs(&st);
  run.results_written();

  // ---- with the bath: the grid durations again, open system, journaled in a
  // journal of their own beside the closed one (its inputs include the bath).
  std::vector<OpenDurationPoint> open_rows;
  if (bath) {
    const OpenPropagatorOptions opo = open_propagator_options(o.tolerance, o.bath_levels);
    // The work estimate: how many open-system anneals, at which K, and (after the
    // first one) a rough time, scaled by duration (the cost grows about linearly
    // with t_f at fixed K).
    std::size_t reused = 0;
    double todo_ns = 0;
    for (double t : grid) {
      if (open_journal && open_journal->find({t})) ++reused;
      else todo_ns += t;
    }
    const std::string method = resolve_open_method(opo.method, problem.qubits);
    if (!o.quiet)
      std::cerr << fmt::format(
          "gapwise: with the bath: {} open-system anneal(s) ({} from the journal {}), {}, {}; total {} ns of anneal\n",
          grid.size() - reused, reused, open_journal ? open_journal->path() : std::string("(none)"), method,
          method == "ame-truncated"
              ? (o.bath_levels > 0 ? fmt::format("K = {} fixed", o.bath_levels)
                                   : std::string("K from 6 upward until p changes less than the tolerance (a pass per K)"))
              : fmt::format("full {}x{} density matrix", 1 << problem.qubits, 1 << problem.qubits),
          fmt_num(todo_ns, 6));
    bool estimated = false;
    std::size_t simulated_before = open_journal ? open_journal->size() : 0;
    ProgressBar open_bar("durations with the bath", grid.size(), static_cast<double>(grid.size()), o.quiet ? 0 : -1);
    const auto started = std::chrono::steady_clock::now();
    open_rows = open_duration_scan(setup, *bath, grid, opo, o.target,
                                   [&](double t) { return ev.known().at(t).ground_probability; }, open_journal.get(),
                                   [&](std::size_t done) {
                                     open_bar.finished_item(1.0);
                                     const double t = grid[done - 1];
                                     const bool simulated = !open_journal || open_journal->size() > simulated_before;
                                     if (open_journal) simulated_before = open_journal->size();
                                     if (!estimated && simulated && !o.quiet && todo_ns > t) {
                                       estimated = true;
                                       const double s = std::chrono::duration<double>(
                                                            std::chrono::steady_clock::now() - started).count();
                                       std::cerr << fmt::format(
                                           "\ngapwise: with the bath: the first open-system anneal ({} ns) took {:.1f} s; "
                                           "the other {} ns need roughly {:.0f} s more (scaled linearly with t_f; longer anneals "
                                           "usually take fewer steps per ns, so this tends to be high)\n",
                                           fmt_num(t, 6), s, fmt_num(todo_ns - t, 6), s * (todo_ns - t) / t);
                                     }
                                   });
    open_bar.done();
    // The result files again, now with the open-system datasets and columns.
    in.bath = &*bath;
    in.open_rows = &open_rows;
    write_outputs(&st);
  }

  // ---- report
  DurationReport rep;
  rep.o = {o.problem, o.schedule, o.propagator, o.out, o.csv, o.target, o.tolerance, o.agreement, o.p_only};
  rep.setup = &setup;
  rep.schedule = &schedule;
  rep.study = &st;
  rep.predictions = predictions ? &*predictions : nullptr;
  rep.grid = grid;
  rep.grid_chosen = grid_chosen;
  rep.known = &ev.known();
  rep.p_noise = p_noise;
  rep.threads = threads;
  rep.simulated = ev.simulated();
  if (journal) rep.journal_path = journal->path();
  if (bath) {
    rep.with_bath = true;
    rep.open_text = open_durations_text(*bath, open_rows);
    put_open_durations_json(rep.open_json, *bath, open_rows);
  }
  if (o.json) print_duration_report_json(rep, std::cout);
  else print_duration_report_text(rep, std::cout);
}

}  // namespace

void register_durations(CLI::App& app) {
  auto o = std::make_shared<DurationsOptions>();
  CLI::App* sub = app.add_subcommand("durations",
      "How long must PROBLEM be annealed along SCHEDULE? Simulates the ground-state\n"
      "probability p(t_f) for a range of durations t_f (the schedule's path shape\n"
      "stretched to each), and reports:\n"
      "  - time to solution TTS = t_f ln(1-p*)/ln(1-p) (t_f when p >= p*; infinite for p = 0)\n"
      "    and the t_f that minimises it;\n"
      "  - the shortest t_f with p >= p*, by bisection between sampled durations, with\n"
      "    every stretch where p(t_f) falls (oscillations) reported;\n"
      "  - beside the simulation: the Landau-Zener prediction at the minimum gap and the\n"
      "    adiabatic-condition estimate, judged on p and 1 - p (within --agreement, a factor)\n"
      "    and on the duration each predicts for p* against the simulated one.\n"
      "Without --durations the grid is chosen around the predictions and extended\n"
      "(within 0.05 .. 10000 ns) until the TTS optimum is bracketed. The durations whose TTS\n"
      "is within 5 % of the best are reported (a flat TTS makes the optimum grid-dependent).\n" +
      std::string(kRandomGuessLimitText) + "\n"
      "Durations run in parallel (one anneal per thread); results equal a serial run.\n"
      "With --out or --csv, each finished duration is journaled to <file>.journal and the\n"
      "files are rewritten atomically; rerunning the same command skips finished points.\n"
      "Example: gapwise durations data-samples/triangle.toml schedules/linear.toml -d log:0.5:50:9 --out tri.h5");
  sub->add_option("problem", o->problem, "problem file (TOML)")->required()->check(readable_input_file());
  sub->add_option("schedule", o->schedule, "schedule file (TOML); its path shape is stretched to each duration")
      ->required()->check(readable_input_file());
  add_durations_option(sub, o->durations,
                       "durations in ns: a LIST such as 5,10,20,40 or log:1:1000:13 (default: 10 points from a fifth\n"
                       "of the smaller to 5 x the larger predicted duration; log:1:300:10 with --no-predictions)");
  sub->add_option("--target", o->target, "target success probability p* for TTS and the duration needed")->capture_default_str();
  sub->add_option("--resolution", o->resolution, "bisection stops when the bracket's upper/lower - 1 is below this")
      ->capture_default_str();
  sub->add_option("--probes", o->probes, "durations probed per bisection round (run in parallel; fixed, so results do not depend on threads)")
      ->capture_default_str();
  sub->add_flag("--no-search", o->no_search, "skip the bisection for the duration needed");
  sub->add_flag("--no-predictions", o->no_predictions, "skip the gap search and the Landau-Zener / adiabatic predictions");
  sub->add_option("--agreement", o->agreement,
                  "factor F: a prediction agrees at t_f when p and 1 - p of prediction and simulation each\n"
                  "differ by at most F (either way; values below the accuracy of p count as equal; 1 - p\n"
                  "decides near p = 1), and its duration for p* when\n"
                  "it is within F of the simulated one")->capture_default_str();
  sub->add_option("--tolerance", o->tolerance, "target accuracy of each simulated p")->capture_default_str();
  sub->add_flag("--p-only", o->p_only,
                "hold only p to the tolerance, not also every other set of outcomes to 100x it (the study\n"
                "reads p alone; split propagators then often need fewer steps)");
  list_propagator_names(sub->add_option("--propagator", o->propagator, "which propagator runs the dynamics")
      ->check(CLI::IsMember(propagator_names()))->capture_default_str(), propagator_names());
  add_frame_above_option(sub, o->frame_above);
  sub->add_option("--threads", o->threads, "threads (one duration each); 0: all cores (OMP_NUM_THREADS)")->capture_default_str();
  sub->add_option("--out", o->out, "HDF5 result file (all curves, predictions, inputs, tool version)");
  sub->add_option("--csv", o->csv, "CSV with one row per simulated duration");
  sub->add_flag("--fresh", o->fresh, "discard the journal of an earlier run and start afresh");
  sub->add_flag("-q,--quiet", o->quiet, "no progress bar or resume message on stderr");
  add_bath_option(sub, o->bath);
  add_bath_levels_option(sub, o->bath_levels);
  add_allow_long_flag(sub, o->allow_long);
  sub->add_flag("--json", o->json, "print a JSON summary instead of text");
  sub->callback([o] { run_durations(*o); });
}

}  // namespace gapwise::cli
