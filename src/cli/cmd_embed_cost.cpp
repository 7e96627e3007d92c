// `gapwise embed-cost LOGICAL EMBEDDING SCHEDULE`: what embedding a logical
// problem costs. Scans the chain strength, and for each reports the minimum gap
// of the physical problem, p_logical(t_f) with the chain statistics, and the
// duration needed for the target; then the best strength and the price of
// embedding (duration needed embedded / logical). All work is in
// studies/chain_strength_scan.hpp.
#include <algorithm>
#include <cmath>
#include <iostream>
#include <memory>
#include <optional>
#include <sstream>

#include <fmt/format.h>

#include "cli/cli_common.hpp"
#include "cli/input_loading.hpp"
#include "io/output_paths.hpp"
#include "dynamics/anneal_simulation.hpp"
#include "dynamics/propagator.hpp"
#include "hamiltonian/memory_budget.hpp"
#include "io/atomic_file.hpp"
#include "io/embed_cost_report.hpp"
#include "io/hdf5_output.hpp"
#include "io/input_error.hpp"
#include "io/json_summary.hpp"
#include "io/terminal_text.hpp"
#include "io/text_table.hpp"
#include "studies/chain_strength_scan.hpp"
#include "studies/duration_study.hpp"
#include "studies/work_estimate.hpp"

