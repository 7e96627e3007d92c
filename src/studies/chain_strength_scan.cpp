#include "studies/chain_strength_scan.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "dynamics/anneal_simulation.hpp"
#include "io/input_error.hpp"

namespace gapwise {

NeededDuration NeededDuration::from(const DurationNeeded& d) {
  NeededDuration n;
  switch (d.status) {
    case NeededStatus::Reached:
      n.kind = Kind::Bracketed;
      n.ns = d.first.upper_ns;
      n.lower_ns = d.first.lower_ns;
      break;
    case NeededStatus::ReachedAtShortest:
      n.kind = Kind::AtMost;
      n.ns = d.first.upper_ns;
      break;
    case NeededStatus::NotReached:
      n.kind = Kind::MoreThan;
      n.ns = d.first.lower_ns;
      break;
  }
  n.lost_again = d.stays_reached.has_value() || d.lost_at_longest;
  if (d.stays_reached) n.stays_reached_ns = d.stays_reached->upper_ns;
  return n;
}

std::string NeededDuration::describe() const {
  switch (kind) {
    case Kind::Bracketed: return fmt::format("{:.4g} ns", ns);
    case Kind::AtMost: return fmt::format("<= {:.4g} ns", ns);
    case Kind::MoreThan: return fmt::format("> {:.4g} ns", ns);
  }
  return "?";
}

std::string DurationRatio::describe() const {
  if (relation == "?") return "unknown (neither duration is bracketed)";
  return fmt::format("{}{:.3g}", relation == "=" ? "" : relation + " ", ratio);
}

DurationRatio needed_ratio(const NeededDuration& a, const NeededDuration& b) {
  using K = NeededDuration::Kind;
  DurationRatio r;
  r.ratio = b.ns > 0 ? a.ns / b.ns : 0.0;
  // A bracketed duration is known to the search's relative width. The true
  // ratio can only be larger when the numerator is a lower bound (MoreThan) or
  // the denominator an upper bound (AtMost), only smaller in the mirror cases.
  const bool up = a.kind == K::MoreThan || b.kind == K::AtMost;
  const bool down = a.kind == K::AtMost || b.kind == K::MoreThan;
  if (up && down) r.relation = "?";
  else if (up) r.relation = a.kind == K::MoreThan ? ">" : ">=";
  else if (down) r.relation = b.kind == K::MoreThan ? "<" : "<=";
  else r.relation = "=";
  return r;
}

ScanMeasurement measure_problem(const AnnealSetup& setup, const Embedding* embedding,
                                const GroundManifold* logical_ground, const ChainScanOptions& o) {
  ScanMeasurement m;
  m.gap = find_minimum_gap(setup.hamiltonian, setup.schedule.scales, o.gap);
  const GroundManifold physical_ground = find_ground_manifold(setup.problem, setup.hamiltonian.diagonal());
  SimulationOptions sim = setup.options;
  sim.top_outcomes = 0;
  const AnnealResult r = simulate_anneal(setup.hamiltonian, physical_ground, setup.schedule.scales,
                                         setup.schedule.path_for(o.duration_ns), setup.start, sim);
  m.norm_drift = r.norm_drift;
  m.p_physical = r.ground_probability;
  if (embedding && logical_ground) {
    m.decoded = decode_distribution(probabilities(r.final_state), *embedding, *logical_ground, physical_ground);
    m.p_success = m.decoded.logical_ground_probability;
  } else {
    m.p_success = r.ground_probability;
  }
  DurationEvaluator evaluator(setup);
  m.search = duration_needed(evaluator, o.grid_ns, o.needed, o.threads);
  m.needed = NeededDuration::from(m.search);
  return m;
}

namespace {

// Ordering for "best": shortest needed duration first (AtMost sits at the
// shortest sampled duration, so it sorts before any bracketed value); strengths
// that never reach the target come last, ranked by p at the longest sampled
// duration; equal durations prefer the larger minimum gap.
bool better(const ChainScanPoint& x, const ChainScanPoint& y) {
  using K = NeededDuration::Kind;
  if (x.ground_intact != y.ground_intact) return x.ground_intact;
  const bool xr = x.m.needed.kind != K::MoreThan, yr = y.m.needed.kind != K::MoreThan;
  if (xr != yr) return xr;
  if (xr && x.m.needed.ns != y.m.needed.ns) return x.m.needed.ns < y.m.needed.ns;
  if (!xr) {
    const double px = x.m.search.points.empty() ? 0.0 : x.m.search.points.rbegin()->second;
    const double py = y.m.search.points.empty() ? 0.0 : y.m.search.points.rbegin()->second;
    if (px != py) return px > py;
  }
  return x.m.gap.gap_ghz > y.m.gap.gap_ghz;
}

}  // namespace

ChainScanResult scan_chain_strength(const IsingProblem& logical, const Embedding& e, const Schedule& schedule,
                                    const ChainScanOptions& o) {
  if (o.strengths.empty())
    throw InputError({"--strengths", 0, 0, "--strengths"}, "no chain strengths to scan", "give at least one chain strength");
  check_embedding_serves(e, logical, logical.description.empty() ? "the logical problem" : logical.description);
  auto say = [&](const std::string& what) {
    if (o.progress) o.progress(what);
  };

  ChainScanResult out;
  out.chain_bound = chain_coupling_bound(logical);
  out.logical = limit_terms(logical, o.term_limit, &out.logical_scale);
  const GroundManifold logical_ground = find_ground_manifold(logical);

  // Resolve and order the strengths; equal couplings are scanned once.
  std::vector<std::pair<double, ChainStrength>> order;
  for (const auto& s : o.strengths) order.push_back({s.resolve(logical, {e.source, 0, 0, "chain strength"}), s});
  std::stable_sort(order.begin(), order.end(), [](const auto& a, const auto& b) { return a.first < b.first; });
  order.erase(std::unique(order.begin(), order.end(), [](const auto& a, const auto& b) { return a.first == b.first; }),
              order.end());

  say("logical problem: minimum gap and duration needed");
  const AnnealSetup logical_setup(out.logical, schedule, o.simulation);
  out.logical_m = measure_problem(logical_setup, nullptr, nullptr, o);

  for (std::size_t k = 0; k < order.size(); ++k) {
    const auto& [coupling, strength] = order[k];
    say(fmt::format("chain strength {} of {} ({}, chain coupling {:g}): minimum gap, anneal, duration needed", k + 1,
                    order.size(), strength.describe(), coupling));
    ChainScanPoint p;
    p.strength = strength;
    p.chain_coupling = coupling;
    p.above_bound = coupling > out.chain_bound;
    const EmbeddedProblem ep = embed_problem(logical, e, coupling, o.term_limit);
    p.scale = ep.scale;
    p.physical = ep.physical;
    const GroundManifold physical_ground = find_ground_manifold(ep.physical);
    p.ground_intact = p.ground_decodes = true;
    for (BasisIndex b : physical_ground.states) {
      const ChainReadout rd = decode_majority(b, e);
      p.ground_intact = p.ground_intact && rd.broken_chains == 0;
      p.ground_decodes = p.ground_decodes && logical_ground.contains(rd.logical);
    }
    AnnealSetup setup(ep.physical, schedule, o.simulation);
    setup.ground = logical_success_manifold(e, logical_ground, ep.physical);  // the search measures p_logical
    p.m = measure_problem(setup, &e, &logical_ground, o);
    out.points.push_back(std::move(p));
  }
  for (std::size_t k = 1; k < out.points.size(); ++k)
    if (better(out.points[k], out.points[out.best])) out.best = k;
  out.best_ground_intact = out.points[out.best].ground_intact;
  // Edge of the eligible (intact) range: the optimum may lie beyond it.
  std::size_t first = out.points.size(), last = 0;
  for (std::size_t k = 0; k < out.points.size(); ++k)
    if (out.points[k].ground_intact == out.best_ground_intact) first = std::min(first, k), last = std::max(last, k);
  out.best_at_edge = last > first && (out.best == first || out.best == last);
  out.price = needed_ratio(out.points[out.best].m.needed, out.logical_m.needed);
  return out;
}

}  // namespace gapwise
