#include "problem/embedding.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <numeric>
#include <set>

#include <fmt/format.h>
#include <fmt/ranges.h>

namespace gapwise {
namespace {

std::string chain_text(const std::vector<int>& chain) { return fmt::format("[{}]", fmt::join(chain, ", ")); }

std::pair<int, int> ordered(int a, int b) { return a < b ? std::pair{a, b} : std::pair{b, a}; }

}  // namespace

double ChainStrength::resolve(const IsingProblem& logical, const SourcePlace& where) const {
  if (!(value > 0.0) || !std::isfinite(value))
    throw InputError(where, fmt::format("chain strength {} is not a positive number", value),
                     "give a chain strength > 0 (it is the magnitude of a ferromagnetic coupling)");
  const double scale = relative ? logical.largest_term() : 1.0;
  if (!(scale > 0.0))
    throw InputError(where, "a relative chain strength needs a logical problem with at least one non-zero term",
                     "give an absolute chain strength instead");
  // The chain coupling is a term of the physical problem: the same bound as every |h| and |J|.
  if (!(value * scale <= kMaxProblemCoefficient))
    throw InputError(where,
                     fmt::format("chain strength {} ({:g} in problem units) is larger than {:g}, the largest term gapwise "
                                 "accepts",
                                 describe(), value * scale, kMaxProblemCoefficient),
                     "a chain strength of a few times the largest logical term is usual, e.g. 2 (relative)");
  return value * scale;
}

std::string ChainStrength::describe() const {
  return relative ? fmt::format("{:g} x largest logical term", value) : fmt::format("{:g} (absolute)", value);
}

std::vector<int> Embedding::owner_of_qubits() const {
  std::vector<int> owner(static_cast<std::size_t>(std::max(physical_qubits, 0)), -1);
  for (std::size_t v = 0; v < chains.size(); ++v)
    for (int q : chains[v])
      if (q >= 0 && q < physical_qubits) owner[static_cast<std::size_t>(q)] = static_cast<int>(v);
  return owner;
}

bool Embedding::coupler_available(int a, int b) const {
  if (a == b) return false;
  if (!couplers_given) return true;
  return std::find(couplers.begin(), couplers.end(), ordered(a, b)) != couplers.end();
}

std::vector<std::pair<int, int>> Embedding::couplers_within(int v) const {
  return couplers_between(v, v);
}

std::vector<std::pair<int, int>> Embedding::couplers_between(int u, int v) const {
  std::vector<std::pair<int, int>> out;
  const auto& cu = chains[static_cast<std::size_t>(u)];
  const auto& cv = chains[static_cast<std::size_t>(v)];
  if (couplers_given) {
    const std::set<int> su(cu.begin(), cu.end()), sv(cv.begin(), cv.end());
    for (const auto& [a, b] : couplers)
      if ((su.count(a) && sv.count(b)) || (su.count(b) && sv.count(a))) out.push_back({a, b});
    return out;
  }
  for (std::size_t x = 0; x < cu.size(); ++x)
    for (std::size_t y = (u == v ? x + 1 : 0); y < cv.size(); ++y) out.push_back(ordered(cu[x], cv[y]));
  std::sort(out.begin(), out.end());
  return out;
}

SourcePlace Embedding::chain_place(int v) const {
  if (static_cast<std::size_t>(v) < chain_places.size()) return chain_places[static_cast<std::size_t>(v)];
  return {source, 0, 0, fmt::format("chains[{}]", v)};
}

SourcePlace Embedding::coupler_place(std::size_t k) const {
  if (k < coupler_places.size()) return coupler_places[k];
  return {source, couplers_place.line, couplers_place.column, fmt::format("couplers[{}]", k)};
}

void validate_embedding(const Embedding& e) {
  const SourcePlace top = e.chains_place.key.empty() ? SourcePlace{e.source, 0, 0, "chains"} : e.chains_place;
  if (e.chains.empty()) throw InputError(top, "the embedding has no chains", "give one chain per logical variable");
  if (e.physical_qubits < 1)
    throw InputError({e.source, 0, 0, "physical_qubits"}, "the embedding has no physical qubits",
                     "list the physical qubits of each chain");
  std::vector<int> owner(static_cast<std::size_t>(e.physical_qubits), -1);
  for (int v = 0; v < e.logical_qubits(); ++v) {
    const auto& chain = e.chains[static_cast<std::size_t>(v)];
    if (chain.empty())
      throw InputError(e.chain_place(v), fmt::format("chain {} is empty", v),
                       "give every logical variable at least one physical qubit");
    for (int q : chain) {
      if (q < 0 || q >= e.physical_qubits)
        throw InputError(e.chain_place(v),
                         fmt::format("physical qubit {} is out of range (physical_qubits = {})", q, e.physical_qubits),
                         fmt::format("use indices 0 to {}", e.physical_qubits - 1));
      int& o = owner[static_cast<std::size_t>(q)];
      if (o == v)
        throw InputError(e.chain_place(v), fmt::format("physical qubit {} appears twice in chain {}", q, v),
                         "list each qubit of a chain once");
      if (o >= 0)
        throw InputError(e.chain_place(v),
                         fmt::format("physical qubit {} is in chain {} and chain {}: chains must be disjoint", q, o, v),
                         "give each physical qubit to one logical variable only");
      o = v;
    }
  }
  for (int q = 0; q < e.physical_qubits; ++q)
    if (owner[static_cast<std::size_t>(q)] < 0)
      throw InputError(top,
                       fmt::format("physical qubit {} belongs to no chain (an idle qubit would only double the "
                                   "simulated dimension)",
                                   q),
                       fmt::format("number the physical qubits 0..{} so that every one is in a chain, or add qubit {} "
                                   "to a chain",
                                   e.physical_qubits - 1, q));
  if (e.couplers_given) {
    std::set<std::pair<int, int>> seen;
    for (std::size_t k = 0; k < e.couplers.size(); ++k) {
      const auto [a, b] = e.couplers[k];
      if (a < 0 || b < 0 || a >= e.physical_qubits || b >= e.physical_qubits)
        throw InputError(e.coupler_place(k),
                         fmt::format("coupler ({}, {}) names a qubit out of range (physical_qubits = {})", a, b,
                                     e.physical_qubits),
                         fmt::format("use indices 0 to {}", e.physical_qubits - 1));
      if (a == b)
        throw InputError(e.coupler_place(k), fmt::format("coupler ({}, {}) joins a qubit to itself", a, b),
                         "a coupler joins two different qubits");
      if (a > b)
        throw InputError(e.coupler_place(k), fmt::format("coupler ({}, {}) is not stored in order", a, b),
                         "store couplers with first < second (the file reader does this)");
      if (!seen.insert({a, b}).second)
        throw InputError(e.coupler_place(k), fmt::format("coupler ({}, {}) is listed twice", a, b),
                         "list each coupler once ([a, b] and [b, a] are the same coupler)");
    }
  }
  // Connectivity of each chain under its own couplers (union-find).
  std::vector<int> parent(static_cast<std::size_t>(e.physical_qubits));
  std::iota(parent.begin(), parent.end(), 0);
  auto root = [&parent](int q) {
    while (parent[q] != q) q = parent[q] = parent[parent[q]];  // path halving
    return q;
  };
  for (int v = 0; v < e.logical_qubits(); ++v) {
    for (const auto& [a, b] : e.couplers_within(v)) parent[root(a)] = root(b);
    const auto& chain = e.chains[static_cast<std::size_t>(v)];
    std::vector<int> cut;
    for (int q : chain)
      if (root(q) != root(chain.front())) cut.push_back(q);
    if (!cut.empty())
      throw InputError(e.chain_place(v),
                       fmt::format("chain {} {} is not connected under the couplers: qubit(s) {} cannot be reached "
                                   "from qubit {} inside the chain",
                                   v, chain_text(chain), chain_text(cut), chain.front()),
                       "add a coupler joining the parts of the chain to `couplers`, or change the chain");
  }
}

void check_embedding_serves(const Embedding& e, const IsingProblem& logical, const std::string& problem_name) {
  if (e.logical_qubits() != logical.qubits)
    throw InputError(e.chains_place.key.empty() ? SourcePlace{e.source, 0, 0, "chains"} : e.chains_place,
                     fmt::format("the embedding has {} chains but the problem {} has {} logical qubits",
                                 e.logical_qubits(), problem_name, logical.qubits),
                     "give exactly one chain per logical qubit, in the problem's qubit order");
  for (std::size_t k = 0; k < logical.couplings.size(); ++k) {
    const Coupling& c = logical.couplings[k];
    if (c.value == 0.0) continue;
    if (e.couplers_between(c.i, c.j).empty()) {
      SourcePlace where = e.couplers_given ? e.couplers_place : e.chain_place(c.j);
      if (where.key.empty()) where.key = "couplers";
      throw InputError(where,
                       fmt::format("logical coupling {} ({}, {}) of {} has no physical coupler between chain {} {} "
                                   "and chain {} {}",
                                   k, logical.label(c.i), logical.label(c.j), problem_name, c.i,
                                   chain_text(e.chains[static_cast<std::size_t>(c.i)]), c.j,
                                   chain_text(e.chains[static_cast<std::size_t>(c.j)])),
                       "add a coupler joining a qubit of one chain to a qubit of the other to `couplers`, or "
                       "change the chains");
    }
  }
}

EmbeddedProblem embed_problem(const IsingProblem& logical, const Embedding& e, double chain_coupling,
                              std::optional<double> term_limit) {
  EmbeddedProblem out;
  out.chain_coupling = chain_coupling;
  IsingProblem& p = out.physical;
  p = IsingProblem(e.physical_qubits);
  p.offset = logical.offset;
  p.labels.assign(static_cast<std::size_t>(e.physical_qubits), "");
  std::map<std::pair<int, int>, double> j;
  for (int v = 0; v < e.logical_qubits(); ++v) {
    const auto& chain = e.chains[static_cast<std::size_t>(v)];
    const double share = logical.h[static_cast<std::size_t>(v)] / static_cast<double>(chain.size());
    for (std::size_t k = 0; k < chain.size(); ++k) {
      p.h[static_cast<std::size_t>(chain[k])] += share;
      p.labels[static_cast<std::size_t>(chain[k])] = fmt::format("{}.{}", logical.label(v), k);
    }
    for (const auto& pair : e.couplers_within(v)) {
      j[pair] -= chain_coupling;
      p.offset += chain_coupling;  // unbroken chain: energy exactly the logical one
      ++out.intra_chain_couplers;
    }
  }
  for (const Coupling& c : logical.couplings) {
    if (c.value == 0.0) continue;
    const auto pairs = e.couplers_between(c.i, c.j);
    for (const auto& pair : pairs) j[pair] += c.value / static_cast<double>(pairs.size());
    out.inter_chain_couplers += static_cast<int>(pairs.size());
  }
  for (const auto& [pair, value] : j) p.couplings.push_back({pair.first, pair.second, value});
  p.description = fmt::format("embedded on {} physical qubits, chain coupling {:g}{}", e.physical_qubits,
                              chain_coupling, logical.description.empty() ? "" : ": " + logical.description);
  p = limit_terms(p, term_limit, &out.scale);
  return out;
}

EmbeddedProblem embed_problem(const IsingProblem& logical, const Embedding& e, const ChainStrength& strength,
                              std::optional<double> term_limit) {
  return embed_problem(logical, e, strength.resolve(logical, {e.source, 0, 0, "chain_strength"}), term_limit);
}

IsingProblem limit_terms(const IsingProblem& p, std::optional<double> term_limit, double* scale_out) {
  double scale = 1.0;
  if (term_limit) {
    if (!(*term_limit > 0.0) || !std::isfinite(*term_limit))
      throw InputError({"--term-limit", 0, 0, "--term-limit"}, fmt::format("term limit {} is not positive", *term_limit),
                       "give the largest |h| or |J| the device accepts, > 0");
    const double largest = p.largest_term();
    if (largest > *term_limit) scale = *term_limit / largest;
  }
  if (scale_out) *scale_out = scale;
  if (scale == 1.0) return p;
  IsingProblem q = p;
  for (double& x : q.h) x *= scale;
  for (auto& c : q.couplings) c.value *= scale;
  q.offset *= scale;
  return q;
}

double chain_coupling_bound(const IsingProblem& logical) {
  std::vector<double> weight(static_cast<std::size_t>(logical.qubits), 0.0);
  for (int v = 0; v < logical.qubits; ++v) weight[static_cast<std::size_t>(v)] = std::abs(logical.h[static_cast<std::size_t>(v)]);
  for (const auto& c : logical.couplings) {
    weight[static_cast<std::size_t>(c.i)] += std::abs(c.value);
    weight[static_cast<std::size_t>(c.j)] += std::abs(c.value);
  }
  return weight.empty() ? 0.0 : *std::max_element(weight.begin(), weight.end());
}

}  // namespace gapwise
