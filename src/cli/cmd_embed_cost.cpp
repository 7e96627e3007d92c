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
#include "io/output_paths.hpp"
#include "dynamics/anneal_simulation.hpp"
#include "dynamics/propagator.hpp"
#include "hamiltonian/memory_budget.hpp"
#include "io/atomic_file.hpp"
#include "io/embedding_file.hpp"
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

std::string chains_text(const Embedding& e, const IsingProblem& logical) {
  std::string s;
  for (int v = 0; v < e.logical_qubits(); ++v) {
    std::string members;
    for (int q : e.chains[static_cast<std::size_t>(v)]) members += (members.empty() ? "" : ",") + std::to_string(q);
    s += fmt::format("{}{}=[{}]", v ? " " : "", terminal_text(logical.label(v)), members);
  }
  return s;
}

std::string needed_text(const NeededDuration& n) {
  std::string s = n.describe();
  if (n.lost_again)
    s += n.stays_reached_ns ? fmt::format(" (p dips below the target again; stays above from {:.4g} ns)", *n.stays_reached_ns)
                            : " (p falls below the target again at the longest duration)";
  return s;
}

// How a needed duration bounds the answer, as stored in the HDF5 result.
long long needed_bound_code(const NeededDuration& n) {
  switch (n.kind) {
    case NeededDuration::Kind::Bracketed: return 0;
    case NeededDuration::Kind::AtMost: return -1;
    case NeededDuration::Kind::MoreThan: return 1;
  }
  return 0;
}

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
  for (const auto& [path, key] : {std::pair{&o.out, "--out"}, std::pair{&o.csv, "--csv"},
                                  std::pair{&o.write_physical, "--write-physical"}})
    if (!path->empty()) check_output_path(*path, key);
  return strengths;
}

