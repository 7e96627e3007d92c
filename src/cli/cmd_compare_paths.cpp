#include <cmath>
// `gapwise compare-paths PROBLEM SCHEDULE [MORE...] -d T[,T2...]`:
// several paths on one problem at equal total duration: p, time to solution,
// and where the instantaneous ground level loses population, per path.
#include <filesystem>
#include <iostream>
#include <limits>
#include <memory>
#include <optional>
#include <sstream>

#include <unistd.h>

#include <fmt/format.h>

#include "cli/bath_option.hpp"
#include "cli/cli_common.hpp"
#include "cli/input_loading.hpp"
#include "io/output_paths.hpp"
#include "dynamics/anneal_simulation.hpp"
#include "hamiltonian/memory_budget.hpp"
#include "io/atomic_file.hpp"
#include "io/hdf5_output.hpp"
#include "io/infinite_tts.hpp"
#include "io/input_error.hpp"
#include "io/json_summary.hpp"
#include "io/open_path_output.hpp"
#include "io/terminal_text.hpp"
#include "io/text_table.hpp"
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
  if (o.json) {
    toml::table j;
    put(j, "problem", o.problem);
    put(j, "qubits", static_cast<long long>(p.qubits));
    put(j, "target_probability", o.target);
    toml::array runs;
    for (std::size_t i = 0; i < r.names.size(); ++i)
      for (std::size_t d = 0; d < r.durations_ns.size(); ++d) {
        const ShapeRun& x = r.at(i, d);
        toml::table e;
        put(e, "path", x.name);
        put(e, "duration_ns", x.duration_ns);
        put(e, "end_time_ns", x.end_time_ns);
        put(e, "ground_probability", x.ground_probability);
        put_tts(e, "tts_ns", x.tts.tts_ns);
        put(e, "largest_leak", x.leak.drop);
        put(e, "largest_leak_s_from", x.leak.s_from);
        put(e, "largest_leak_s_to", x.leak.s_to);
        runs.push_back(std::move(e));
      }
    j.insert_or_assign("runs", std::move(runs));
    if (open) j.insert_or_assign("open_system", open_path_json(*open, *bath));
    std::cout << to_json(j) << "\n";
  }

  std::ostringstream text;
  text << fmt::format("problem  {}: {} qubits; paths compared at equal total duration\n", terminal_text(o.problem), p.qubits);
  text << fmt::format("levels   populations of the lowest {} instantaneous levels ({})\n", levels,
                           describe_sector(r.sector));
  if (gap)
    text << fmt::format("gap      {:.6g} GHz at s* = {:.6g} ({}); local adiabatic I = {:.6g} ns\n", gap->report.gap_ghz,
                             gap->report.s_star, gap->report.definition, gap->path.integral_ns);
  std::vector<std::string> cols{"path", "duration_ns", "end_ns", "p_ground", fmt::format("TTS{:g}_ns", 100 * o.target),
                                "largest leak (s)", "leak", "level0_end"};
  if (open) {
    cols.push_back("p_bath");
    cols.push_back(fmt::format("TTS{:g}_bath_ns", 100 * o.target));
  }
  TextTable t(cols);
  for (std::size_t j = 0; j < r.durations_ns.size(); ++j)
    for (std::size_t i = 0; i < r.names.size(); ++i) {
      const ShapeRun& x = r.at(i, j);
      std::vector<std::string> row{x.name, fmt_num(x.duration_ns, 8), fmt_num(x.end_time_ns, 12),
                                   fmt_num(x.ground_probability, 8), tts_text(x.tts.tts_ns, 6),
                                   x.leak.drop > 0 ? fmt::format("{:.3f}-{:.3f}", x.leak.s_from, x.leak.s_to) : "-",
                                   fmt_num(x.leak.drop, 4), fmt_num(x.leak.final_ground_level, 6)};
      if (open) {
        row.push_back(fmt_num(open->at(i, j).open.ground_probability, 8));
        row.push_back(tts_text(open->at(i, j).open_tts.tts_ns, 6));
      }
      t.add(row);
    }
  text << "\n" << t.render();
  text << "\nleak: the largest drop of the instantaneous ground level's population between two observations,\n"
               "and where along s it happened; level0_end: that population at the end (= p_ground when A(1) = 0).\n";
  if (open) text << open_path_text(*open, *bath);
  if (!o.json) std::cout << text.str();
  if (!o.csv.empty()) write_file_atomically(o.csv, t.csv());
  if (!o.out.empty()) {
    Hdf5Output h5(o.out, {"gapwise-compare-paths", 1});
    std::vector<std::string> inputs{o.problem};
    for (const auto& f : o.schedules) inputs.push_back(f);
    write_provenance(h5, command_line(), inputs);
    h5.write_strings("/compare/paths", r.names, "the compared paths (rows of the matrices)");
    h5.write("/compare/durations_ns", r.durations_ns, "ns");
    std::vector<double> pg, tts, end;
    for (const auto& x : r.runs) {
      pg.push_back(x.ground_probability);
      tts.push_back(stored_tts(x.tts.tts_ns));
      end.push_back(x.end_time_ns);
    }
    const std::size_t ni = r.names.size(), nj = r.durations_ns.size();
    h5.write_matrix("/compare/ground_probability", pg, ni, nj, "1", {"/compare/paths", "/compare/durations_ns"});
    h5.write_matrix("/compare/tts_ns", tts, ni, nj, tts_meaning("ns"), {"/compare/paths", "/compare/durations_ns"});
    h5.write_matrix("/compare/end_time_ns", end, ni, nj, "ns", {"/compare/paths", "/compare/durations_ns"});
    h5.attribute("/compare", "target_probability", o.target);
    h5.attribute("/compare", "level_sector", sector_name(r.sector));
    if (open) write_open_path_hdf5(h5, *open, *bath);
    for (std::size_t i = 0; i < ni; ++i) {
      // Each path's waypoints (fractions of the duration), so the file says what ran.
      std::vector<double> wt, ws;
      // The scaled path is kept in a variable: a range-for over points() of the
      // temporary would read it after its lifetime ended (found by ASan).
      const AnnealPath unit = cands[i].schedule.shape.scaled_to(1.0);
      for (const auto& w : unit.points()) { wt.push_back(w.t_ns); ws.push_back(w.s); }
      h5.write(fmt::format("/compare/path_{}/waypoint_time_fraction", i), wt, "1");
      h5.write(fmt::format("/compare/path_{}/waypoint_s", i), ws, "1");
      h5.attribute(fmt::format("/compare/path_{}", i), "name", r.names[i]);
      for (std::size_t j = 0; j < nj; ++j) {
        const ShapeRun& x = r.at(i, j);
        const std::string g = fmt::format("/compare/path_{}/duration_{}", i, j);
        std::vector<double> tt, ss, e, pop, deg, resolved;
        for (const auto& row : x.populations) {
          tt.push_back(row.t_ns);
          ss.push_back(row.s);
          for (int l = 0; l < levels; ++l) {
            // A level group that runs past the computed levels is unresolved (NaN in
            // memory); files get NaN there (nan_meaning) and the mask level_resolved.
            const double en = row.levels.energies_ghz[static_cast<std::size_t>(l)];
            const double po = row.levels.populations[static_cast<std::size_t>(l)];
            const bool ok = std::isfinite(en) && std::isfinite(po);
            e.push_back(ok ? en : std::numeric_limits<double>::quiet_NaN());
            pop.push_back(ok ? po : std::numeric_limits<double>::quiet_NaN());
            deg.push_back(row.levels.degeneracy[static_cast<std::size_t>(l)]);
            resolved.push_back(ok ? 1.0 : 0.0);
          }
        }
        h5.write(g + "/t", tt, "ns");
        h5.write(g + "/s", ss, "1");
        const std::size_t nl = static_cast<std::size_t>(levels);
        const std::vector<std::string> axes{g + "/t", h5.level_axis(g, nl)};
        const std::string unresolved = "the level group runs past the levels computed (level_resolved 0)";
        h5.write_matrix(g + "/level_energy", e, tt.size(), nl, not_applicable("GHz", unresolved), axes);
        h5.write_matrix(g + "/level_population", pop, tt.size(), nl, not_applicable("1", unresolved), axes);
        h5.write_matrix(g + "/level_degeneracy", deg, tt.size(), nl, "1", axes);
        h5.write_matrix(g + "/level_resolved", resolved, tt.size(), nl, DataMeaning("1").flagged({0, 1}, "unresolved resolved"), axes);
        h5.attribute(g, "duration_ns", x.duration_ns);
        h5.attribute(g, "ground_probability", x.ground_probability);
        h5.attribute(g, "norm_drift", x.norm_drift);
      }
    }
    h5.commit();
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
