// `gapwise gap PROBLEM [SCHEDULE]`: the instantaneous spectrum along s and the
// minimum gap, with its location, definition and uncertainty; HDF5/CSV of the
// scanned curve. All computation is in spectrum/gap_search.
#include <unistd.h>

#include <chrono>
#include <cmath>
#include <filesystem>
#include <iostream>
#include <memory>
#include <optional>

#include <fmt/format.h>

#include "cli/cli_common.hpp"
#include "cli/input_loading.hpp"
#include "cli/journaled_run.hpp"
#include "io/toml_reader.hpp"
#include "io/output_paths.hpp"
#include "hamiltonian/memory_budget.hpp"
#include "io/atomic_file.hpp"
#include "io/gap_report.hpp"
#include "io/gap_result_file.hpp"
#include "io/hdf5_output.hpp"
#include "io/input_error.hpp"
#include "studies/work_estimate.hpp"
#include "io/json_summary.hpp"
#include "io/result_journal.hpp"
#include "io/terminal_text.hpp"
#include "io/text_table.hpp"
#include "spectrum/gap_eigenvectors.hpp"
#include "spectrum/gap_search.hpp"

namespace gapwise::cli {
namespace {

struct GapOptions {
  std::string problem, schedule, out, csv, sector = "auto", solver = "auto", vectors_at;
  int levels = 4, points = 26, max_points = 3000, vector_levels = 0;
  double s_tolerance = 1e-6;
  std::optional<double> s_first, s_last;
  bool json = false, other_sector = false, progress = false, quiet = false, no_level_check = false, fresh = false;
  bool allow_long = false;
};

/// Progress on stderr: a rewritten line on a terminal, a line every few seconds otherwise.
class ProgressPrinter {
 public:
  explicit ProgressPrinter(bool forced) : tty_(::isatty(2) == 1), on_(forced || tty_) {}
  void operator()(const GapSearchProgress& p) {
    if (!on_) return;
    const auto now = std::chrono::steady_clock::now();
    const double since = std::chrono::duration<double>(now - last_).count();
    if (since < (tty_ ? 0.25 : 5.0)) return;
    last_ = now;
    const double elapsed = std::chrono::duration<double>(now - start_).count();
    const std::string line = fmt::format("gap: {} - {} of ~{} eigenproblems, s = {:.6f}, {:.0f} s", p.stage,
                                         p.evaluations, p.planned, p.s, elapsed);
    if (tty_) std::cerr << "\r" << line << "\x1b[K" << std::flush;
    else std::cerr << line << "\n";
    printed_ = true;
  }
  void done() {
    if (printed_ && tty_) std::cerr << "\r\x1b[K" << std::flush;
  }

