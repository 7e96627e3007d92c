#include "problem/chain_decoding.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

#include <fmt/format.h>

namespace gapwise {

ChainReadout decode_majority(BasisIndex physical, const Embedding& e) {
  ChainReadout r;
  for (int v = 0; v < e.logical_qubits(); ++v) {
    const auto& chain = e.chains[static_cast<std::size_t>(v)];
    int ones = 0;
    for (int q : chain) ones += static_cast<int>((physical >> q) & 1U);
    const int size = static_cast<int>(chain.size());
    int bit;
    if (2 * ones > size) bit = 1;
    else if (2 * ones < size) bit = 0;
    else bit = static_cast<int>((physical >> chain.front()) & 1U);  // tie: the first qubit decides
    if (ones != 0 && ones != size) ++r.broken_chains;
    if (2 * ones == size) ++r.tied_chains;
    r.logical |= static_cast<BasisIndex>(bit) << v;
  }
  return r;
}

DecodedOutcomes decode_distribution(const std::vector<double>& probs, const Embedding& e,
                                    const GroundManifold& logical_ground, const GroundManifold& physical_ground) {
  const std::size_t dim = std::size_t{1} << e.physical_qubits;
  if (probs.size() != dim)
    throw std::invalid_argument(fmt::format("decode_distribution: {} probabilities for {} physical qubits",
                                            probs.size(), e.physical_qubits));
  DecodedOutcomes d;
  const double chains = static_cast<double>(std::max(e.logical_qubits(), 1));
  for (BasisIndex b = 0; b < dim; ++b) {
    const double p = probs[b];
    if (p == 0.0) continue;
    const ChainReadout r = decode_majority(b, e);
    if (logical_ground.contains(r.logical)) d.logical_ground_probability += p;
    d.mean_broken_fraction += p * r.broken_chains / chains;
    if (r.broken_chains > 0) d.any_break_probability += p;
    if (r.tied_chains > 0) d.tie_probability += p;
  }
  for (BasisIndex b : physical_ground.states) d.physical_ground_probability += probs[b];
  return d;
}

std::vector<BasisIndex> states_decoding_to(const Embedding& e, const GroundManifold& logical_ground) {
  const std::size_t dim = std::size_t{1} << e.physical_qubits;
  std::vector<BasisIndex> out;
  for (BasisIndex b = 0; b < dim; ++b)
    if (logical_ground.contains(decode_majority(b, e).logical)) out.push_back(b);
  return out;
}

GroundManifold logical_success_manifold(const Embedding& e, const GroundManifold& logical_ground,
                                        const IsingProblem& physical) {
  GroundManifold m;
  m.states = states_decoding_to(e, logical_ground);
  const std::vector<double> diag = problem_diagonal(physical);
  const GroundManifold phys = find_ground_manifold(physical, diag);
  m.tolerance = phys.tolerance;
  double inside = std::numeric_limits<double>::infinity(), outside = inside;
  const std::size_t dim = std::size_t{1} << e.physical_qubits;
  for (BasisIndex b = 0, k = 0; b < dim; ++b) {
    const double energy = diag[b] + physical.offset;
    if (k < m.states.size() && m.states[k] == b) {
      inside = std::min(inside, energy);
      ++k;
    } else {
      outside = std::min(outside, energy);
    }
  }
  m.energy = std::isfinite(inside) ? inside : phys.energy;
  m.first_excited_energy = std::isfinite(outside) ? outside : m.energy;
  return m;
}

}  // namespace gapwise