void run_embed_cost(const EmbedCostOptions& o) {
  check_file_plan(FilePlan{}
                      .input(o.problem, "logical problem")
                      .input(o.embedding, "embedding")
                      .input(o.schedule, "schedule")
                      .output(o.out, "--out")
                      .output(o.csv, "--csv")
                      .output(o.write_physical, "--write-physical"));
  const std::vector<double> strengths = check_options(o);
  const IsingProblem logical = read_problem_file(o.problem);
  const Embedding embedding = read_embedding_file(o.embedding);
  const Schedule schedule = read_schedule_file(o.schedule);
  check_embedding_serves(embedding, logical, o.problem);
  check_memory(embedding.physical_qubits, 10, 0, o.embedding);

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
  const ChainScanPoint& best = r.points[r.best];

  TextTable table({"strength", "J_chain", "scale", "min_gap_ghz", "s_star", "p_logical", "p_physical", "broken_frac",
                   "needed_ns", "ground", "bound"});
  for (std::size_t k = 0; k < r.points.size(); ++k) {
    const auto& p = r.points[k];
    table.add({p.strength.relative ? fmt::format("{:g}x", p.strength.value) : fmt::format("{:g}", p.strength.value),
               fmt_num(p.chain_coupling, 6), fmt_num(p.scale, 6), fmt_num(p.m.gap.gap_ghz, 6), fmt_num(p.m.gap.s_star, 5),
               fmt_num(p.m.p_success, 6), fmt_num(p.m.p_physical, 6), fmt_num(p.m.decoded.mean_broken_fraction, 4),
               p.m.needed.describe() + (k == r.best ? "  <- best" : ""),
               p.ground_intact ? "intact" : (p.ground_decodes ? "broken" : "wrong"), p.above_bound ? "above" : "below"});
  }

  if (o.json) {
    toml::table j;
    put(j, "problem_file", o.problem);
    put(j, "embedding_file", o.embedding);
    put(j, "schedule_file", o.schedule);
    put(j, "target", o.target);
    put(j, "duration_ns", scan.duration_ns);
    put(j, "physical_qubits", static_cast<long long>(embedding.physical_qubits));
    if (scan.term_limit) put(j, "term_limit", *scan.term_limit);
    put(j, "chain_coupling_bound", r.chain_bound);
    toml::table lg;
    put(lg, "scale", r.logical_scale);
    put(lg, "min_gap_ghz", r.logical_m.gap.gap_ghz);
    put(lg, "s_star", r.logical_m.gap.s_star);
    put(lg, "gap_definition", r.logical_m.gap.definition);
    put(lg, "ground_probability", r.logical_m.p_success);
    put(lg, "needed_ns", r.logical_m.needed.ns);
    put(lg, "needed_kind", r.logical_m.needed.describe());
    j.insert_or_assign("logical", std::move(lg));
    toml::array pts;
    for (const auto& p : r.points) {
      toml::table e;
      put(e, "strength", p.strength.value);
      put(e, "relative", p.strength.relative);
      put(e, "chain_coupling", p.chain_coupling);
      put(e, "scale", p.scale);
      put(e, "above_bound", p.above_bound);
      put(e, "ground_intact", p.ground_intact);
      put(e, "ground_decodes", p.ground_decodes);
      put(e, "min_gap_ghz", p.m.gap.gap_ghz);
      put(e, "s_star", p.m.gap.s_star);
      put(e, "gap_definition", p.m.gap.definition);
      put(e, "p_logical", p.m.p_success);
      put(e, "p_physical", p.m.p_physical);
      put(e, "broken_chain_share", p.m.decoded.mean_broken_fraction);
      put(e, "any_break_probability", p.m.decoded.any_break_probability);
      put(e, "tie_probability", p.m.decoded.tie_probability);
      put(e, "needed_ns", p.m.needed.ns);
      put(e, "needed_kind", p.m.needed.describe());
      pts.push_back(std::move(e));
    }
    j.insert_or_assign("scan", std::move(pts));
    put(j, "best_index", static_cast<long long>(r.best));
    put(j, "best_chain_coupling", best.chain_coupling);
    put(j, "best_at_scan_edge", r.best_at_edge);
    put(j, "best_ground_intact", r.best_ground_intact);
    put(j, "price_of_embedding", r.price.ratio);
    put(j, "price_relation", r.price.relation);
    std::cout << to_json(j) << "\n";
  } else {
    const GroundManifold gm = find_ground_manifold(logical);
    std::cout << fmt::format("logical      {}: {} qubits, {} couplings; ground energy {:.10g}, degeneracy {}\n", o.problem,
                             logical.qubits, logical.couplings.size(), gm.energy, gm.degeneracy());
    std::cout << fmt::format("embedding    {}: {} physical qubits, chains {}; {} couplers{}\n", o.embedding,
                             embedding.physical_qubits, chains_text(embedding, logical),
                             embedding.couplers_given ? std::to_string(embedding.couplers.size()) : "all pairs",
                             embedding.couplers_given ? " listed" : " (no coupler list)");
    std::cout << fmt::format("schedule     {}: {}\n", o.schedule, schedule.scales.describe());
    std::cout << fmt::format("target       p >= {} ; search seeded at {}, bisected to {:g}; t_f = {:g} ns\n", o.target,
                             o.search_durations, o.resolution, scan.duration_ns);
    std::cout << fmt::format("term limit   {}\n", scan.term_limit
                                                      ? fmt::format("|h|, |J| <= {:g}: larger physical problems are scaled down", *scan.term_limit)
                                                      : std::string("none"));
    std::cout << fmt::format("chain bound  {:.6g}: above it every physical ground state is intact (method notes)\n\n",
                             r.chain_bound);
    std::cout << fmt::format("logical problem (scale {:g}): minimum gap {:.6g} GHz at s* = {:.5g} ({}); p(t_f) = {:.6f}; "
                             "duration needed {}\n\n",
                             r.logical_scale, r.logical_m.gap.gap_ghz, r.logical_m.gap.s_star, r.logical_m.gap.definition,
                             r.logical_m.p_success, needed_text(r.logical_m.needed));
    std::cout << "chain-strength scan (strength: x = times the largest logical |h|, |J|; p_logical: majority vote per\n"
                 "chain, ties to the chain's first qubit; broken_frac: expected fraction of broken chains at t_f;\n"
                 "ground: are the physical ground states intact, broken but decoding right, or wrong)\n"
              << table.render() << "\n";
    std::cout << fmt::format("best chain strength  {} (chain coupling {:g}{}): duration needed {}{}\n",
                             best.strength.describe(), best.chain_coupling,
                             best.scale != 1.0 ? fmt::format(", problem scaled by {:.4g}", best.scale) : "",
                             needed_text(best.m.needed),
                             r.best_at_edge ? "\n                     (at the edge of the scan: widen --strengths)" : "");
    if (!r.best_ground_intact)
      std::cout << "WARNING              no scanned strength keeps the physical ground states intact: scan stronger chains\n";
    std::cout << fmt::format("price of embedding   {} (duration needed embedded / logical)\n", r.price.describe());
  }

  if (!o.csv.empty()) write_file_atomically(o.csv, table.csv());
  if (!o.write_physical.empty()) {
    IsingProblem phys = best.physical;
    phys.description = fmt::format("{} (from {} and {}, chain strength {})", phys.description, o.problem, o.embedding,
                                   best.strength.describe());
    write_file_atomically(o.write_physical, format_problem_toml(phys));
  }
  if (!o.out.empty()) {
    Hdf5Output h5(o.out, {"gapwise-embed-cost", 1});
    write_provenance(h5, command_line(), {o.problem, o.embedding, o.schedule});
    h5.attribute("/embedding", "target", o.target);
    h5.attribute("/embedding", "duration_ns", scan.duration_ns);
    h5.attribute("/embedding", "chain_coupling_bound", r.chain_bound);
    h5.attribute("/embedding", "best_chain_coupling", best.chain_coupling);
    h5.attribute("/embedding", "price_of_embedding", r.price.ratio);
    h5.attribute("/embedding", "price_relation", r.price.relation);
    h5.attribute("/embedding/logical", "min_gap_ghz", r.logical_m.gap.gap_ghz);
    h5.attribute("/embedding/logical", "s_star", r.logical_m.gap.s_star);
    h5.attribute("/embedding/logical", "ground_probability", r.logical_m.p_success);
    h5.attribute("/embedding/logical", "needed_ns", r.logical_m.needed.ns);
    h5.attribute("/embedding/logical", "needed", r.logical_m.needed.describe());
    std::vector<double> coupling, scale, gap, sstar, pl, pp, broken, needed;
    for (const auto& p : r.points) {
      coupling.push_back(p.chain_coupling); scale.push_back(p.scale); gap.push_back(p.m.gap.gap_ghz);
      sstar.push_back(p.m.gap.s_star); pl.push_back(p.m.p_success); pp.push_back(p.m.p_physical);
      broken.push_back(p.m.decoded.mean_broken_fraction); needed.push_back(p.m.needed.ns);
    }
    h5.write("/embedding/scan/chain_coupling", coupling, "1");
    h5.write("/embedding/scan/scale", scale, "1");
    h5.write("/embedding/scan/min_gap", gap, "GHz");
    h5.write("/embedding/scan/s_star", sstar, "1");
    h5.write("/embedding/scan/p_logical", pl, "1");
    h5.write("/embedding/scan/p_physical", pp, "1");
    h5.write("/embedding/scan/broken_chain_share", broken, "1");
    h5.write("/embedding/scan/needed_duration", needed, "ns");
    std::vector<long long> bound, intact;
    for (const auto& p : r.points) {
      bound.push_back(needed_bound_code(p.m.needed));
      intact.push_back(p.ground_intact ? 1 : 0);
    }
    h5.write("/embedding/scan/needed_bound", bound,
             DataMeaning("1")
                 .flagged({-1, 0, 1}, "at_most bracketed more_than")
                 .described("what needed_duration is: -1 at most that (reached at the shortest duration tried), "
                            "0 bracketed, 1 more than that"));
    h5.write("/embedding/scan/ground_intact", intact,
             DataMeaning("1").flagged({0, 1}, "broken intact").described("1: every physical ground state has intact chains"));
    h5.attribute("/embedding", "best_index", static_cast<long long>(r.best));
    h5.attribute("/embedding/logical", "needed_bound", needed_bound_code(r.logical_m.needed));
    h5.commit();
  }
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
