#include "studies/outcome_analysis.hpp"

#include <algorithm>
#include <bit>
#include <cmath>
#include <limits>
#include <map>
#include <stdexcept>

namespace gapwise {

int hamming_to_ground(BasisIndex b, const GroundManifold& ground) {
  int best = std::numeric_limits<int>::max();
  for (BasisIndex g : ground.states) best = std::min(best, std::popcount(b ^ g));
  return best;
}

namespace {

GroundBalance balance_of(const std::vector<GroundStateShare>& ground, double p) {
  GroundBalance bal;
  if (ground.size() < 2) return bal;
  double lo = std::numeric_limits<double>::infinity(), hi = 0;
  for (const auto& g : ground) {
    lo = std::min(lo, g.probability);
    hi = std::max(hi, g.probability);
  }
  const double g = static_cast<double>(ground.size());
  bal.max_over_min = lo > 0 ? hi / lo : std::numeric_limits<double>::infinity();
  bal.spread = p > 0 ? (hi - lo) / (p / g) : 0.0;
  double tv = 0;
  if (p > 0)
    for (const auto& s : ground) tv += std::abs(s.share - 1.0 / g);
  bal.distance_from_fair = 0.5 * tv;
  return bal;
}

}  // namespace

OutcomeAnalysis analyze_outcome(const TransverseIsingHamiltonian& h, const GroundManifold& ground,
                                const std::vector<double>& prob, const OutcomeOptions& options) {
  if (prob.size() != h.dim()) throw std::invalid_argument("analyze_outcome: probabilities do not match the dimension");
  OutcomeAnalysis oa;
  for (BasisIndex b : ground.states) oa.ground_probability += prob[b];
  for (BasisIndex b : ground.states)
    oa.ground.push_back({b, prob[b], oa.ground_probability > 0 ? prob[b] / oa.ground_probability : 0.0});
  oa.balance = balance_of(oa.ground, oa.ground_probability);

  // Excited levels: energies grouped with the manifold's tolerance, keyed by a
  // rounded energy so that equal energies computed in a different order merge.
  const auto& diag = h.diagonal();
  const double offset = h.problem().offset;
  const double tol = ground.tolerance;
  std::map<long long, SinkLevel> levels;
  std::vector<SinkState> states;
  for (BasisIndex b = 0; b < prob.size(); ++b) {
    if (ground.contains(b)) continue;
    const long long key = std::llround(diag[b] / (4 * tol));
    auto [it, fresh] = levels.try_emplace(key);
    SinkLevel& lv = it->second;
    if (fresh) {
      lv.energy = diag[b] + offset;
      lv.min_hamming_to_ground = std::numeric_limits<int>::max();
    }
    ++lv.states;
    lv.probability += prob[b];
    const int d = hamming_to_ground(b, ground);
    lv.min_hamming_to_ground = std::min(lv.min_hamming_to_ground, d);
    if (prob[b] >= options.min_probability) states.push_back({b, diag[b] + offset, prob[b], d});
  }
  for (auto& [key, lv] : levels) {
    if (lv.probability < options.min_probability) continue;
    oa.sink_levels.push_back(lv);
  }
  auto by_probability = [](const auto& x, const auto& y) {
    return x.probability != y.probability ? x.probability > y.probability : x.energy < y.energy;
  };
  std::sort(oa.sink_levels.begin(), oa.sink_levels.end(), by_probability);
  if (oa.sink_levels.size() > options.max_sink_levels) oa.sink_levels.resize(options.max_sink_levels);
  std::sort(states.begin(), states.end(), [](const SinkState& x, const SinkState& y) {
    return x.probability != y.probability ? x.probability > y.probability : x.state < y.state;
  });
  if (states.size() > options.max_sink_states) states.resize(options.max_sink_states);
  oa.sink_states = std::move(states);
  return oa;
}

}  // namespace gapwise