 private:
  bool tty_, on_, printed_ = false;
  std::chrono::steady_clock::time_point start_ = std::chrono::steady_clock::now(), last_ = start_;
};

/// --vectors-at: "star" (the s* found) and numbers or ranges, comma-separated.
struct VectorRequest {
  bool star = false;
  std::vector<double> s;
};

VectorRequest parse_vectors_at(const std::string& text) {
  VectorRequest v;
  std::size_t pos = 0;
  while (pos <= text.size()) {
    const std::size_t comma = text.find(',', pos);
    std::string tok = text.substr(pos, comma == std::string::npos ? std::string::npos : comma - pos);
    tok.erase(0, tok.find_first_not_of(' '));
    tok.erase(tok.find_last_not_of(' ') + 1);
    if (tok == "star" || tok == "s*") {
      v.star = true;
    } else {
      for (double s : parse_value_list(tok, "--vectors-at")) {
        if (!(s >= 0.0 && s <= 1.0))
          throw InputError({"--vectors-at", 0, 0, "--vectors-at"}, fmt::format("s = {} is outside [0, 1]", s),
                           "give s values in [0, 1] or `star` for the minimum-gap location, e.g. --vectors-at star,0.5");
        v.s.push_back(s);
      }
    }
    if (comma == std::string::npos) break;
    pos = comma + 1;
  }
  return v;
}

void run_gap(const GapOptions& o) {
  // No schedule file: the default schedule's energy scales.
  const RunInputs loaded = load_run_inputs(RunFiles{}.problem(o.problem).schedule(o.schedule).plan(
      FilePlan{}.output(o.out, "--out").journal_of(o.out).output(o.csv, "--csv")));
  const IsingProblem& p = loaded.problem();
  const Schedule& sch = loaded.schedule;
  VectorRequest vreq;
  if (!o.vectors_at.empty()) {
    vreq = parse_vectors_at(o.vectors_at);
    if (o.out.empty())
      throw InputError({"--vectors-at", 0, 0, "--vectors-at"}, "eigenvectors are written to the HDF5 result only",
                       "add --out FILE.h5");
    if (vreq.s.size() + (vreq.star ? 1 : 0) > 64)
      throw InputError({"--vectors-at", 0, 0, "--vectors-at"}, "more than 64 points asked for",
                       "ask for at most 64 s values (each stores levels x 2^n numbers)");
  }
  if (o.vector_levels < 0 || o.vector_levels > 64)
    throw InputError({"--vector-levels", 0, 0, "--vector-levels"}, fmt::format("{} levels", o.vector_levels),
                     "give 1 to 64 (0: the levels followed by the search)");
  check_count(o.levels, kSpectrumLevels, "--levels");

  GapSearchOptions opt;
  opt.levels = o.levels;
  if (o.sector == "full") opt.sector = SpinFlipSector::Full;
  if (o.sector == "even") opt.sector = SpinFlipSector::Even;
  if (o.sector == "odd") opt.sector = SpinFlipSector::Odd;
  if (opt.sector && *opt.sector != SpinFlipSector::Full && p.has_fields())
    throw InputError({o.problem, 0, 0, "--sector"},
                     fmt::format("the {} sector exists only when every field is zero; this problem has fields", o.sector),
                     "drop --sector (the full space is used for problems with fields)");
  opt.method = o.solver == "dense" ? EigenMethod::Dense : o.solver == "lanczos" ? EigenMethod::Lanczos : EigenMethod::Auto;
  opt.coarse_points = o.points;
  opt.max_points = o.max_points;
  opt.points_option = "--points";
  opt.max_points_option = "--max-points";
  opt.s_tolerance = o.s_tolerance;
  opt.s_first = o.s_first;
  opt.s_last = o.s_last;
  opt.other_sector = o.other_sector;
  opt.check_missed_levels = !o.no_level_check;

  // Refuse a too-large problem before building anything of size 2^n.
  check_gap_search_size(p.qubits, opt.sector.value_or(default_sector(p)), o.levels, opt.method, loaded.problem_file->qubits_place);
  check_gap_point_budget(opt);  // before the work estimate, which would otherwise speak first
  // The coarse scan and typically about a hundred more points (never more than the budget).
  check_work_limit(spectrum_work(p.qubits, o.levels, std::min(static_cast<double>(o.max_points), o.points + 100.0)),
                   o.allow_long, {"--points", 0, 0, "--points"});
  const TransverseIsingHamiltonian H(p);
  check_gap_search_options(opt, sch.scales);  // before anything is printed
  const GapSearchPlan plan = plan_gap_search(H, opt);
  if (!o.json) std::cout << gap_plan_text(p, plan) << std::flush;

  // Resumable: with --out, every finished point goes to a journal beside it.
  JournaledRun run(o.out, o.fresh, JournalLayout{"gap-search", {"s"}, spectrum_point_value_names(plan.levels)},
                   input_fingerprint({read_text_file(o.problem),
                                      o.schedule.empty() ? std::string("default linear 5 GHz") : read_text_file(o.schedule),
                                      fmt::format("{} {} {} {} {}", sector_name(plan.sector), plan.levels,
                                                  eigen_method_name(plan.method), opt.lanczos_tolerance,
                                                  opt.check_missed_levels)}),
                   {o.out, o.csv});
  if (ResultJournal* j = run.journal()) {
    const int k = plan.levels;
    opt.lookup = [j, k](double s) -> std::optional<SpectrumPoint> {
      if (auto v = j->find({s})) return spectrum_point_from_values(s, *v, k);
      return std::nullopt;
    };
    opt.record = [j](const SpectrumPoint& pt) { j->append({pt.s}, spectrum_point_values(pt)); };
    if (j->resumed() > 0 && !o.json)
      std::cout << fmt::format("resume       {} points already computed in {}\n", j->resumed(), j->path());
  }
  ProgressPrinter progress(o.progress);
  if (!o.quiet) opt.progress = [&progress](const GapSearchProgress& g) { progress(g); };
  const MinimumGapReport r = find_minimum_gap(H, sch.scales, opt);
  progress.done();

  // Eigenvectors on request: at s* and/or the given s, in the sector searched.
  const std::vector<EigenvectorsAt> vectors =
      gap_eigenvectors(H, sch.scales, r, {.at_star = vreq.star, .s = vreq.s, .levels = o.vector_levels});

  const GapReportInputs report{o.problem, o.schedule, &p, &sch.scales};
  std::cout << (o.json ? gap_report_json(report, r) : gap_report_text(report, r));

  if (!o.csv.empty()) write_file_atomically(o.csv, gap_curve_table(r).csv());
  if (!o.out.empty()) {
    std::vector<std::string> inputs{o.problem};
    if (!o.schedule.empty()) inputs.push_back(o.schedule);
    write_gap_result(o.out, r, vectors, vreq.star, o.s_tolerance, command_line(), inputs);
    run.remove_journal();  // the result file now holds everything
  }
}

}  // namespace

void register_gap(CLI::App& app) {
  auto o = std::make_shared<GapOptions>();
  CLI::App* sub = app.add_subcommand("gap",
      "The instantaneous spectrum of H(s) along s and its minimum gap.\n"
      "Scans s on a grid, subdivides where levels bend sharply (so a narrow avoided\n"
      "crossing is not missed), refines every local minimum with Brent's method (an\n"
      "end point whose sample is smallest too: the minimum may lie just inside), and\n"
      "reports s*, Delta_min in GHz with uncertainties, the gap's definition, the\n"
      "matrix element |<g|dH/ds|0>|, the adiabatic time scale, and which classical\n"
      "states the lowest levels end in.\n"
      "Gap: E_g - E_0, with g the degeneracy of the classical ground manifold in the\n"
      "sector (E_1 - E_0 when g = 1); E_1 - E_0 is shown separately when g >= 2.\n"
      "Sector: without fields the global spin flip is a symmetry and the anneal starts\n"
      "in its even sector, so the search runs there (half the dimension).\n"
      "Only the energy scales A(s), B(s) of the schedule matter here (default: linear, 5 GHz).\n"
      "Up to 20 qubits; the memory estimate is printed before the scan.\n"
      "Example: gapwise gap data-samples/spin-glass-8.toml schedules/hardware-like.toml --out gap.h5");
  sub->add_option("problem", o->problem, "problem file (TOML)")->required()->check(readable_input_file());
  sub->add_option("schedule", o->schedule, "schedule file (TOML) whose energy scales are used")->check(readable_input_file());
  sub->add_option("-k,--levels", o->levels, "lowest levels to follow (raised to g + 1 when needed)")->capture_default_str();
  sub->add_option("--sector", o->sector, "auto: even when every field is zero, else full; or full, even, odd")
      ->check(CLI::IsMember({"auto", "full", "even", "odd"}))->capture_default_str();
  sub->add_flag("--other-sector", o->other_sector, "also compute the levels of the other spin-flip sector at every point");
  sub->add_option("--solver", o->solver, "auto: dense up to dimension 128, Lanczos above; or dense, lanczos")
      ->check(CLI::IsMember({"auto", "dense", "lanczos"}))->capture_default_str();
  sub->add_option("--points", o->points, "uniform coarse-scan points over the s range (subdivision adds more where levels bend)")->capture_default_str();
  sub->add_option("--max-points", o->max_points, "budget for all points (grid + subdivision + refinement)")->capture_default_str();
  sub->add_option("--s-tolerance", o->s_tolerance, "wanted precision of s*")->capture_default_str();
  sub->add_option("--s-first", o->s_first, "start of the s range (default: where the scales start)");
  sub->add_option("--s-last", o->s_last, "end of the s range (default: where the scales end)");
  sub->add_flag("--no-level-check", o->no_level_check,
                "skip the Lanczos deflation check for missed degenerate levels (faster; only safe without exact degeneracies)");
  sub->add_option("--out", o->out, "HDF5 result file; points are journaled beside it, so a killed run resumes");
  sub->add_flag("--fresh", o->fresh, "ignore an existing journal of an interrupted run and start over");
  sub->add_option("--vectors-at", o->vectors_at,
                  "write eigenvectors of the lowest levels to the --out file at these s: `star` (the s* found),\n"
                  "numbers, or ranges FIRST:LAST:COUNT, e.g. --vectors-at star,0.5,0.9. Stored in the full\n"
                  "2^n basis (bit i of the index = qubit i) under /gap/eigenvectors/<i>/vectors, levels x 2^n;\n"
                  "even-sector vectors are expanded to the full basis (see the user guide)");
  sub->add_option("--vector-levels", o->vector_levels,
                  "how many of the lowest levels --vectors-at writes (default: the levels followed)")
      ->capture_default_str();
  sub->add_option("--csv", o->csv, "CSV of the curve: s, A, B, E_0..E_k-1, gaps, matrix elements");
  sub->add_flag("--json", o->json, "print a JSON summary instead of text");
  sub->add_flag("--progress", o->progress, "report progress on stderr even when it is not a terminal");
  sub->add_flag("-q,--quiet", o->quiet, "no progress on stderr");
  add_allow_long_flag(sub, o->allow_long);
  sub->callback([o] { run_gap(*o); });
}

}  // namespace gapwise::cli
