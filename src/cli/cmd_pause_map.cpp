// `gapwise pause-map PROBLEM SCHEDULE -d T --at S-LIST --pause-ns D-LIST --out map.h5`:
// p over pause location x pause duration, at equal cost; threaded, resumable.
#include <iostream>
#include <limits>
#include <memory>
#include <optional>

#include <fmt/format.h>

#include "cli/cli_common.hpp"
#include "cli/input_loading.hpp"
#include "cli/journaled_run.hpp"
#include "io/output_paths.hpp"
#include "dynamics/anneal_simulation.hpp"
#include "hamiltonian/memory_budget.hpp"
#include "io/input_error.hpp"
#include "io/toml_reader.hpp"
#include "cli/bath_option.hpp"
#include "io/atomic_file.hpp"
#include "io/pause_map_report.hpp"
#include "studies/open_pause_map.hpp"
#include "studies/shape_maps.hpp"
#include "studies/work_estimate.hpp"

namespace gapwise::cli {
namespace {

struct PauseMapCli {
  double frame_above = std::numeric_limits<double>::quiet_NaN();  ///< --frame-above (NaN: the cost model)
  std::string problem, schedule, out, durations, at = "lin:0.2:0.8:7", pause_ns = "0,5,10,20", cost = "total", propagator = "auto", bath;
  double duration_ns = 0;  // from `durations`, one value
  double tolerance = 1e-6, target = kDefaultTargetProbability;
  int threads = 0, bath_levels = 0;
  bool json = false, allow_long = false, fresh = false, quiet = false;
};

void run_pause_map(PauseMapCli o) {
  const RunInputs loaded = load_run_inputs(RunFiles{}.problem(o.problem).schedule(o.schedule).bath(o.bath).plan(
      FilePlan{}.output(o.out, "--out").journal_of(o.out)));
  const IsingProblem& p = loaded.problem();
  const Schedule& sch = loaded.schedule;
  const std::optional<OhmicBath>& bath = loaded.bath;
  check_bath_levels(o.bath_levels, bath.has_value(), p.qubits);
  check_output_path(o.out, "--out");
  check_target_probability(o.target);
  check_tolerance(o.tolerance);
  check_frame_above(o.frame_above, o.propagator);
  check_threads(o.threads);
  loaded.check_memory(10);
  PauseMapOptions mo;
  o.duration_ns = parse_single_value(o.durations, "--durations", ListOf::Durations, "a pause map holds one anneal duration",
                                     "give one duration and run one map per duration");
  mo.pause_s = parse_value_list(o.at, "--at");
  mo.pause_ns = parse_value_list(o.pause_ns, "--pause-ns", ListOf::Durations);
  mo.duration_ns = o.duration_ns;
  mo.cost = o.cost == "added" ? PauseCost::AddedTime : PauseCost::EqualTotal;
  mo.target_probability = o.target;
  mo.threads = o.threads;
  SimulationOptions sim;
  sim.propagator = o.propagator;
  sim.choice.frame_above_ns = o.frame_above;
  sim.propagation.tolerance = o.tolerance;
  WorkEstimate work;
  for (double pause : mo.pause_ns) {
    const double run_ns = mo.cost == PauseCost::AddedTime ? o.duration_ns + pause : o.duration_ns;
    work += anneal_work(p, sch.scales, run_ns, static_cast<double>(mo.pause_s.size()) + 1.0);  // + the unpaused reference
  }
  check_work_limit(work, o.allow_long, {"--pause-ns", 0, 0, "--pause-ns"});
  const AnnealSetup setup(p, sch, sim);
  JournaledRun run(o.out, o.fresh, pause_map_journal_layout(),
                   input_fingerprint({read_text_file(o.problem), read_text_file(o.schedule), fmt::format("{:a}", o.duration_ns),
                                      o.cost, fmt::format("{:a}", o.tolerance), o.propagator}),
                   {o.out});
  const PauseMap m = pause_map(setup, mo, run.journal(), AnnealCounter(o.quiet));
  const bool tty = ::isatty(2) && !o.quiet;
  // With the bath: the same paths once more, open system (serial, not journaled).
  std::optional<OpenPauseMap> open;
  if (bath) {
    open = open_pause_map(setup, mo, *bath, open_propagator_options(o.tolerance, o.bath_levels),
                          [&](std::size_t done, std::size_t total) {
                            if (tty) std::cerr << fmt::format("\r{} / {} anneals with the bath", done, total) << std::flush;
                          });
    if (tty) std::cerr << "\n";
  }

  PauseMapReport rep;
  rep.problem_file = o.problem;
  rep.schedule_file = o.schedule;
  rep.out = o.out;
  rep.journal_file = run.journal()->path();
  rep.tolerance = o.tolerance;
  rep.problem = &p;
  rep.map = &m;
  rep.open = open ? &*open : nullptr;
  std::cout << (o.json ? pause_map_report_json(rep) : pause_map_report_text(rep));
  write_pause_map_result(o.out, rep, command_line());
  if (!o.json) std::cout << fmt::format("wrote {}\n", o.out);
}

}  // namespace

void register_pause_map(CLI::App& app) {
  auto o = std::make_shared<PauseMapCli>();
  CLI::App* sub = app.add_subcommand("pause-map",
      "Does a pause help, where and for how long? Ground-state probability over pause location\n"
      "(--at, schedule parameter s) x pause duration (--pause-ns), inserted into SCHEDULE's path, at\n"
      "equal cost: with --cost total (default) every run takes --durations and the pause eats\n"
      "into the ramp; with --cost added the ramp keeps --durations and the pause adds to it\n"
      "(the unpaused reference is then stretched to the same total, and TTS counts the pause).\n"
      "Runs in parallel (OpenMP; same numbers at any thread count) and resumes: finished points\n"
      "are journaled beside --out and a rerun skips them (also after Ctrl-C).\n"
      "Example: gapwise pause-map data-samples/triangle.toml schedules/linear.toml -d 5 \\\n"
      "           --at lin:0.3:0.9:7 --pause-ns 0,1,2,4 --out pause-map.h5");
  sub->add_option("problem", o->problem, "problem file (TOML)")->required()->check(readable_input_file());
  sub->add_option("schedule", o->schedule, "forward schedule: its scales and path shape")->required()->check(readable_input_file());
  add_durations_option(sub, o->durations, "anneal duration T in ns, one value (see --cost)")->required();
  add_list_option(sub, "--at", o->at, "pause locations s, a LIST such as 0.3,0.5 or lin:0.3:0.9:7")->capture_default_str();
  add_list_option(sub, "--pause-ns", o->pause_ns, "pause durations in ns (0: no pause), a LIST")->capture_default_str();
  sub->add_option("--cost", o->cost, "\"total\": runs take T; \"added\": runs take T + pause")
      ->check(CLI::IsMember({"total", "added"}))->capture_default_str();
  sub->add_option("--target", o->target, "target success probability of the time to solution")->capture_default_str();
  sub->add_option("--tolerance", o->tolerance, "target accuracy of p")->capture_default_str();
  list_propagator_names(sub->add_option("--propagator", o->propagator, "which propagator runs the dynamics")
      ->check(CLI::IsMember(propagator_names()))->capture_default_str(), propagator_names());
  add_frame_above_option(sub, o->frame_above);
  sub->add_option("--threads", o->threads, "OpenMP threads (0: default)")->capture_default_str();
  sub->add_option("-o,--out", o->out, "HDF5 result (heat-map ready); the journal is <out>.journal")->required();
  sub->add_flag("--fresh", o->fresh, "discard the journal of an earlier run and start afresh");
  sub->add_flag("-q,--quiet", o->quiet, "no progress on stderr");
  add_bath_option(sub, o->bath);
  add_bath_levels_option(sub, o->bath_levels);
  add_allow_long_flag(sub, o->allow_long);
  sub->add_flag("--json", o->json,
                "print a JSON summary instead of the table: the grid, p per cell (rows: --at), the unpaused\n"
                "reference per pause duration, and the best cell (largest gain over its reference)");
  sub->callback([o] { run_pause_map(*o); });
}

}  // namespace gapwise::cli
