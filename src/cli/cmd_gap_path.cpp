// `gapwise gap-path PROBLEM SCHEDULE --out PATH.toml`: the local adiabatic schedule of
// a problem (local adiabatic condition, Roland & Cerf 2002) written as a
// schedule file to reuse and edit.
#include <iostream>
#include <memory>
#include <numbers>

#include <fmt/format.h>

#include "cli/cli_common.hpp"
#include "cli/input_loading.hpp"
#include "io/output_paths.hpp"
#include "io/atomic_file.hpp"
#include "io/input_error.hpp"
#include "studies/local_adiabatic_schedule.hpp"

namespace gapwise::cli {
namespace {

struct GapPathOptions {
  std::string problem, schedule, out, durations;
  int waypoints = 200, levels = 4, coarse = 201;
  double floor = 0.01;
};

void run_gap_path(const GapPathOptions& o) {
  RunInputs loaded =
      load_run_inputs(RunFiles{}.problem(o.problem).schedule(o.schedule).plan(FilePlan{}.output(o.out, "--out")));
  const IsingProblem& p = loaded.problem();
  Schedule& base = loaded.schedule;
  if (!o.durations.empty()) {
    const double d = parse_single_value(o.durations, "--durations", ListOf::Durations,
                                        "a schedule file holds one default duration",
                                        "give one duration; every command that runs the file can stretch it with -d");
    check_duration_ns(d, {"--durations", 0, 0, "--durations"});
    base.duration_ns = d;
  }
  check_gap_search_size(p.qubits, default_sector(p), o.levels, EigenMethod::Auto, loaded.problem_file->qubits_place);
  const TransverseIsingHamiltonian H(p);
  GapSearchOptions search;
  search.levels = o.levels;
  search.coarse_points = o.coarse;
  search.points_option = "--coarse";
  check_gap_point_budget(search);
  LocalAdiabaticSchedule g;
  try {
    g = local_adiabatic_schedule(H, base, search, {.waypoints = o.waypoints, .matrix_element_floor = o.floor});
  } catch (const InputError& e) {
    if (e.place().key != "gap profile") throw;
    throw InputError({"--waypoints/--floor", 0, 0, e.place().key}, e.problem(), e.fix());
  }
  std::string text = fmt::format(
      "# Local adiabatic schedule for {} written by `{}`.\n"
      "# Local adiabatic condition (Roland & Cerf, Phys. Rev. A 65, 042308 (2002)):\n"
      "# ds/dt = eps Delta(s)^2 / |<g|dH/ds|0>|, so a run of T ns has eps = I / T with I = {:.6g} ns.\n"
      "# Gap {} = {:.6g} GHz at s = {:.6g} ({}). Edit freely: the waypoints are an ordinary path.\n",
      o.problem, command_line(), g.path.integral_ns, g.report.definition, g.report.gap_ghz, g.report.s_star,
      describe_sector(g.report.sector));
  text += format_schedule_toml(g.schedule);
  write_file_atomically(o.out, text);
  std::cout << fmt::format("minimum gap   {:.6g} GHz at s* = {:.6g}  ({}; {})\n", g.report.gap_ghz, g.report.s_star,
                           g.report.definition, describe_sector(g.report.sector));
  std::cout << fmt::format("I = int |M|/Delta^2 ds = {:.6g} ns  (eps of a T ns run: I / T)\n", g.path.integral_ns);
  if (g.schedule.duration_ns)
    std::cout << fmt::format("default duration {} ns: eps = {:.4g}; first-order excitation bound (eps/pi)^2 = {:.3g}\n",
                             *g.schedule.duration_ns, g.path.integral_ns / *g.schedule.duration_ns,
                             std::pow(g.path.integral_ns / *g.schedule.duration_ns / std::numbers::pi, 2));
  // Where the time goes: share of the run spent in each tenth of s.
  std::cout << "share of the run per tenth of s:";
  const AnnealPath& sh = g.schedule.shape;
  double last_t = 0;
  for (int k = 1; k <= 10; ++k) {
    const double s = 0.1 * k;
    double t = 1.0;
    for (std::size_t j = 0; j + 1 < sh.points().size(); ++j) {
      const auto &a = sh.points()[j], &b = sh.points()[j + 1];
      if (a.s <= s && b.s >= s && b.s > a.s) { t = a.t_ns + (s - a.s) / (b.s - a.s) * (b.t_ns - a.t_ns); break; }
    }
    std::cout << fmt::format(" {:.0f}%", 100 * (t - last_t));
    last_t = t;
  }
  std::cout << fmt::format("\nwrote {} ({} waypoints)\n", o.out, sh.points().size());
}

}  // namespace

void register_gap_path(CLI::App& app) {
  auto o = std::make_shared<GapPathOptions>();
  CLI::App* sub = app.add_subcommand("gap-path",
      "Build the local adiabatic schedule of PROBLEM under SCHEDULE's energy scales and write it as a\n"
      "schedule file. The path follows the local adiabatic condition (Roland & Cerf, PRA 65,\n"
      "042308 (2002)): ds/dt proportional to Delta(s)^2 / |<g|dH/ds|0>|, with Delta the gap that\n"
      "governs success (E_g - E_0 for a g-fold ground manifold, in the even sector when there are\n"
      "no fields) from the minimum-gap search. It slows down where the gap is small and hurries\n"
      "where it is large; the file is an ordinary waypoint schedule to run, compare and edit.\n"
      "Example: gapwise gap-path data-samples/weak-field-ring.toml schedules/linear.toml --out gap.toml");
  sub->add_option("problem", o->problem, "problem file (TOML)")->required()->check(readable_input_file());
  sub->add_option("schedule", o->schedule, "base schedule (its energy scales and default duration are used)")
      ->required()->check(readable_input_file());
  sub->add_option("-o,--out", o->out, "schedule file to write")->required();
  sub->add_option("--waypoints", o->waypoints, "waypoints equally spaced in time (plus a quarter as many in s)")
      ->capture_default_str()->check(CLI::Range(2, 100000));
  sub->add_option("--floor", o->floor, "matrix elements below this fraction of their maximum are raised to it (keeps the path finite)")
      ->capture_default_str();
  sub->add_option("--levels", o->levels, "levels followed by the spectrum search")->capture_default_str()->check(CLI::Range(2, 64));
  sub->add_option("--coarse", o->coarse, "uniform spectrum points before refinement")->capture_default_str()->check(CLI::Range(3, 100000));
  add_durations_option(sub, o->durations,
                       "default duration written into the file, ns, one value: > 0 and at most 1e9 (default: the\n"
                       "base schedule's)");
  sub->callback([o] { run_gap_path(*o); });
}

}  // namespace gapwise::cli
