// `gapwise ensemble SET SCHEDULE`: minimum gap, p(t_f) and the optimal TTS for
// every instance of a set, and per size the median and quantiles with bootstrap
// intervals. Runs on threads, or under mpirun on every rank; resumable from its
// journal; `--shard i/N` for job arrays, merged by `gapwise merge-shards`.
#include <algorithm>
#include <iostream>
#include <limits>
#include <memory>
#include <optional>
#include <thread>

#include <fmt/format.h>

#include "cli/bath_option.hpp"
#include "cli/cli_common.hpp"
#include "cli/input_loading.hpp"
#include "cli/journaled_run.hpp"
#include "io/output_paths.hpp"
#include "io/infinite_tts.hpp"
#include "io/atomic_file.hpp"
#include "io/ensemble_report.hpp"
#include "io/ensemble_result_file.hpp"
#include "io/input_error.hpp"
#include "io/json_summary.hpp"
#include "io/result_journal.hpp"
#include "io/terminal_text.hpp"
#include "io/text_table.hpp"
#include "io/toml_reader.hpp"
#include "studies/ensemble_study.hpp"
#include "studies/work_distribution.hpp"
#include "studies/work_estimate.hpp"
#include "platform/thread_count.hpp"

namespace gapwise::cli {
namespace {

struct EnsembleOptions {
  double frame_above = std::numeric_limits<double>::quiet_NaN();  ///< --frame-above (NaN: the cost model)
  std::string set, schedule, out, csv, durations = "0.1,0.2,0.5,1,2,5,10,20,50,100", shard = "0/1", quantiles = "0.25,0.5,0.75";
  std::string propagator = "auto", bath;
  double target = kDefaultTargetProbability, tolerance = 1e-6, confidence = 0.95, gap_s_tolerance = 1e-6;
  int threads = 0, resamples = 2000, gap_points = 101, bath_levels = 0;
  unsigned long long bootstrap_seed = 1;
  bool fresh = false, quiet = false, json = false, allow_long = false;
};

}  // namespace

namespace {

void run_ensemble(const EnsembleOptions& o) {
  ProcessGroup& group = ProcessGroup::instance();
  try {
    const RunInputs loaded = load_run_inputs(RunFiles{}.instance_set(o.set).schedule(o.schedule).bath(o.bath).plan(
        FilePlan{}.output(o.out, "--out").journal_of(o.out).output(o.csv, "--csv")));
    const InstanceSet& set = *loaded.instance_set;
    const std::string schedule_text = read_text_file(o.schedule);
    const Schedule& sch = loaded.schedule;
    check_output_path(o.out, "--out");
    if (!o.csv.empty()) check_output_path(o.csv, "--csv");
    check_target_probability(o.target);
    check_tolerance(o.tolerance);
    check_frame_above(o.frame_above, o.propagator);
    check_threads(o.threads);
    EnsembleSettings st;
    st.durations_ns = parse_value_list(o.durations, "--durations", ListOf::Durations);
    st.target_probability = o.target;
    st.simulation.propagator = o.propagator;
    st.simulation.choice.frame_above_ns = o.frame_above;
    st.simulation.propagation.tolerance = o.tolerance;
    st.gap_coarse_points = o.gap_points;
    st.gap_s_tolerance = o.gap_s_tolerance;
    st.quantile_levels = parse_value_list(o.quantiles, "--quantiles");
    st.confidence_level = o.confidence;
    st.bootstrap_resamples = o.resamples;
    if (o.bootstrap_seed > (1ULL << 63) - 1)
      throw InputError({"--bootstrap-seed", 0, 0, "--bootstrap-seed"}, "the seed must fit in 63 bits", "use a smaller seed");
    st.bootstrap_seed = o.bootstrap_seed;
    if (!o.bath.empty() || o.bath_levels != 0) {
      // The bath must hold the largest instance (the shared size check of
      // --bath) and --bath-levels K must fit the smallest one.
      int largest = 0, smallest = 0;
      std::string largest_name;
      for (const auto& inst : set.instances) {
        if (inst.problem.qubits > largest) largest_name = inst.name;
        largest = std::max(largest, inst.problem.qubits);
        smallest = smallest == 0 ? inst.problem.qubits : std::min(smallest, inst.problem.qubits);
      }
      check_bath_levels(o.bath_levels, !o.bath.empty(), smallest);
      try {
        st.bath = load_bath(o.bath, largest);
      } catch (const InputError& e) {  // the shared check speaks of "the problem": name the instance
        throw InputError(e.place(), fmt::format("instance '{}' of the set: {}", terminal_text(largest_name), e.problem()),
                         e.fix());
      }
      st.open = open_propagator_options(o.tolerance, o.bath_levels);
    }
    st.validate();

    EnsembleRun run{set, sch, schedule_text, st, ShardSpec{}, 1, {}, {}};
    run.shard = ShardSpec::parse(o.shard);
    WorkEstimate work;
    for (std::size_t i = 0; i < set.instances.size(); ++i) {
      if (!run.shard.contains(i)) continue;
      const IsingProblem& ip = set.instances[i].problem;
      for (double t : st.durations_ns) work += anneal_work(ip, sch.scales, t);
      // The master equation costs far more than the closed anneal, so this
      // estimate is low with a bath; the size check of --bath bounds it.
      work += spectrum_work(ip.qubits, 4, 3.0 * st.gap_coarse_points);
    }
    check_work_limit(work, o.allow_long, {"--durations", 0, 0, "--durations"});
    run.threads = thread_count_or_default(o.threads);
    if (!o.quiet)
      run.progress = [](const EnsembleProgress& p) {
        const double eta = p.seconds_left();
        std::cerr << fmt::format("[{}/{}] {} (n={}): gap {} GHz, best TTS {} ns{}  ({:.2f} s; {:.0f} s elapsed, ~{:.0f} s left)\n",
                                 p.done, p.total, terminal_text(p.last->name), p.last->qubits, fmt_num(p.last->gap_ghz, 4),
                                 tts_text(p.last->tts_ns, 4),
                                 p.last->bath_ground_probability.empty()
                                     ? std::string()
                                     : fmt::format(", with the bath {} ns", tts_text(p.last->bath_tts_ns, 4)),
                                 p.last->wall_seconds, p.elapsed_seconds, eta);
      };
    // The one resumable-run scaffold, opened by the study on the collecting rank
    // once every instance passed its checks: --fresh, the journal, and the
    // Ctrl-C notice that says how many instances the journal holds.
    std::optional<JournaledRun> journaled;
    run.open_journal = [&](JournalLayout layout, const std::string& fingerprint) {
      journaled.emplace(o.out, o.fresh, std::move(layout), fingerprint, std::vector<std::string>{o.out, o.csv},
                        "instance");
      return journaled->journal();
    };
    EnsembleResult r;
    try {
      r = run_ensemble_study(run);
    } catch (const InputError&) {
      // A refused run (exit 2) leaves no new journal, even when instances finished
      // before the bad one was found: the run was refused, not interrupted.
      if (journaled) journaled->discard_if_new();
      throw;
    }
    if (!r.complete_here) return;  // other ranks: rank 0 writes and prints
    write_ensemble_result(o.out, r, command_line(), {o.schedule});
    if (journaled) journaled->results_written();
    if (o.json) print_ensemble_json(r, o.csv);
    else print_ensemble_summary(r, o.out, o.csv);
  } catch (const std::exception& e) {
    if (group.size() <= 1) throw;
    // Several ranks: report once per rank and end the whole job, so no rank
    // waits forever for one that failed.
    std::cerr << (group.is_collector() ? "gapwise: error: " : fmt::format("gapwise (rank {}): error: ", group.rank()))
              << e.what() << "\n";
    group.abort(dynamic_cast<const InputError*>(&e) ? kExitBadInput : kExitInternal);
  }
}

}  // namespace

void register_ensemble(CLI::App& app) {
  auto o = std::make_shared<EnsembleOptions>();
  CLI::App* sub = app.add_subcommand("ensemble",
      "Study every instance of SET (an HDF5 set from `gapwise generate`, or a directory of\n"
      "problem files) along SCHEDULE: the minimum gap, the ground-state probability p(t_f)\n"
      "at each duration, and the best time to solution TTS = t_f ln(1-p*)/ln(1-p(t_f))\n"
      "over those durations. Per size: quantiles of the best TTS and of the gap, each with\n"
      "a seeded percentile-bootstrap confidence interval.\n"
      "Runs on --threads; under mpirun it spreads the instances over all ranks (rank 0\n"
      "writes). Finished instances go to OUT.journal at once: rerun the same command after\n"
      "a crash or kill and it carries on. For job arrays, run --shard i/N per job and\n"
      "join the results with `gapwise merge-shards`. Results are identical bit for bit\n"
      "whatever the thread, rank or shard count.\n"
      "The TTS optimum is only bracketed when the durations reach below it: with GHz\n"
      "energy scales that means well below 1 ns (column `TTS at range edge`).\n"
      "With --bath FILE every anneal also runs as the adiabatic master equation with that\n"
      "ohmic bath: p and the best TTS with the bath beside the closed ones, per instance\n"
      "and per size (journaled and merged like the rest).\n" +
      std::string(kRandomGuessLimitText) + "\n"
      "Example: gapwise ensemble glasses.h5 schedules/linear.toml -d 0.1,0.2,0.5,1,2,5,10,30 --out study.h5\n"
      "         mpirun -np 8 gapwise ensemble glasses.h5 schedules/linear.toml --out study.h5");
  sub->add_option("set", o->set, "instance set: HDF5 file or directory of problem files")->required();
  sub->add_option("schedule", o->schedule, "schedule file (TOML)")->required()->check(readable_input_file());
  sub->add_option("--out", o->out, "result file (HDF5); its journal is OUT.journal")->required();
  add_durations_option(sub, o->durations, "anneal durations in ns, a LIST such as 1,10,100 or log:0.1:100:10")
      ->capture_default_str();
  sub->add_option("--target", o->target, "success probability p* the TTS aims at")->capture_default_str();
  sub->add_option("--threads", o->threads, "compute threads without MPI (0: one per core)")->capture_default_str();
  sub->add_option("--shard", o->shard, "compute only instances i with i % N == s: --shard s/N")->capture_default_str();
  sub->add_flag("--fresh", o->fresh, "ignore and delete the journal of an earlier run of this study");
  add_list_option(sub, "--quantiles", o->quantiles, "quantile levels reported per size")->capture_default_str();
  sub->add_option("--confidence", o->confidence, "confidence level of the bootstrap intervals")->capture_default_str();
  sub->add_option("--resamples", o->resamples, "bootstrap resamples")->capture_default_str();
  sub->add_option("--bootstrap-seed", o->bootstrap_seed, "seed of the bootstrap resampling (stored in the result)")
      ->capture_default_str();
  list_propagator_names(sub->add_option("--propagator", o->propagator, "which propagator runs the anneals")
      ->check(CLI::IsMember(propagator_names()))->capture_default_str(), propagator_names());
  add_frame_above_option(sub, o->frame_above);
  sub->add_option("--tolerance", o->tolerance, "target accuracy of each ground-state probability")->capture_default_str();
  sub->add_option("--gap-points", o->gap_points, "gap search: uniform scan points before refinement")->capture_default_str();
  sub->add_option("--gap-s-tolerance", o->gap_s_tolerance, "gap search: precision of s*")->capture_default_str();
  sub->add_option("--csv", o->csv, "also write the per-size table as CSV");
  add_bath_option(sub, o->bath);
  add_bath_levels_option(sub, o->bath_levels);
  sub->add_flag("-q,--quiet", o->quiet, "no progress lines on stderr");
  add_allow_long_flag(sub, o->allow_long);
  sub->add_flag("--json", o->json,
                "print a JSON summary instead of the table: settings, and per size (`sizes`) the instance count, "
                "`tts_ns` and `gap_ghz` as lists of {q, value, ci_low, ci_high}, `tts_at_range_edge`, `never_solved`");
  sub->callback([o] { run_ensemble(*o); });
}

}  // namespace gapwise::cli
