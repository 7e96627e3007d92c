// `gapwise durations PROBLEM SCHEDULE`: the anneal-time study. Simulates p(t_f)
// over a list or log-spaced range of durations, reports time to solution and
// its optimum, finds the shortest duration that reaches the target by
// bisection, and sets the Landau-Zener and adiabatic-condition predictions
// beside the simulation. Resumable: finished points go to a journal beside the
// output file and a rerun of the same command skips them.
#include <limits>
#include <algorithm>
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
#include "cli/journaled_run.hpp"
#include "io/infinite_tts.hpp"
#include "hamiltonian/memory_budget.hpp"
#include "io/atomic_file.hpp"
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
  std::string problem, schedule, out, csv, durations, propagator = SimulationOptions{}.propagator, bath;
  bool p_only = false;
  double target = kDefaultTargetProbability, tolerance = 1e-6, resolution = 5e-3, agreement = kDefaultAgreementFactor;
  int threads = 0, probes = 2;
  bool json = false, no_search = false, no_predictions = false, fresh = false, quiet = false, allow_long = false;
};

std::string p_text(double p) { return fmt::format("{:.6f}", std::clamp(p, 0.0, 1.0)); }
std::string ns_text(double t) { return std::isinf(t) ? "inf" : fmt_num(t, 5); }

