#include "io/embed_cost_report.hpp"

#include <sstream>

#include <fmt/format.h>

#include "io/hdf5_output.hpp"
#include "io/json_summary.hpp"
#include "io/problem_file.hpp"
#include "io/terminal_text.hpp"
#include "problem/classical_spectrum.hpp"

namespace gapwise {
namespace {

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

}  // namespace

long long needed_bound_code(const NeededDuration& n) {
  switch (n.kind) {
    case NeededDuration::Kind::Bracketed: return 0;
    case NeededDuration::Kind::AtMost: return -1;
    case NeededDuration::Kind::MoreThan: return 1;
  }
  return 0;
}


TextTable chain_scan_table(const ChainScanResult& r) {
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

  return table;
}

std::string embed_cost_report_json(const EmbedCostReport& rep) {
  const EmbedCostReportOptions& o = rep.o;
  const Embedding& embedding = *rep.embedding;
  const ChainScanOptions& scan = *rep.scan;
  const ChainScanResult& r = *rep.result;
  const ChainScanPoint& best = r.points[r.best];
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
  return to_json(j) + "\n";
}

std::string embed_cost_report_text(const EmbedCostReport& rep) {
  const EmbedCostReportOptions& o = rep.o;
  const IsingProblem& logical = *rep.logical;
  const Embedding& embedding = *rep.embedding;
  const ChainScanOptions& scan = *rep.scan;
  const ChainScanResult& r = *rep.result;
  const ChainScanPoint& best = r.points[r.best];
  const Schedule& schedule = *rep.schedule;
  std::ostringstream os;
  const GroundManifold gm = find_ground_manifold(logical);
  os << fmt::format("logical      {}: {} qubits, {} couplings; ground energy {:.10g}, degeneracy {}\n", o.problem,
                           logical.qubits, logical.couplings.size(), gm.energy, gm.degeneracy());
  os << fmt::format("embedding    {}: {} physical qubits, chains {}; {} couplers{}\n", o.embedding,
                           embedding.physical_qubits, chains_text(embedding, logical),
                           embedding.couplers_given ? std::to_string(embedding.couplers.size()) : "all pairs",
                           embedding.couplers_given ? " listed" : " (no coupler list)");
  os << fmt::format("schedule     {}: {}\n", o.schedule, schedule.scales.describe());
  os << fmt::format("target       p >= {} ; search seeded at {}, bisected to {:g}; t_f = {:g} ns\n", o.target,
                           o.search_durations, o.resolution, scan.duration_ns);
  os << fmt::format("term limit   {}\n", scan.term_limit
                                                    ? fmt::format("|h|, |J| <= {:g}: larger physical problems are scaled down", *scan.term_limit)
                                                    : std::string("none"));
  os << fmt::format("chain bound  {:.6g}: above it every physical ground state is intact (method notes)\n\n",
                           r.chain_bound);
  os << fmt::format("logical problem (scale {:g}): minimum gap {:.6g} GHz at s* = {:.5g} ({}); p(t_f) = {:.6f}; "
                           "duration needed {}\n\n",
                           r.logical_scale, r.logical_m.gap.gap_ghz, r.logical_m.gap.s_star, r.logical_m.gap.definition,
                           r.logical_m.p_success, needed_text(r.logical_m.needed));
  os << "chain-strength scan (strength: x = times the largest logical |h|, |J|; p_logical: majority vote per\n"
               "chain, ties to the chain's first qubit; broken_frac: expected fraction of broken chains at t_f;\n"
               "ground: are the physical ground states intact, broken but decoding right, or wrong)\n"
            << chain_scan_table(r).render() << "\n";
  os << fmt::format("best chain strength  {} (chain coupling {:g}{}): duration needed {}{}\n",
                           best.strength.describe(), best.chain_coupling,
                           best.scale != 1.0 ? fmt::format(", problem scaled by {:.4g}", best.scale) : "",
                           needed_text(best.m.needed),
                           r.best_at_edge ? "\n                     (at the edge of the scan: widen --strengths)" : "");
  if (!r.best_ground_intact)
    os << "WARNING              no scanned strength keeps the physical ground states intact: scan stronger chains\n";
  os << fmt::format("price of embedding   {} (duration needed embedded / logical)\n", r.price.describe());
  return os.str();
}

std::string best_physical_problem_toml(const EmbedCostReport& rep) {
  const EmbedCostReportOptions& o = rep.o;
  const ChainScanResult& r = *rep.result;
  const ChainScanPoint& best = r.points[r.best];
  IsingProblem phys = best.physical;
  phys.description = fmt::format("{} (from {} and {}, chain strength {})", phys.description, o.problem, o.embedding,
                                 best.strength.describe());
  return format_problem_toml(phys);
}

void write_embed_cost_result(const std::string& path, const EmbedCostReport& rep, const std::string& command_line) {
  const EmbedCostReportOptions& o = rep.o;
  const ChainScanOptions& scan = *rep.scan;
  const ChainScanResult& r = *rep.result;
  const ChainScanPoint& best = r.points[r.best];
  Hdf5Output h5(path, {"gapwise-embed-cost", 1});
  write_provenance(h5, command_line, {o.problem, o.embedding, o.schedule});
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

}  // namespace gapwise
