// `gapwise anneal PROBLEM SCHEDULE`: one anneal of a given duration; the
// ground-state probability, the most probable outcomes, and the checks that
// make the number trustworthy (norm drift, convergence under a tighter tolerance).
#include <limits>
#include <algorithm>
#include <cmath>
#include <iostream>
#include <memory>
#include <optional>

#include <fmt/format.h>

#include "cli/cli_common.hpp"
#include "io/output_paths.hpp"
#include "dynamics/accuracy_guard.hpp"
#include "dynamics/anneal_simulation.hpp"
#include "frame/frame_point_cache.hpp"
#include "dynamics/level_population_observer.hpp"
#include "hamiltonian/memory_budget.hpp"
#include "io/atomic_file.hpp"
#include "io/hdf5_output.hpp"
#include "io/input_error.hpp"
#include "cli/bath_option.hpp"
#include "io/json_summary.hpp"
#include "io/progress_bar.hpp"
#include "io/terminal_text.hpp"
#include "io/text_table.hpp"
#include "studies/work_estimate.hpp"

namespace gapwise::cli {
namespace {

struct AnnealOptions {
  std::string problem, schedule, out, csv, propagator = "split-auto", observe_s, durations, bath;
  double tolerance = 1e-6;
  bool p_only = false;
  int trace_points = 20, top = 8, levels = 0;
  bool json = false, no_check = false, strict = false, allow_long = false, quiet = false, progress = false;
};

// Runs estimated below this many seconds of one core show no progress unless --progress asks.
constexpr double kProgressAfterSeconds = 2.0;

void run_anneal(const AnnealOptions& o) {
  check_file_plan(FilePlan{}.input(o.problem, "problem").input(o.schedule, "schedule").input(o.bath, "--bath").output(o.out, "--out").output(o.csv, "--csv"));
  const ProblemFile p_file = parse_problem_file(o.problem);
  const IsingProblem& p = p_file.ising;
  const Schedule sch = read_schedule_file(o.schedule);
  const std::optional<OhmicBath> bath = load_bath(o.bath, p.qubits);
  check_tolerance(o.tolerance);
  check_count(o.trace_points, 0, 10000, "--trace-points", "observations per piece");
  check_count(o.top, 0, 1000, "--top", "outcome count");
  if (!o.out.empty()) check_output_path(o.out, "--out");
  if (!o.csv.empty()) check_output_path(o.csv, "--csv");
  check_memory(p.qubits, 10, 0, p_file.qubits_place);
  const TransverseIsingHamiltonian H(p);
  const GroundManifold gm = find_ground_manifold(p, H.diagonal());
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
  const QuantumState psi0 = initial_state(H, sch, path);

  // Observations at chosen s: every passage of the path through each value.
  std::vector<double> observe_s;
  if (!o.observe_s.empty()) {
    observe_s = parse_value_list(o.observe_s, "--observe-s");
    std::sort(observe_s.begin(), observe_s.end());
    observe_s.erase(std::unique(observe_s.begin(), observe_s.end()), observe_s.end());
    for (double s : observe_s)
      if (times_at_s(path, s).empty())
        throw InputError({"--observe-s", 0, 0, "--observe-s"},
                         fmt::format("the path of {} never reaches s = {} (it covers s from {} to {})", o.schedule, s,
                                     path.s_min(), path.s_max()),
                         fmt::format("give s values between {} and {}", path.s_min(), path.s_max()));
  }
  if (o.levels < 0 || o.levels > 16)
    throw InputError({"--levels", 0, 0, "--levels"}, fmt::format("{} levels", o.levels), "give 1 to 16 levels (0: none)");
  if (o.levels > 0 && observe_s.empty())
    throw InputError({"--levels", 0, 0, "--levels"}, "level populations are recorded at the --observe-s points, and none were given",
                     "add --observe-s, e.g. --observe-s 0.3,0.5,0.7");

  SimulationOptions sim;
  // The run and its accuracy re-run share the solved eigenpairs (frame propagator only).
  sim.propagation.frame_cache = std::make_shared<FramePointCache>();
  sim.propagator = o.propagator;
  sim.propagation.tolerance = o.tolerance;
  if (o.p_only) sim.propagation.others_factor = std::numeric_limits<double>::infinity();
  sim.samples_per_piece = std::max(0, o.trace_points);
  sim.top_outcomes = o.top;
  sim.observe_s = observe_s;
  TraceObserver trace(H, gm);
  // Populations of the lowest levels of H(s), at the requested s only (one
  // eigenproblem each). Without fields a forward anneal from the ground state
  // stays in the even spin-flip sector; its levels are the ones that matter.
  LevelPopulationOptions lpo;
  lpo.levels = std::max(o.levels, 1);
  lpo.requested_only = true;
  const bool even = !p.has_fields() && sch.start.kind == StartKind::Ground;
  lpo.sector = even ? SpinFlipSector::Even : SpinFlipSector::Full;
  check_levels_fit(o.levels, p.qubits, lpo.sector);
  std::optional<LevelPopulationObserver> pops;
  std::vector<AnnealObserver*> observers{&trace};
  if (o.levels > 0) observers.push_back(&pops.emplace(H, lpo));
  // Progress on stderr for long runs (the passes of the propagator over the path).
  const int runs = o.no_check ? 1 : 2;
  // With a bath the open-system run dominates and is not in the estimate: always show on a terminal.
  const bool show = !o.quiet && (o.progress || bath || work.core_seconds() > kProgressAfterSeconds);
  ProgressBar bar("anneal", 0, 0.0, !show ? 0 : (o.progress ? 1 : -1));
  int run = 1;
  if (bar.enabled())
    sim.propagation.progress = [&](const PropagationProgress& pp) {
      bar.stage(fmt::format("run {} of {}{}, pass {}", run, runs, run == 2 ? " (check at tolerance/10)" : "", pp.pass),
                pp.fraction);
    };
  const AnnealResult r = simulate_anneal(H, gm, sch.scales, path, psi0, sim, observers);
  std::vector<TraceObserver::Row> requested_rows;
  for (const auto& row : trace.rows())
    if (row.requested) requested_rows.push_back(row);
  std::optional<double> delta_p;
  if (!o.no_check) {
    SimulationOptions tight = sim;
    tight.propagation.tolerance = o.tolerance / 10.0;
    tight.top_outcomes = 0;
    run = 2;
    delta_p = std::abs(simulate_anneal(H, gm, sch.scales, path, psi0, tight).ground_probability - r.ground_probability);
  }

  std::optional<OpenAnnealResult> open;
  if (bath) {
    OpenPropagatorOptions oo{.tolerance = o.tolerance};
    if (bar.enabled()) oo.progress = [&](const PropagationProgress& pp) { bar.stage("with the bath", pp.fraction); };
    open = simulate_open_anneal(H, gm, sch.scales, path, psi0, *bath, oo);
  }
  bar.done();

  const std::vector<AccuracyIssue> accuracy = check_accuracy(r, o.tolerance, delta_p);
  for (const auto& issue : accuracy) std::cerr << "gapwise: warning: " << issue.message << "\n";
  if (o.strict && !accuracy.empty()) exit_code() = kExitAccuracy;
  for (const auto& issue : accuracy)
    if (issue.check == "non_finite")  // never passed off as a result; nothing is written
      throw std::runtime_error("the simulation produced a non-finite result: " + issue.message);

  TextTable outcomes({"rank", fmt::format("bits q0..q{}", p.qubits - 1), "spins", "energy", "probability", "ground"});
  for (std::size_t k = 0; k < r.top_outcomes.size(); ++k) {
    const auto& oc = r.top_outcomes[k];
    outcomes.add({std::to_string(k + 1), bits_string(oc.state, p.qubits), spins_string(oc.state, p.qubits),
                  fmt_num(oc.energy, 8), fmt_num(oc.probability, 6), oc.in_ground_manifold ? "yes" : ""});
  }
  std::vector<std::string> trace_head{"t_ns", "s", "p_ground", "energy_ghz", "norm"};
  if (!observe_s.empty()) trace_head.push_back("requested");
  TextTable tr(trace_head);
  for (const auto& row : trace.rows()) {
    std::vector<std::string> cells{fmt_num(row.t_ns, 8), fmt::format("{:.12g}", row.s), fmt_num(row.ground_probability, 10),
                                   fmt_num(row.energy_ghz, 10), fmt_num(row.norm, 14)};
    if (!observe_s.empty()) cells.push_back(row.requested ? "1" : "0");
    tr.add(std::move(cells));
  }
  // The requested observations on their own (terminal and JSON).
  std::vector<std::string> obs_head{"t_ns", "s", "p_ground", "energy_ghz", "norm"};
  for (int j = 0; j < o.levels; ++j) obs_head.push_back(fmt::format("pop_level{}", j));
  TextTable obs(obs_head);
  for (std::size_t i = 0; i < requested_rows.size(); ++i) {
    const auto& row = requested_rows[i];
    std::vector<std::string> cells{fmt_num(row.t_ns, 8), fmt::format("{:.12g}", row.s), fmt_num(row.ground_probability, 10),
                                   fmt_num(row.energy_ghz, 10), fmt_num(row.norm, 14)};
    for (int j = 0; j < o.levels; ++j) cells.push_back(fmt_num(pops->rows().at(i).levels.populations.at(j), 8));
    obs.add(std::move(cells));
  }

  if (o.json) {
    toml::table j;
    put(j, "problem_file", o.problem);
    put(j, "schedule_file", o.schedule);
    put(j, "duration_ns", r.duration_ns);
    put(j, "ground_probability", r.ground_probability);
    put(j, "ground_energy", gm.energy);
    put(j, "ground_degeneracy", static_cast<long long>(gm.degeneracy()));
    put(j, "norm_drift", r.norm_drift);
    put(j, "integrator_error_estimate", r.stats.error_estimate);
    put(j, "accuracy_ok", accuracy.empty());
    if (delta_p) put(j, "convergence_delta_p", *delta_p);
    put(j, "tolerance", o.tolerance);
    put(j, "p_only", o.p_only);
    put(j, "propagator", r.propagator);
    put(j, "steps", static_cast<long long>(r.stats.steps));
    put(j, "hamiltonian_applications", static_cast<long long>(r.stats.hamiltonian_applications));
    put(j, "error_estimate", r.stats.error_estimate);
    put(j, "wall_seconds", r.wall_seconds);
    if (r.propagator == "frame") {
      put(j, "frame_levels", static_cast<long long>(r.stats.frame_levels));
      put(j, "frame_grid_points", static_cast<long long>(r.stats.frame_grid_points));
      put(j, "frame_reused_points", static_cast<long long>(r.stats.frame_reused_points));
      put(j, "frame_top_level_population", r.stats.frame_top_level_population);
      put(j, "frame_truncation_estimate", r.stats.frame_truncation_estimate);
      put(j, "frame_pieces", static_cast<long long>(r.stats.frame_pieces));
      put(j, "frame_fallback_pieces", static_cast<long long>(r.stats.frame_fallback_pieces));
    }
    toml::array arr;
    for (const auto& oc : r.top_outcomes) {
      toml::table e;
      put(e, "bits", bits_string(oc.state, p.qubits));
      put(e, "spins", spins_string(oc.state, p.qubits));
      put(e, "energy", oc.energy);
      put(e, "probability", oc.probability);
      put(e, "ground", oc.in_ground_manifold);
      arr.push_back(std::move(e));
    }
    j.insert_or_assign("outcomes", std::move(arr));
    if (!observe_s.empty()) {
      toml::array oa;
      for (std::size_t i = 0; i < requested_rows.size(); ++i) {
        const auto& row = requested_rows[i];
        toml::table e;
        put(e, "t_ns", row.t_ns);
        put(e, "s", row.s);
        put(e, "ground_probability", row.ground_probability);
        put(e, "energy_ghz", row.energy_ghz);
        put(e, "norm", row.norm);
        if (o.levels > 0) {
          toml::array pe, pp;
          for (int k = 0; k < o.levels; ++k) {
            pe.push_back(pops->rows().at(i).levels.energies_ghz.at(k));
            pp.push_back(pops->rows().at(i).levels.populations.at(k));
          }
          e.insert_or_assign("level_energies_ghz", std::move(pe));
          e.insert_or_assign("level_populations", std::move(pp));
        }
        oa.push_back(std::move(e));
      }
      j.insert_or_assign("observations", std::move(oa));
    }
    if (open) put_open_system_json(j, *bath, *open);
    std::cout << to_json(j) << "\n";
  } else {
    std::cout << fmt::format("problem      {}: {} qubits, {} couplings; ground energy {:.10g}, degeneracy {}\n", terminal_text(o.problem),
                             p.qubits, p.couplings.size(), gm.energy, gm.degeneracy());
    std::cout << fmt::format("schedule     {}: {}\n", o.schedule, sch.scales.describe());
    std::cout << fmt::format("path         {} waypoints, duration {} ns, start: {}\n", path.points().size(),
                             r.duration_ns, sch.start.kind == StartKind::Ground ? "ground state of H(s0)" : "classical state");
    std::cout << fmt::format("propagator   {} (tolerance {:.0e}): {} steps, {} H applications, {:.3f} s\n", r.propagator,
                             o.tolerance, r.stats.steps, r.stats.hamiltonian_applications, r.wall_seconds);
    std::cout << fmt::format("\nground-state probability  {:.8f}\n", r.ground_probability);
    if (delta_p)
      std::cout << fmt::format("convergence               |dp| = {:.1e} when the tolerance is tightened tenfold{}\n", *delta_p,
                               *delta_p > o.tolerance ? "  (WARNING: larger than expected)" : "");
    std::cout << fmt::format("norm drift                {:.1e}\n", r.norm_drift);
    // One error estimate per run; what it measures depends on the propagator.
    if (r.propagator == "odeint")
      std::cout << fmt::format("integrator error est.     {:.1e} (sum of the accepted steps' local error estimates of the\n"
                               "                          amplitudes; a bound-like figure, not the error of p itself)\n",
                               r.stats.error_estimate);
    else if (r.propagator == "frame") {
      const PropagationStats& fs = r.stats;
      std::cout << fmt::format("error estimate of p       {:.1e} (per piece: the frame's grid against every other grid point,\n"
                               "                          plus the change of p when K drops to 3K/4, plus the start's\n"
                               "                          weight outside the kept levels; summed over pieces)\n",
                               fs.error_estimate);
      std::cout << fmt::format("frame                     K = {} levels, {} grid points, {} eigen-solves ({} warm started),\n"
                               "                          {} points reused from earlier pieces or runs\n",
                               fs.frame_levels, fs.frame_grid_points, fs.frame_eigen_solves, fs.frame_warm_solves,
                               fs.frame_reused_points);
      std::cout << fmt::format("leakage                   largest population of the highest kept level {:.1e}; change of p\n"
                               "                          with K {:.1e}\n",
                               fs.frame_top_level_population, fs.frame_truncation_estimate);
      std::cout << fmt::format("pieces                    {} in the frame, {} by full propagation (split4){}\n", fs.frame_pieces,
                               fs.frame_fallback_pieces,
                               fs.frame_fallback_pieces > 0 && fs.frame_pieces > 0 ? "  (hybrid: the frame could not hold those to the tolerance)"
                               : fs.frame_fallback_pieces > 0 ? "  (FALLBACK: the frame could not hold the run to the tolerance)"
                                                              : "");
    } else
      std::cout << fmt::format("error estimate of p       {:.1e} (the accepted step grid against a coarser one with 4/5\n"
                               "                          or 1/2 of its steps, Richardson-scaled; {})\n",
                               r.stats.error_estimate,
                               o.p_only ? "--p-only: other outcomes not controlled"
                                        : "any other set of outcomes\n                          within 100x the tolerance");
    if (!accuracy.empty()) std::cout << "accuracy                  NOT within the tolerance (see warnings)\n";
    if (open) std::cout << open_system_text(*bath, *open, r.ground_probability);
    std::cout << "\n";
    std::cout << "most probable outcomes" << (open ? " (closed system)" : "") << "\n" << outcomes.render();
    if (!requested_rows.empty()) {
      std::cout << "\nobservations at the requested s"
                << (o.levels > 0 ? fmt::format(" (pop_levelJ: weight on the J-th lowest distinct level of H(s), {})",
                                               describe_sector(lpo.sector))
                                 : std::string())
                << "\n"
                << obs.render();
    }
  }

  if (!o.csv.empty()) write_file_atomically(o.csv, tr.csv());
  if (!o.out.empty()) {
    Hdf5Output h5(o.out, {"gapwise-anneal", 1});
    write_provenance(h5, command_line(), {o.problem, o.schedule});
    h5.attribute("/anneal", "duration_ns", r.duration_ns);
    h5.attribute("/anneal", "ground_probability", r.ground_probability);
    h5.attribute("/anneal", "norm_drift", r.norm_drift);
    h5.attribute("/anneal", "integrator_error_estimate", r.stats.error_estimate);
    h5.attribute("/anneal", "accuracy_ok", static_cast<long long>(accuracy.empty()));
    h5.attribute("/anneal", "tolerance", o.tolerance);
    h5.attribute("/anneal", "p_only", static_cast<long long>(o.p_only));
    h5.attribute("/anneal", "propagator", r.propagator);
    h5.attribute("/anneal", "steps", static_cast<long long>(r.stats.steps));
    h5.attribute("/anneal", "error_estimate", r.stats.error_estimate);
    if (r.propagator == "frame") {
      h5.attribute("/anneal", "frame_levels", static_cast<long long>(r.stats.frame_levels));
      h5.attribute("/anneal", "frame_grid_points", static_cast<long long>(r.stats.frame_grid_points));
      h5.attribute("/anneal", "frame_reused_points", static_cast<long long>(r.stats.frame_reused_points));
      h5.attribute("/anneal", "frame_top_level_population", r.stats.frame_top_level_population);
      h5.attribute("/anneal", "frame_truncation_estimate", r.stats.frame_truncation_estimate);
      h5.attribute("/anneal", "frame_pieces", static_cast<long long>(r.stats.frame_pieces));
      h5.attribute("/anneal", "frame_fallback_pieces", static_cast<long long>(r.stats.frame_fallback_pieces));
    }
    if (delta_p) h5.attribute("/anneal", "convergence_delta_p", *delta_p);
    h5.attribute("/anneal", "ground_energy", gm.energy);
    std::vector<long long> gstates(gm.states.begin(), gm.states.end());
    h5.write("/anneal/ground_states", gstates, DataMeaning("1").described("basis index (bit i = qubit i)"));
    std::vector<double> t, s, pg, e, nrm;
    for (const auto& row : trace.rows()) {
      t.push_back(row.t_ns); s.push_back(row.s); pg.push_back(row.ground_probability);
      e.push_back(row.energy_ghz); nrm.push_back(row.norm);
    }
    h5.write("/anneal/trace/t", t, "ns");
    h5.write("/anneal/trace/s", s, "1");
    h5.write("/anneal/trace/ground_probability", pg, "1");
    h5.write("/anneal/trace/energy", e, "GHz");
    h5.write("/anneal/trace/norm", nrm, "1");
    if (!observe_s.empty()) {
      std::vector<long long> req;
      for (const auto& row : trace.rows()) req.push_back(row.requested ? 1 : 0);
      h5.write("/anneal/trace/requested", req, DataMeaning("1").flagged({0, 1}, "sampled observe_s_value"));
      std::vector<double> ot, os, op, oe, on, le, lp;
      for (std::size_t i = 0; i < requested_rows.size(); ++i) {
        const auto& row = requested_rows[i];
        ot.push_back(row.t_ns); os.push_back(row.s); op.push_back(row.ground_probability);
        oe.push_back(row.energy_ghz); on.push_back(row.norm);
        for (int k = 0; k < o.levels; ++k) {
          le.push_back(pops->rows().at(i).levels.energies_ghz.at(k));
          lp.push_back(pops->rows().at(i).levels.populations.at(k));
        }
      }
      h5.write("/anneal/observations/t", ot, "ns");
      h5.write("/anneal/observations/s", os, "1");
      h5.write("/anneal/observations/ground_probability", op, "1");
      h5.write("/anneal/observations/energy", oe, "GHz");
      h5.write("/anneal/observations/norm", on, "1");
      if (o.levels > 0) {
        const std::size_t m = requested_rows.size(), kk = static_cast<std::size_t>(o.levels);
        h5.write_matrix("/anneal/observations/level_energies", le, m, kk, "GHz", {"/anneal/observations/s", h5.level_axis("/anneal/observations", kk)});
        h5.write_matrix("/anneal/observations/level_populations", lp, m, kk, "1", {"/anneal/observations/s", h5.level_axis("/anneal/observations", kk)});
        h5.attribute("/anneal/observations/level_populations", "sector", sector_name(lpo.sector));
      }
    }
    const auto probs = probabilities(r.final_state);
    h5.write("/anneal/final_probabilities", probs, DataMeaning("1").described("probability of basis state b at the end (index b, bit i = qubit i)"));
    if (open) write_open_system_hdf5(h5, "/anneal/open_system", *bath, *open);
    h5.commit();
  }
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
                  "fourth order: smallest error per step), odeint (the generic reference)")
      ->check(CLI::IsMember(propagator_names()))->capture_default_str(), propagator_names());
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
  add_allow_long_flag(sub, o->allow_long);
  sub->add_flag("-q,--quiet", o->quiet, "no progress on stderr");
  sub->add_flag("--progress", o->progress,
                "show progress on stderr for any run, also when stderr is not a terminal (then a line every\n"
                "few seconds); by default it shows on a terminal for runs estimated above 2 s");
  sub->callback([o] { run_anneal(*o); });
}

}  // namespace gapwise::cli