void run_durations(const DurationsOptions& o) {
  check_file_plan(FilePlan{}
                      .input(o.problem, "problem")
                      .input(o.schedule, "schedule")
                      .input(o.bath, "--bath")
                      .output(o.out, "--out")
                      .output(o.csv, "--csv")
                      .journal_of(!o.out.empty() ? o.out : o.csv));
  const ProblemFile problem_file = parse_problem_file(o.problem);
  const IsingProblem& problem = problem_file.ising;
  const Schedule schedule = read_schedule_file(o.schedule);
  const std::optional<OhmicBath> bath = load_bath(o.bath, problem.qubits);
  check_tolerance(o.tolerance);
  check_target_probability(o.target);
  check_threads(o.threads);
  if (!(o.resolution > 0.0 && o.resolution < 1.0))
    throw InputError({"--resolution", 0, 0, "--resolution"}, fmt::format("resolution {} is not inside (0, 1)", o.resolution),
                     "give the relative width at which bisection stops, e.g. 0.005");
  if (!(o.agreement > 1.0) || !std::isfinite(o.agreement))
    throw InputError({"--agreement", 0, 0, "--agreement"}, fmt::format("agreement factor {} is not above 1", o.agreement),
                     "give the factor within which 1 - p of a prediction and of the simulation must agree, e.g. 2");
  if (o.probes < 1 || o.probes > 64)
    throw InputError({"--probes", 0, 0, "--probes"}, fmt::format("{} probes per round", o.probes), "use 1 to 64");
  std::vector<double> grid;
  if (!o.durations.empty()) grid = normalised_grid(parse_value_list(o.durations, "--durations", ListOf::Durations));
  if (!o.out.empty()) check_output_path(o.out, "--out");
  if (!o.csv.empty()) check_output_path(o.csv, "--csv");
#ifdef _OPENMP
  const int threads = thread_count_or_default(o.threads);
#else
  const int threads = 1;
#endif
  check_memory(problem.qubits, 10 * std::max(1, threads), 0, problem_file.qubits_place);

  SimulationOptions sim;
  sim.propagator = o.propagator;
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

  // ---- with the bath: the grid durations again, open system (not journaled)
  std::vector<OpenDurationPoint> open_rows;
  if (bath) {
    ProgressBar open_bar("durations with the bath", grid.size(), static_cast<double>(grid.size()), o.quiet ? 0 : -1);
    open_rows = open_duration_scan(setup, *bath, grid, o.tolerance, o.target,
                                   [&](double t) { return ev.known().at(t).ground_probability; },
                                   [&](std::size_t) { open_bar.finished_item(1.0); });
    open_bar.done();
  }

  // ---- report
  const auto& known = ev.known();
  const auto grid_set = std::set<double>(grid.begin(), grid.end());
  const double best_t = st.optimum.duration_ns;
  auto reached_text = [&](const CrossingBracket& b) {
    return fmt::format("{} ns (p = {}); bracket {} .. {} ns after {} bisection round(s){}", ns_text(b.upper_ns),
                       p_text(b.p_upper), ns_text(b.lower_ns), ns_text(b.upper_ns), b.rounds,
                       b.oscillation_inside ? ", p crossed the target more than once inside it" : "");
  };
  PredictionVerdicts verdicts;
  if (predictions) verdicts = judge_predictions(*predictions, known, st, o.agreement, p_noise);
  const TtsOptimum& opt = st.optimum;
  const int g = static_cast<int>(setup.ground.degeneracy());
  auto ranges_text = [&](const std::vector<AgreementRange>& r) {
    if (r.empty()) return std::string("at none of the simulated durations");
    std::string s;
    for (const auto& x : r)
      s += (s.empty() ? "" : ", ") +
           (x.from_ns == x.to_ns ? fmt::format("{} ns", ns_text(x.from_ns))
                                 : fmt::format("{} .. {} ns", ns_text(x.from_ns), ns_text(x.to_ns)));
    return "for t_f in " + s;
  };

  if (o.json) {
    toml::table j;
    put(j, "problem_file", o.problem);
    put(j, "schedule_file", o.schedule);
    put(j, "target", o.target);
    put(j, "propagator", o.propagator);
    put(j, "tolerance", o.tolerance);
    put(j, "p_only", o.p_only);
    put(j, "ground_energy", setup.ground.energy);
    put(j, "ground_degeneracy", static_cast<long long>(setup.ground.degeneracy()));
    toml::array pts;
    for (const auto& [t, pt] : known) {
      toml::table e;
      const auto tts = time_to_solution(t, std::clamp(pt.ground_probability, 0.0, 1.0), o.target);
      put(e, "duration_ns", t);
      put(e, "grid", grid_set.count(t) > 0);
      put(e, "ground_probability", pt.ground_probability);
      put(e, "tts_case", std::string(tts_case_name(tts.kind)));
      put_tts(e, "tts_ns", tts.tts_ns);
      if (predictions && predictions->lz.applicable) put(e, "p_landau_zener", predictions->lz.p_at(t));
      if (predictions && predictions->adiabatic.applicable) put(e, "p_adiabatic", predictions->adiabatic.p_at(t));
      pts.push_back(std::move(e));
    }
    j.insert_or_assign("points", std::move(pts));
    toml::table best;
    put(best, "duration_ns", best_t);
    put_tts(best, "tts_ns", st.optimum.tts_ns);
    put(best, "at_range_edge", st.optimum.at_range_edge);
    put(best, "lower_ns", st.optimum.lower_ns);
    put(best, "upper_ns", st.optimum.upper_ns);
    put(best, "near_fraction", opt.near_fraction);
    put(best, "near_from_ns", opt.near_from_ns);
    put(best, "near_to_ns", opt.near_to_ns);
    put(best, "near_count", static_cast<long long>(opt.near_count));
    put(best, "near_contiguous", opt.near_contiguous);
    if (std::isfinite(opt.random_guess_probability)) put(best, "random_guess_probability", opt.random_guess_probability);
    put(best, "random_guess_limited", opt.random_guess_limited);
    if (opt.random_guess_limited) put(best, "random_guess_note", std::string(kRandomGuessLimitText));
    if (opt.local) {
      toml::table l;
      put(l, "duration_ns", opt.local->duration_ns);
      put_tts(l, "tts_ns", opt.local->tts_ns);
      put(l, "lower_ns", opt.local->lower_ns);
      put(l, "upper_ns", opt.local->upper_ns);
      best.insert_or_assign("local", std::move(l));
    }
    put(best, "grid_extended_below", static_cast<long long>(st.extended_below));
    put(best, "grid_extended_above", static_cast<long long>(st.extended_above));
    put(best, "extension_stop", st.extension_stop);
    j.insert_or_assign("tts_optimum", std::move(best));
    if (st.needed) {
      toml::table n;
      const auto& dn = *st.needed;
      put(n, "status", std::string(dn.status == NeededStatus::Reached ? "reached"
                                   : dn.status == NeededStatus::ReachedAtShortest ? "reached at the shortest duration"
                                                                                  : "not reached"));
      put(n, "lower_ns", dn.first.lower_ns);
      put(n, "upper_ns", dn.first.upper_ns);
      put(n, "p_lower", dn.first.p_lower);
      put(n, "p_upper", dn.first.p_upper);
      if (dn.stays_reached) {
        put(n, "stays_reached_lower_ns", dn.stays_reached->lower_ns);
        put(n, "stays_reached_upper_ns", dn.stays_reached->upper_ns);
      }
      put(n, "lost_at_longest", dn.lost_at_longest);
      put(n, "decreasing_stretches", static_cast<long long>(dn.decreasing.size()));
      j.insert_or_assign("duration_needed", std::move(n));
    }
    if (predictions) {
      toml::table pr;
      put(pr, "gap_ghz", predictions->gap_ghz);
      put(pr, "s_star", predictions->s_star);
      put(pr, "gap_definition", predictions->gap_definition);
      put(pr, "landau_zener_applicable", predictions->lz.applicable);
      if (!predictions->lz.applicable) put(pr, "landau_zener_why_not", predictions->lz.why_not);
      if (std::isfinite(predictions->lz.pause_s)) {
        put(pr, "landau_zener_pause_s", predictions->lz.pause_s);
        put(pr, "landau_zener_pause_distance_widths", predictions->lz.pause_distance_widths);
      }
      put(pr, "agreement_factor", o.agreement);
      auto put_verdict = [&](const std::string& key, const std::optional<PredictionVerdict>& v) {
        if (!v) return;
        toml::array a;
        for (const auto& r : v->ranges) {
          toml::table e;
          put(e, "from_ns", r.from_ns);
          put(e, "to_ns", r.to_ns);
          a.push_back(std::move(e));
        }
        pr.insert_or_assign(key + "_agreement", std::move(a));
        if (std::isfinite(v->duration_ratio)) put(pr, key + "_duration_ratio", v->duration_ratio);
        put(pr, key + "_duration_agrees", v->duration_agrees);
      };
      put_verdict("landau_zener", verdicts.lz);
      put_verdict("adiabatic", verdicts.adiabatic);
      if (predictions->lz.applicable) {
        put(pr, "slope_difference_ghz", predictions->lz.slope_difference_ghz);
        put(pr, "path_rate", predictions->lz.path_rate);
        put(pr, "landau_zener_duration_ns", predictions->lz.duration_for(o.target));
      }
      put(pr, "adiabatic_applicable", predictions->adiabatic.applicable);
      if (predictions->adiabatic.applicable) {
        put(pr, "adiabatic_time_ns", predictions->adiabatic.time_ns);
        put(pr, "adiabatic_duration_ns", predictions->adiabatic.duration_for(o.target));
      }
      j.insert_or_assign("predictions", std::move(pr));
    }
    if (bath) put_open_durations_json(j, *bath, open_rows);
    std::cout << to_json(j) << "\n";
    return;
  }

  std::cout << fmt::format("problem     {}: {} qubits; ground energy {:.10g}, degeneracy {}\n", terminal_text(o.problem),
                           problem.qubits, setup.ground.energy, setup.ground.degeneracy());
  std::cout << fmt::format("schedule    {}: {}; path shape of {} waypoints stretched to each t_f\n", terminal_text(o.schedule),
                           schedule.scales.describe(), schedule.shape.points().size());
  std::cout << fmt::format("numerics    propagator {} (tolerance {:.0e}), {} thread(s); {} duration(s) simulated now, {} reused\n",
                           o.propagator, o.tolerance, threads, ev.simulated(), known.size() - ev.simulated());
  if (predictions)
    std::cout << fmt::format("gap         Delta_min = {:.6g} GHz at s* = {:.6g}  ({}; {}){}\n", predictions->gap_ghz,
                             predictions->s_star, predictions->gap_definition, predictions->sector,
                             predictions->gap_at_end_point ? "  [at an end of the path's s range]" : "");
  std::cout << fmt::format("target      p* = {}\n", o.target);
  std::cout << fmt::format("durations   {} grid point(s), {} .. {} ns{}\n\n", grid.size(), ns_text(grid.front()),
                           ns_text(grid.back()),
                           grid_chosen ? (predictions ? " (default: around the predicted durations; set --durations to change)"
                                                      : " (default; set --durations to change)")
                                       : "");

  TextTable table({"t_f_ns", "p_ground", "TTS_ns", "runs", "p_LZ", "p_adiab", "note"});
  for (const auto& [t, pt] : known) {
    const double p = std::clamp(pt.ground_probability, 0.0, 1.0);
    const auto tts = time_to_solution(t, p, o.target);
    std::string note = grid_set.count(t) ? "" : "bisection";
    if (t == best_t) note += std::string(note.empty() ? "" : ", ") + "TTS optimum";
    if (p >= o.target) note += std::string(note.empty() ? "" : ", ") + ">= p*";
    table.add({fmt_num(t, 6), p_text(p), ns_text(tts.tts_ns),
               tts.kind == TtsCase::Never ? "inf" : fmt::format("{:.3g}", tts.repetitions),
               predictions && predictions->lz.applicable ? p_text(predictions->lz.p_at(t)) : "-",
               predictions && predictions->adiabatic.applicable ? p_text(predictions->adiabatic.p_at(t)) : "-", note});
  }
  std::cout << table.render() << "\n";
  if (bath) std::cout << open_durations_text(*bath, open_rows) << "\n";

  std::cout << fmt::format("duration needed for p >= {}\n", o.target);
  if (st.needed) {
    const auto& dn = *st.needed;
    switch (dn.status) {
      case NeededStatus::Reached:
        std::cout << "  simulation           " << reached_text(dn.first) << "\n";
        break;
      case NeededStatus::ReachedAtShortest:
        std::cout << fmt::format("  simulation           at most {} ns: already p = {} at the shortest duration simulated; "
                                 "extend the range downwards for the answer\n",
                                 ns_text(dn.first.upper_ns), p_text(dn.first.p_upper));
        break;
      case NeededStatus::NotReached:
        std::cout << fmt::format("  simulation           more than {} ns: p = {} at the longest duration simulated; "
                                 "extend the range upwards\n",
                                 ns_text(dn.first.lower_ns), p_text(dn.first.p_lower));
        break;
    }
    if (dn.stays_reached)
      std::cout << "  stays reached from   " << reached_text(*dn.stays_reached)
                << "\n                       (p falls below the target again between the first crossing and this one)\n";
    if (dn.lost_at_longest)
      std::cout << "  WARNING              p falls below the target again at the longest duration simulated: "
                   "p(t_f) oscillates around p*\n";
  } else {
    std::cout << "  simulation           (search skipped: --no-search)\n";
  }
  const std::string pad = "                       ";
  if (!std::isfinite(opt.tts_ns))
    std::cout << "  TTS optimum          none: p = 0 at every duration simulated, so the time-to-solution is infinite\n";
  else
    std::cout << fmt::format("  TTS optimum          t_f = {} ns per run, TTS = {} ns{}\n", ns_text(best_t), ns_text(opt.tts_ns),
                             !opt.at_range_edge ? fmt::format("  (sampled; the optimum lies between {} and {} ns)",
                                                              ns_text(opt.lower_ns), ns_text(opt.upper_ns))
                             : opt.index == 0   ? "  [the shortest duration simulated]"
                                                : "  [the longest duration simulated]");
  if (st.extended_below + st.extended_above > 0)
    std::cout << fmt::format("{}the default grid was extended by {} point(s) below and {} above while the optimum sat "
                             "at an end: {}\n",
                             pad, st.extended_below, st.extended_above,
                             st.extension_stop.empty() ? "now bracketed" : "stopped, " + st.extension_stop);
  if (opt.random_guess_limited) {
    std::cout << fmt::format("{}TTS keeps falling toward the shortest durations: p = {} at {} ns, close to the\n"
                             "{}random-guess value g/2^n = {}/2^{} = {:.4g}.\n",
                             pad, p_text(known.begin()->second.ground_probability), ns_text(known.begin()->first), pad, g,
                             problem.qubits, opt.random_guess_probability);
    std::cout << pad << kRandomGuessLimitText << "\n";
    if (opt.local)
      std::cout << fmt::format("{}local optimum: t_f = {} ns, TTS = {} ns (between {} and {} ns)\n", pad,
                               ns_text(opt.local->duration_ns), ns_text(opt.local->tts_ns), ns_text(opt.local->lower_ns),
                               ns_text(opt.local->upper_ns));
    else
      std::cout << pad << "no interior local optimum on the grid: TTS rises all the way from the shortest duration\n";
  } else if (opt.at_range_edge && std::isfinite(opt.tts_ns)) {
    std::cout << fmt::format("{}the optimum may lie beyond this end of the range: {}\n", pad,
                             grid_chosen ? "the grid could not be extended further (" + st.extension_stop + ")"
                                         : std::string("widen --durations, or leave it out for a grid that is "
                                                       "extended until the optimum is bracketed"));
    if (opt.local)
      std::cout << fmt::format("{}local optimum inside the range: t_f = {} ns, TTS = {} ns\n", pad,
                               ns_text(opt.local->duration_ns), ns_text(opt.local->tts_ns));
  }
  if (std::isfinite(opt.tts_ns))
    std::cout << fmt::format("{}within {:g} % of the best TTS: t_f = {} .. {} ns ({} of {} grid durations{}){}\n", pad,
                             100 * opt.near_fraction, ns_text(opt.near_from_ns), ns_text(opt.near_to_ns), opt.near_count,
                             st.grid.size(), opt.near_contiguous ? "" : ", not contiguous",
                             opt.near_count > 1 && opt.near_to_ns > 2 * opt.near_from_ns
                                 ? ": TTS is flat there, any of these durations does as well"
                                 : "");
  auto verdict_text = [&](const PredictionVerdict& v) {
    std::string s = fmt::format("{}p and 1 - p within a factor {:g} of the simulation {}\n", pad, o.agreement, ranges_text(v.ranges));
    if (std::isfinite(v.duration_ratio))
      s += fmt::format("{}duration for p*: predicted {} ns vs simulated {} ns, {:.3g} x ({})\n", pad, ns_text(v.predicted_ns),
                       ns_text(v.simulated_ns), v.duration_ratio,
                       v.duration_agrees ? fmt::format("agrees within a factor {:g}", o.agreement)
                                         : fmt::format("does NOT agree within a factor {:g}", o.agreement));
    else
      s += fmt::format("{}duration for p*: predicted {} ns; the simulated one is only bounded, so no ratio\n", pad,
                       ns_text(v.predicted_ns));
    return s;
  };
  if (predictions) {
    const auto& lz = predictions->lz;
    if (lz.applicable)
      std::cout << fmt::format("  Landau-Zener         {} ns  (Delta_min {:.4g} GHz, slope difference {:.4g} GHz, "
                               "path rate ds/d(t/t_f) = {:.4g} at s*, fit misfit {:.1g})\n",
                               ns_text(lz.duration_for(o.target)), lz.gap_ghz, lz.slope_difference_ghz, lz.path_rate,
                               lz.fit_deviation)
                << verdict_text(*verdicts.lz);
    else
      std::cout << "  Landau-Zener         not applicable: " << lz.why_not << "\n";
    const auto& ad = predictions->adiabatic;
    if (ad.applicable)
      std::cout << fmt::format("  adiabatic condition  {} ns  (t_ad = {:.4g} ns at s = {:.4g}; p ~ 1 - (t_ad/t_f)^2)\n",
                               ns_text(ad.duration_for(o.target)), ad.time_ns, ad.s_at_max)
                << verdict_text(*verdicts.adiabatic);
    else
      std::cout << "  adiabatic condition  not applicable: " << ad.why_not << "\n";
  }
  std::vector<std::string> notes;
  if (st.needed)
    for (const auto& d : st.needed->decreasing)
      notes.push_back(fmt::format("p(t_f) falls from {} at {} ns to {} at {} ns: non-monotonic, do not interpolate there",
                                  p_text(d.p_from), ns_text(d.from_ns), p_text(d.p_to), ns_text(d.to_ns)));
  if (predictions)
    for (const auto& n : predictions->notes) notes.push_back(n);
  double worst_drift = 0;
  for (const auto& [t, pt] : known) worst_drift = std::max(worst_drift, pt.norm_drift);
  if (worst_drift > 10 * o.tolerance)
    notes.push_back(fmt::format("largest norm drift {:.1e} exceeds 10 x tolerance: tighten --tolerance", worst_drift));
  if (!notes.empty()) {
    std::cout << "\nnotes\n";
    for (const auto& n : notes) std::cout << "  - " << n << "\n";
  }
  if (journal) {
    std::cout << "\nwritten     ";
    if (!o.out.empty()) std::cout << o.out << " ";
    if (!o.csv.empty()) std::cout << o.csv << " ";
    std::cout << "(journal " << journal->path() << ")\n";
  }
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
  sub->add_option("--threads", o->threads, "threads (one duration each); 0: all cores (OMP_NUM_THREADS)")->capture_default_str();
  sub->add_option("--out", o->out, "HDF5 result file (all curves, predictions, inputs, tool version)");
  sub->add_option("--csv", o->csv, "CSV with one row per simulated duration");
  sub->add_flag("--fresh", o->fresh, "discard the journal of an earlier run and start afresh");
  sub->add_flag("-q,--quiet", o->quiet, "no progress bar or resume message on stderr");
  add_bath_option(sub, o->bath);
  add_allow_long_flag(sub, o->allow_long);
  sub->add_flag("--json", o->json, "print a JSON summary instead of text");
  sub->callback([o] { run_durations(*o); });
}

}  // namespace gapwise::cli