namespace gapwise::cli {
namespace {

struct EmbedCostOptions {
  std::string problem, embedding, schedule, out, csv, write_physical, search_durations = "log:1:1000:13", durations, strengths;
  std::string propagator = SimulationOptions{}.propagator;
  bool absolute = false, json = false, quiet = false, no_term_limit = false, allow_long = false;
  std::optional<double> term_limit;
  double target = kDefaultTargetProbability, tolerance = 1e-6, resolution = 5e-3;
  int threads = 0;
};

/// Checks the options; returns the chain strengths asked for (empty: the default scan).
std::vector<double> check_options(const EmbedCostOptions& o) {
  check_tolerance(o.tolerance);
  check_target_probability(o.target);
  check_threads(o.threads);
  check_resolution_value(o.resolution, {"--resolution", 0, 0, "--resolution"});
  const std::vector<double> strengths =
      o.strengths.empty() ? std::vector<double>{} : parse_value_list(o.strengths, "--strengths");
  for (double s : strengths)
    if (!(s > 0.0) || !std::isfinite(s))
      throw InputError({"--strengths", 0, 0, "--strengths"}, fmt::format("chain strength {} is not positive", s),
                       "give magnitudes > 0 (the chain coupling is always ferromagnetic)");
  if (o.term_limit && o.no_term_limit)
    throw InputError({"--term-limit", 0, 0, "--term-limit"}, "both --term-limit and --no-term-limit were given",
                     "give one of them");
  return strengths;
}

void run_embed_cost(const EmbedCostOptions& o) {
  const RunFiles files = RunFiles{}
                             .problem(o.problem, "logical problem")
                             .embedding(o.embedding)
                             .schedule(o.schedule)
                             .plan(FilePlan{}
                                       .output(o.out, "--out")
                                       .output(o.csv, "--csv")
                                       .output(o.write_physical, "--write-physical"));
  check_run_files(files);
  const std::vector<double> strengths = check_options(o);  // a bad option is named before a file is parsed
  const RunInputs loaded = read_run_inputs(files);
  const IsingProblem& logical = loaded.problem();
  const Embedding& embedding = *loaded.embedding;
  const Schedule& schedule = loaded.schedule;
  loaded.check_memory(10);  // the physical problem's qubits

  ChainScanOptions scan;
  const std::vector<double> values = strengths.empty() ? std::vector<double>{0.5, 1, 1.5, 2, 3, 4} : strengths;
  for (double v : values)
    scan.strengths.push_back(o.absolute ? ChainStrength::absolute(v) : ChainStrength::relative_to_largest(v));
  if (embedding.chain_strength) scan.strengths.push_back(*embedding.chain_strength);  // the file's default, always
  scan.term_limit = o.no_term_limit ? std::nullopt : (o.term_limit ? o.term_limit : embedding.term_limit);
  std::optional<double> duration_ns;
  if (!o.durations.empty()) {
    duration_ns = parse_single_value(o.durations, "--durations", ListOf::Durations,
                                     "the anneal that reports p_logical runs one duration",
                                     "give one duration; the needed-duration search takes --search-durations");
    check_duration_ns(*duration_ns, {"--durations", 0, 0, "--durations"});
  }
  scan.duration_ns = schedule.path_for(duration_ns).duration_ns();
  try {
    scan.grid_ns = normalised_grid(parse_value_list(o.search_durations, "--search-durations", ListOf::Durations));
  } catch (const InputError& e) {  // the library names --durations
    throw InputError({"--search-durations", 0, 0, "--search-durations"}, e.problem(), e.fix());
  }
  scan.needed.target = o.target;
  scan.needed.relative_width = o.resolution;
  scan.needed.noise = std::max(10.0 * o.tolerance, 1e-5);
  scan.simulation.propagator = o.propagator;
  scan.simulation.propagation.tolerance = o.tolerance;
  scan.threads = o.threads;
  {
    // Each strength: the grid and about as much again for the needed-duration search, plus the t_f anneal;
    // the strength itself sets the physical problem's energy scale.
    WorkEstimate work;
    for (std::size_t k = 0; k < scan.strengths.size(); ++k) {
      const SourcePlace from = k < values.size() ? SourcePlace{"--strengths", 0, 0, "--strengths"}
                                                 : SourcePlace{o.embedding, 0, 0, "chain_strength"};
      const IsingProblem physical =
          embed_problem(logical, embedding, scan.strengths[k].resolve(logical, from), scan.term_limit).physical;
      work += anneal_work(physical, schedule.scales, scan.duration_ns);
      for (double t : scan.grid_ns) work += anneal_work(physical, schedule.scales, t, 2.0);
    }
    check_work_limit(work, o.allow_long, {"--search-durations", 0, 0, "--search-durations"});
  }
  if (!o.quiet) scan.progress = [](const std::string& what) { std::cerr << "gapwise embed-cost: " << what << "\n"; };

  const ChainScanResult r = scan_chain_strength(logical, embedding, schedule, scan);

  const EmbedCostReport rep{{o.problem, o.embedding, o.schedule, o.search_durations, o.target, o.resolution},
                            &logical, &embedding, &schedule, &scan, &r};
  std::cout << (o.json ? embed_cost_report_json(rep) : embed_cost_report_text(rep));
  if (!o.csv.empty()) write_file_atomically(o.csv, chain_scan_table(r).csv());
  if (!o.write_physical.empty()) write_file_atomically(o.write_physical, best_physical_problem_toml(rep));
  if (!o.out.empty()) write_embed_cost_result(o.out, rep, command_line());
}

}  // namespace

void register_embed_cost(CLI::App& app) {
  auto o = std::make_shared<EmbedCostOptions>();
  CLI::App* sub = app.add_subcommand("embed-cost",
      "What embedding costs. LOGICAL is a problem file, EMBEDDING gives each logical qubit\n"
      "its chain of physical qubits (see the user guide). For each chain strength the\n"
      "physical problem is built (fields and couplings split over chains, ferromagnetic\n"
      "chains) and gapwise reports its minimum gap, p_logical at t_f (majority vote per\n"
      "chain), the broken-chain share and the duration needed for p_logical >= target;\n"
      "then the best chain strength and the price of embedding: the duration needed on\n"
      "the embedded problem over that on the logical problem (under the same term limit).\n"
      "Example: gapwise embed-cost data-samples/triangle.toml data-samples/triangle-ring-embedding.toml \\\n"
      "           schedules/linear.toml --strengths 1,2,3 --write-physical ring.toml");
  sub->add_option("logical", o->problem, "logical problem file (TOML)")->required()->check(readable_input_file());
  sub->add_option("embedding", o->embedding, "embedding file (TOML)")->required()->check(readable_input_file());
  sub->add_option("schedule", o->schedule, "schedule file (TOML)")->required()->check(readable_input_file());
  add_list_option(sub, "--strengths", o->strengths,
                  "chain strengths to scan, a LIST such as 1,2,3 or lin:0.5:4:8; multiples of the largest logical |h| or |J|\n"
                  "unless --absolute (default 0.5,1,1.5,2,3,4; the embedding file's own strength is added)");
  sub->add_flag("--absolute", o->absolute, "read --strengths as absolute magnitudes in problem units");
  sub->add_option("--term-limit", o->term_limit,
                  "largest |h| or |J| the device accepts; larger problems are scaled down (default: the file's)");
  sub->add_flag("--no-term-limit", o->no_term_limit, "ignore the embedding file's term limit");
  sub->add_option("--target", o->target, "success probability the needed duration must reach")->capture_default_str();
  add_list_option(sub, "--search-durations", o->search_durations,
                  "durations in ns seeding the search for the needed duration, a LIST")->capture_default_str();
  sub->add_option("--resolution", o->resolution, "relative width at which the bisection for the needed duration stops")
      ->capture_default_str();
  add_durations_option(sub, o->durations, "t_f of the anneal reporting p_logical, one value (default: the schedule's)");
  sub->add_option("--tolerance", o->tolerance, "target accuracy of each anneal's probabilities")->capture_default_str();
  list_propagator_names(sub->add_option("--propagator", o->propagator, "which propagator runs the dynamics")
      ->check(CLI::IsMember(propagator_names()))->capture_default_str(), propagator_names());
  sub->add_option("--threads", o->threads, "anneals run in parallel (0: OpenMP's default)")->capture_default_str();
  sub->add_option("--write-physical", o->write_physical,
                  "write the physical problem at the best strength as a problem file");
  sub->add_option("--out", o->out, "write an HDF5 result file (scan columns, logical reference, provenance)");
  sub->add_option("--csv", o->csv, "write the scan table as CSV");
  sub->add_flag("--json", o->json, "print a JSON summary instead of text");
  sub->add_flag("-q,--quiet", o->quiet, "no progress lines on stderr");
  add_allow_long_flag(sub, o->allow_long);
  sub->callback([o] { run_embed_cost(*o); });
}

}  // namespace gapwise::cli
