#include "io/embedding_file.hpp"

#include <algorithm>
#include <utility>

#include <fmt/format.h>

#include "hamiltonian/memory_budget.hpp"
#include "io/toml_reader.hpp"

namespace gapwise {
namespace {

constexpr const char* kFormat = "gapwise-embedding";

// A physical qubit index as written: a non-negative integer below kMaxQubits
// (larger ones could never be simulated; the range check against the qubit
// count comes in validate_embedding).
int physical_index(const TomlReader& r, const toml::node& node, const std::string& key) {
  const long long q = r.integer(node, key);
  if (q < 0)
    r.fail(&node, key, fmt::format("physical qubit index {} is negative", q), "number physical qubits from 0");
  if (q >= kMaxQubits)
    r.fail(&node, key,
           fmt::format("physical qubit index {} is beyond what gapwise can simulate ({} qubits at most)", q, kMaxQubits),
           "renumber the physical qubits 0, 1, 2, ... (only the qubits in chains are simulated)");
  return static_cast<int>(q);
}

const toml::array& require_array(const TomlReader& r, const toml::node& node, const std::string& key,
                                 const char* form) {
  const toml::array* a = node.as_array();
  if (!a) r.fail(&node, key, fmt::format("expected {}", form), fmt::format("write it as {}", form));
  return *a;
}

void read_chains(const TomlReader& r, const toml::table& t, Embedding& e) {
  const toml::array* chains = r.get_array(t, "chains", "");
  if (!chains)
    r.fail(&t, "chains", "required key is missing",
           "add `chains = [[q, ...], ...]`: one list of physical qubits per logical qubit, in the problem's order");
  e.chains_place = r.place(chains, "chains");
  if (chains->empty())
    r.fail(chains, "chains", "the chain list is empty", "give one chain of physical qubits per logical qubit");
  for (std::size_t v = 0; v < chains->size(); ++v) {
    const std::string key = fmt::format("chains[{}]", v);
    const toml::node& node = *chains->get(v);
    const toml::array& chain = require_array(r, node, key, "a list of physical qubit indices such as [0, 1]");
    std::vector<int> qubits;
    for (std::size_t k = 0; k < chain.size(); ++k)
      qubits.push_back(physical_index(r, *chain.get(k), fmt::format("{}[{}]", key, k)));
    e.chains.push_back(std::move(qubits));
    e.chain_places.push_back(r.place(&node, key));
  }
}

void read_couplers(const TomlReader& r, const toml::table& t, Embedding& e) {
  const toml::array* couplers = r.get_array(t, "couplers", "");
  if (!couplers) return;
  e.couplers_given = true;
  e.couplers_place = r.place(couplers, "couplers");
  for (std::size_t k = 0; k < couplers->size(); ++k) {
    const std::string key = fmt::format("couplers[{}]", k);
    const toml::node& node = *couplers->get(k);
    const toml::array& pair = require_array(r, node, key, "a pair of physical qubits such as [0, 1]");
    if (pair.size() != 2) r.fail(&node, key, "each coupler must be a pair [a, b]", "write it as [a, b]");
    const int a = physical_index(r, *pair.get(0), key), b = physical_index(r, *pair.get(1), key);
    e.couplers.push_back({std::min(a, b), std::max(a, b)});
    e.coupler_places.push_back(r.place(&node, key));
  }
}

void read_chain_strength(const TomlReader& r, const toml::table& t, Embedding& e) {
  const auto absolute = r.get_double(t, "chain_strength", "");
  const auto relative = r.get_double(t, "chain_strength_relative", "");
  if (absolute && relative)
    r.fail(t.get("chain_strength_relative"), "chain_strength_relative",
           "both chain_strength and chain_strength_relative are given",
           "keep one: chain_strength (absolute, problem units) or chain_strength_relative (multiple of the largest "
           "logical |h| or |J|)");
  const char* key = absolute ? "chain_strength" : "chain_strength_relative";
  if (!absolute && !relative) return;
  const double value = absolute ? *absolute : *relative;
  if (!(value > 0.0))
    r.fail(t.get(key), key, fmt::format("chain strength {} is not positive", value),
           "give the magnitude of the ferromagnetic chain coupling, > 0 (its sign is always ferromagnetic)");
  if (value > kMaxProblemCoefficient)
    r.fail(t.get(key), key, fmt::format("chain strength {:g} is larger than {:g}, the largest term gapwise accepts", value,
                                        kMaxProblemCoefficient),
           "a chain strength of a few times the largest logical term is usual, e.g. chain_strength_relative = 2");
  e.chain_strength = absolute ? ChainStrength::absolute(value) : ChainStrength::relative_to_largest(value);
}

}  // namespace

Embedding parse_embedding_text(std::string_view text, const std::string& name) {
  const TomlReader r = TomlReader::from_string(text, name);
  const toml::table& t = r.root();
  r.allow_keys(t, "", {"format", "format_version", "description", "physical_qubits", "chains", "couplers",
                       "chain_strength", "chain_strength_relative", "term_limit"});
  r.check_format(t, kFormat, "embedding", /*required=*/true);

  Embedding e;
  e.source = name;
  e.description = r.get_string(t, "description", "").value_or("");
  read_chains(r, t, e);
  read_couplers(r, t, e);
  read_chain_strength(r, t, e);
  if (auto limit = r.get_double(t, "term_limit", "")) {
    if (!(*limit > 0.0))
      r.fail(t.get("term_limit"), "term_limit", fmt::format("term limit {} is not positive", *limit),
             "give the largest |h| or |J| the device accepts (> 0), or remove the key");
    e.term_limit = *limit;
  }
  int highest = -1;
  for (const auto& chain : e.chains)
    for (int q : chain) highest = std::max(highest, q);
  e.physical_qubits = highest + 1;
  if (const toml::node* n = t.get("physical_qubits")) {
    const long long count = r.integer(*n, "physical_qubits");
    if (count != e.physical_qubits)
      r.fail(n, "physical_qubits",
             fmt::format("physical_qubits = {} but the chains use qubits 0..{} ({} qubits)", count, highest,
                         e.physical_qubits),
             "make physical_qubits the number of physical qubits in the chains, or remove the key (it is only a "
             "check)");
  }
  try {
    check_memory(e.physical_qubits, 1, 0, name);
  } catch (const InputError& err) {
    r.fail(t.get("chains"), "chains", err.problem(), err.fix());
  }
  validate_embedding(e);
  return e;
}

Embedding read_embedding_file(const std::string& path) { return parse_embedding_text(read_text_file(path), path); }

}  // namespace gapwise
