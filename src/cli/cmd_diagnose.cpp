// `gapwise diagnose PROBLEM SCHEDULE -d T [-d T2 ...]`: why an anneal loses the
// ground state. Ranked loss channels with one-line verdicts; the library
// (studies/loss_diagnosis.hpp) does the work, io/diagnosis_output.hpp prints it.
#include <cmath>
#include <iostream>

#include <unistd.h>
#include <memory>
#include <optional>

#include <fmt/format.h>

#include "cli/bath_option.hpp"
#include "cli/cli_common.hpp"
#include "cli/input_loading.hpp"
#include "io/output_paths.hpp"
#include "dynamics/anneal_simulation.hpp"
#include "hamiltonian/memory_budget.hpp"
#include "io/atomic_file.hpp"
#include "io/diagnosis_output.hpp"
#include "io/input_error.hpp"
#include "io/thermal_channel_output.hpp"
#include "studies/thermal_channel.hpp"
#include "studies/work_estimate.hpp"

namespace gapwise::cli {
namespace {

struct DiagnoseOptions {
  std::string problem, schedule, out, durations, bath, propagator = SimulationOptions{}.propagator;
  std::optional<double> control_tolerance;
  double tolerance = 1e-6, sigma_h = 0.03, sigma_j = 0.03, window = 5.0, target_loss = 0.01, check_max_ns = 10000.0;
  bool sigma_h_given = false, sigma_j_given = false, thermal_points_given = false;
  bool relative = false, json = false, quiet = false, no_control_gaps = false, allow_long = false;
  int levels = 4, threads = 0, thermal_points = 41;
  long long samples = 100;
  unsigned long long seed = 1;
};

void run_diagnose(const DiagnoseOptions& o) {
  const std::vector<double> durations_ns = parse_value_list(o.durations, "--durations", ListOf::Durations);
  const RunInputs loaded = load_run_inputs(
      RunFiles{}.problem(o.problem).schedule(o.schedule).bath(o.bath).plan(FilePlan{}.output(o.out, "--out")));
  const IsingProblem& p = loaded.problem();
  const Schedule& sch = loaded.schedule;
  const std::optional<OhmicBath>& bath = loaded.bath;
  if (bath) check_thermal_channel_size(p.qubits);
  if (!bath && o.thermal_points_given)
    throw InputError({"--thermal-points", 0, 0, "--thermal-points"}, "--thermal-points is for the thermal channel",
                     "add --bath FILE, or leave out --thermal-points");
  check_tolerance(o.tolerance);
  check_sigma(o.sigma_h, "--sigma-h");
  check_sigma(o.sigma_j, "--sigma-j");
  check_threads(o.threads);
  if (o.control_tolerance) check_tolerance(*o.control_tolerance, "--control-tolerance");
  check_count(o.levels, kSpectrumLevels, "--levels");
  check_count(o.samples, kControlSamples, "--samples");
  check_target_loss_value(o.target_loss, {"--target-loss", 0, 0, "--target-loss"});
  check_max_check_ns_value(o.check_max_ns, {"--check-max-ns", 0, 0, "--check-max-ns"});
  check_window_value(o.window, {"--window", 0, 0, "--window"});
  if (!o.out.empty()) check_output_path(o.out, "--out");
  loaded.check_memory(12);

  DiagnosisOptions d;
  d.durations_ns = durations_ns;
  d.simulation.propagator = o.propagator;
  d.simulation.propagation.tolerance = o.tolerance;
  d.gap.levels = o.levels;
  d.overlap.levels = o.levels;
  d.window_factor = o.window;
  d.target_loss = o.target_loss;
  d.check_max_ns = o.check_max_ns;
  d.control_sigma_h_given = o.sigma_h_given;
  d.control_sigma_j_given = o.sigma_j_given;
  d.control_gaps = !o.no_control_gaps;
  d.control_tolerance = o.control_tolerance;
  {
    // The work with the given sigmas; the option named is the one that makes it
    // huge: the durations when even the run without control errors is over the
    // limit, else the sigma(s) whose widened fields and couplings push it over.
    auto work_with = [&](double sigma_h, double sigma_j) {
      WorkEstimate work = spectrum_work(p.qubits, o.levels, 300.0);
      for (double t : durations_ns) {
        work += anneal_work(p, sch.scales, t);
        work += perturbed_anneal_work(p, sch.scales, sigma_h, sigma_j, o.relative, t, static_cast<double>(o.samples));
      }
      work += spectrum_work(p.qubits, o.levels, o.no_control_gaps ? 0.0 : 300.0 * static_cast<double>(o.samples));
      return work;
    };
    const WorkEstimate work = work_with(o.sigma_h, o.sigma_j);
    std::string key = "--durations";
    if (!(work_with(0, 0).operations > kWorkLimitOperations)) {
      const bool by_h = work_with(o.sigma_h, 0).operations > kWorkLimitOperations;
      const bool by_j = work_with(0, o.sigma_j).operations > kWorkLimitOperations;
      key = by_h && !by_j ? "--sigma-h" : by_j && !by_h ? "--sigma-j" : "--sigma-h / --sigma-j";
    }
    check_work_limit(work, o.allow_long, {key, 0, 0, key});
  }
  if (o.samples > 0) {
    ControlEnsembleOptions c;
    c.model = {o.sigma_h, o.sigma_j, o.relative};
    c.samples = static_cast<std::uint64_t>(o.samples);
    c.seed = o.seed;
    c.threads = o.threads;
    d.control = c;
  }
  // Progress only on a terminal: logs and pipes stay clean.
  if (!o.quiet && ::isatty(STDERR_FILENO))
    d.progress = [](const DiagnosisProgress& pr) {
      std::cerr << fmt::format("\r[diagnose] {} {}/{}   ", pr.stage, pr.done, pr.total);
      if (pr.done == pr.total) std::cerr << "\n";
    };
  const Diagnosis result = diagnose_anneal(p, sch, d);
  std::optional<ThermalChannel> thermal;
  std::vector<double> closed_p;
  if (bath) {
    for (const auto& r : result.runs) closed_p.push_back(r.anneal.ground_probability);
    ThermalChannelOptions to;
    to.levels = o.levels;
    to.points = o.thermal_points;
    to.tolerance = o.tolerance;
    for (const AvoidedCrossing& c : result.crossings) {
      to.extra_s.push_back(c.minimum.s);
      to.extra_s.push_back(c.window_s_before);
      to.extra_s.push_back(c.window_s_after);
    }
    if (!o.quiet && ::isatty(STDERR_FILENO))
      to.progress = [&](std::size_t k, const PropagationProgress& pr) {
        std::cerr << fmt::format("\r[diagnose] thermal channel {}/{}: pass {} {:3.0f} %   ", k + 1, durations_ns.size(),
                                 pr.pass, 100 * pr.fraction);
      };
    const TransverseIsingHamiltonian H(p);
    thermal = thermal_channel(H, result.ground, sch, durations_ns, *bath, to);
    if (to.progress) std::cerr << "\n";
  }
  const DiagnosisContext ctx{o.problem, o.schedule, command_line(), p.qubits, sch.description};
  if (o.json) {
    toml::table j = diagnosis_json(result, ctx);
    if (thermal) j.insert_or_assign("thermal", thermal_channel_json(*thermal, *bath, closed_p));
    std::cout << to_json(j) << "\n";
  } else {
    std::cout << diagnosis_report_text(result, ctx);
    if (thermal)
      std::cout << thermal_channel_text(*thermal, *bath, closed_p, result.gap.gap_ghz, result.gap.s_star);
  }
  if (!o.out.empty())
    write_diagnosis_hdf5(result, ctx, o.out, [&](Hdf5Output& h5) {
      if (thermal) write_thermal_channel_hdf5(h5, *thermal, *bath, closed_p);
    });
}

}  // namespace

void register_diagnose(CLI::App& app) {
  auto o = std::make_shared<DiagnoseOptions>();
  CLI::App* sub = app.add_subcommand("diagnose",
      "Why does an anneal of PROBLEM along SCHEDULE lose the ground state? For each\n"
      "duration, a ranked list of loss channels with a one-line verdict each:\n"
      "  avoided crossing  each interior gap minimum: s*, Delta_min, the Landau-Zener\n"
      "                    loss predicted and the population the simulation moves\n"
      "                    out of the levels ending in the ground manifold there;\n"
      "  perturbative crossing  a crossing where the ground level switches from an\n"
      "                    excited classical level to the ground manifold (Amin &\n"
      "                    Choi 2009; faster anneals end on the excited level);\n"
      "  end gap           the smallest gap sits at an end of the path (a small final\n"
      "                    classical gap): population lost where it has not opened;\n"
      "  elsewhere         loss not at a gap minimum (or population regained outside\n"
      "                    the crossing windows, shown as a gain: the rows add up to 1 - p);\n"
      "  unfair sampling   a degenerate ground manifold shared unevenly (costs no p);\n"
      "  control errors    Monte Carlo over Gaussian errors on h and J: how often the\n"
      "                    programmed problem has another ground state, and the further\n"
      "                    loss of mean p on top of 1 - p (default sigmas are illustrative).\n"
      "Each crossing's verdict gives the duration a Landau-Zener extrapolation needs for\n"
      "--target-loss there, and the loss and p of one anneal simulated at it.\n"
      "A crossing window wider than half the path is flagged broad: not an isolated\n"
      "two-level crossing, so Landau-Zener is only indicative there.\n"
      "Also where the lost probability goes (excited states, energies, spin flips to\n"
      "the nearest ground state). Forward anneals only (s never decreasing).\n"
      "Example: gapwise diagnose data-samples/weak-field-ring.toml schedules/linear.toml -d 20,200 --out why.h5");
  sub->add_option("problem", o->problem, "problem file (TOML)")->required()->check(readable_input_file());
  sub->add_option("schedule", o->schedule, "schedule file (TOML)")->required()->check(readable_input_file());
  add_durations_option(sub, o->durations, "anneal durations in ns, a LIST such as 20,200")->required();
  sub->add_option("--tolerance", o->tolerance, "target accuracy of the simulated probabilities")->capture_default_str();
  list_propagator_names(sub->add_option("--propagator", o->propagator, "which propagator runs the dynamics")
      ->check(CLI::IsMember(propagator_names()))->capture_default_str(), propagator_names());
  sub->add_option("--levels", o->levels, "lowest levels tracked in the gap search and overlap track")->capture_default_str();
  sub->add_option("--window", o->window,
                  "populations around a crossing are read where the gap is this many times Delta_min")->capture_default_str();
  sub->add_option("--target-loss", o->target_loss,
                  "loss per crossing the verdicts size the duration for (Landau-Zener)")->capture_default_str();
  sub->add_option("--check-max-ns", o->check_max_ns,
                  "simulate the Landau-Zener duration of each crossing only up to this many ns (0: never)")
      ->capture_default_str();
  sub->add_option("--sigma-h", o->sigma_h,
                  "control error on each field h_i (standard deviation; the default is illustrative, give your device's)")
      ->capture_default_str();
  sub->add_option("--sigma-j", o->sigma_j,
                  "control error on each programmed coupling J_ij (default illustrative, give your device's)")
      ->capture_default_str();
  sub->add_flag("--relative", o->relative, "sigmas are fractions of |h_i| and |J_ij| instead of absolute values");
  sub->add_option("--samples", o->samples, "Monte Carlo samples of control errors (0: skip)")->capture_default_str();
  sub->add_option("--seed", o->seed, "seed of the Monte Carlo (stored in the output)")->capture_default_str();
  sub->add_option("--threads", o->threads, "threads for the Monte Carlo (0: OpenMP default; results do not depend on it)")
      ->capture_default_str();
  sub->add_option("--control-tolerance", o->control_tolerance,
                  "propagator tolerance of the perturbed anneals (default: --tolerance; looser is faster)");
  sub->add_flag("--no-control-gaps", o->no_control_gaps, "skip the gap search of every perturbed problem (faster)");
  sub->add_option("--out", o->out, "write an HDF5 file (curves, crossings, per-duration results, every sample)");
  add_bath_option(sub, o->bath)->description(
      "add a thermal channel with the bath of FILE (format gapwise-bath): level populations along s from\n"
      "the adiabatic master equation, the gap against k_B T/h, and where relaxation freezes out\n"
      "(dense spectra along s: at most 9 qubits; see the user guide, 'diagnose --bath')");
  sub->add_option("--thermal-points", o->thermal_points,
                  "with --bath: observations along s (evenly in s, plus the path's waypoints and the gap minima)")
      ->capture_default_str()->check(CLI::Range(2, 2001));
  sub->add_flag("--json", o->json, "print JSON instead of the text report");
  sub->add_flag("-q,--quiet", o->quiet, "no progress on stderr");
  add_allow_long_flag(sub, o->allow_long);
  sub->callback([o, sub] {
    o->sigma_h_given = sub->count("--sigma-h") > 0;
    o->sigma_j_given = sub->count("--sigma-j") > 0;
    o->thermal_points_given = sub->count("--thermal-points") > 0;
    run_diagnose(*o);
  });
}

}  // namespace gapwise::cli
