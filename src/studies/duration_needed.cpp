#include "studies/duration_needed.hpp"

#include <cmath>
#include <stdexcept>

namespace gapwise {

std::vector<PStretch> decreasing_stretches(const std::map<double, double>& s, double noise) {
  std::vector<PStretch> out;
  if (s.size() < 2) return out;
  auto prev = s.begin();
  for (auto it = std::next(s.begin()); it != s.end(); prev = it, ++it) {
    if (it->second < prev->second - noise) {
      if (!out.empty() && out.back().to_ns == prev->first) {
        out.back().to_ns = it->first;
        out.back().p_to = it->second;
      } else {
        out.push_back({prev->first, it->first, prev->second, it->second});
      }
    }
  }
  return out;
}

namespace {

// Shrinks [lo, hi] (p(lo) < p* <= p(hi)) by probing; `first` picks the first
// sub-interval that crosses upward, otherwise the last.
CrossingBracket bisect(const ProbabilityBatch& p_of, std::map<double, double>& pts, double lo, double hi, bool first,
                       const DurationNeededOptions& o) {
  CrossingBracket b{lo, hi, pts.at(lo), pts.at(hi), 0, false};
  while (b.upper_ns / b.lower_ns - 1.0 > o.relative_width && b.rounds < o.max_rounds) {
    const int m = std::max(1, o.probes_per_round);
    std::vector<double> probes;
    const double l0 = std::log(b.lower_ns), l1 = std::log(b.upper_ns);
    for (int k = 1; k <= m; ++k) probes.push_back(std::exp(l0 + (l1 - l0) * k / (m + 1)));
    const std::vector<double> p = p_of(probes);
    if (p.size() != probes.size()) throw std::logic_error("the probability evaluator returned the wrong count");
    std::vector<double> t{b.lower_ns}, v{b.p_lower};
    for (std::size_t k = 0; k < probes.size(); ++k) {
      pts[probes[k]] = p[k];
      t.push_back(probes[k]);
      v.push_back(p[k]);
    }
    t.push_back(b.upper_ns);
    v.push_back(b.p_upper);
    int crossings = 0;
    std::size_t pick = 0;
    for (std::size_t k = 0; k + 1 < t.size(); ++k) {
      if (v[k] < o.target && v[k + 1] >= o.target) {
        if (crossings == 0 || !first) pick = k;
        ++crossings;
      }
    }
    if (crossings > 1) b.oscillation_inside = true;
    b.lower_ns = t[pick];
    b.upper_ns = t[pick + 1];
    b.p_lower = v[pick];
    b.p_upper = v[pick + 1];
    ++b.rounds;
  }
  return b;
}

}  // namespace

DurationNeeded find_duration_needed(const ProbabilityBatch& p_of, std::map<double, double> pts,
                                    const DurationNeededOptions& o) {
  if (pts.empty()) throw std::invalid_argument("find_duration_needed needs at least one sampled duration");
  if (!(o.target > 0.0 && o.target < 1.0)) throw std::invalid_argument("the target must lie inside (0, 1)");
  if (!(o.relative_width > 0.0)) throw std::invalid_argument("relative_width must be positive");
  DurationNeeded r;
  r.target = o.target;
  const std::map<double, double> grid = pts;  // the sampled points before any probe
  auto first_hit = grid.end();
  for (auto it = grid.begin(); it != grid.end(); ++it)
    if (it->second >= o.target) { first_hit = it; break; }
  if (first_hit == grid.end()) {
    r.status = NeededStatus::NotReached;
    r.first = {grid.rbegin()->first, grid.rbegin()->first, grid.rbegin()->second, grid.rbegin()->second, 0, false};
  } else if (first_hit == grid.begin()) {
    r.status = NeededStatus::ReachedAtShortest;
    r.first = {first_hit->first, first_hit->first, first_hit->second, first_hit->second, 0, false};
  } else {
    r.status = NeededStatus::Reached;
    r.first = bisect(p_of, pts, std::prev(first_hit)->first, first_hit->first, true, o);
  }
  if (r.status != NeededStatus::NotReached) {
    // The last sampled point below the target after the first crossing.
    auto last_miss = grid.end();
    for (auto it = std::next(first_hit); it != grid.end(); ++it)
      if (it->second < o.target) last_miss = it;
    if (last_miss != grid.end()) {
      if (std::next(last_miss) == grid.end()) r.lost_at_longest = true;
      else r.stays_reached = bisect(p_of, pts, last_miss->first, std::next(last_miss)->first, false, o);
    }
  }
  r.decreasing = decreasing_stretches(pts, o.noise);
  r.points = std::move(pts);
  return r;
}

DurationNeeded duration_needed(DurationEvaluator& ev, const std::vector<double>& grid, const DurationNeededOptions& o,
                               int threads) {
  std::map<double, double> samples;
  for (const auto& pt : ev.evaluate(grid, threads)) samples[pt.duration_ns] = pt.ground_probability;
  auto batch = [&](const std::vector<double>& t) {
    std::vector<double> p;
    for (const auto& pt : ev.evaluate(t, threads)) p.push_back(pt.ground_probability);
    return p;
  };
  return find_duration_needed(batch, std::move(samples), o);
}

}  // namespace gapwise
