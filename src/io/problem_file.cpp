#include "io/problem_file.hpp"

#include <cmath>
#include <fstream>
#include <iterator>
#include <set>
#include <utility>

#include <fmt/format.h>

#include "hamiltonian/memory_budget.hpp"
#include "io/toml_reader.hpp"

namespace gapwise {
namespace {

constexpr const char* kFormat = "gapwise-problem";

int qubit_index(const TomlReader& r, const toml::node& node, const std::string& key, int n) {
  const long long i = r.integer(node, key);
  if (i < 0 || i >= n)
    r.fail(&node, key, fmt::format("qubit index {} is out of range (qubits = {})", i, n),
           fmt::format("use an index from 0 to {}", n - 1));
  return static_cast<int>(i);
}

// A problem coefficient: finite and at most kMaxProblemCoefficient in size.
double coefficient(const TomlReader& r, const toml::node& node, const std::string& key) {
  const double v = r.number(node, key);
  if (std::abs(v) > kMaxProblemCoefficient)
    r.fail(&node, key, fmt::format("the value {} is larger in size than {:g}", v, kMaxProblemCoefficient),
           "rescale the problem: only the ratios of h, J and Q matter once the schedule's B(s) sets the energy");
  return v;
}

const toml::array& entry_array(const TomlReader& r, const toml::node& node, const std::string& key,
                               std::size_t len, const char* form) {
  const toml::array* a = node.as_array();
  if (!a || a->size() != len)
    r.fail(&node, key, fmt::format("each entry must be {}", form), fmt::format("write it as {}", form));
  return *a;
}

void read_fields(const TomlReader& r, const toml::array& arr, IsingProblem& p) {
  const bool pairs = !arr.empty() && arr.get(0)->is_array();
  if (!pairs) {
    if (static_cast<int>(arr.size()) != p.qubits)
      r.fail(&arr, "fields", fmt::format("a dense field list needs {} numbers (one per qubit), found {}",
                                         p.qubits, arr.size()),
             "give one h per qubit, or pairs [[i, h_i], ...]");
    for (std::size_t k = 0; k < arr.size(); ++k) p.h[k] = coefficient(r, *arr.get(k), fmt::format("fields[{}]", k));
    return;
  }
  std::set<int> seen;
  for (std::size_t k = 0; k < arr.size(); ++k) {
    const std::string key = fmt::format("fields[{}]", k);
    const auto& e = entry_array(r, *arr.get(k), key, 2, "[qubit, h]");
    const int i = qubit_index(r, *e.get(0), key, p.qubits);
    if (!seen.insert(i).second)
      r.fail(arr.get(k), key, fmt::format("field on qubit {} is given twice", i), "keep one entry per qubit");
    p.h[static_cast<std::size_t>(i)] = coefficient(r, *e.get(1), key);
  }
}

// Reads [[i, j, value], ...]; `allow_diagonal` for QUBO terms.
template <class Push>
void read_pair_list(const TomlReader& r, const toml::array& arr, const char* name, int n, bool allow_diagonal,
                    Push push) {
  std::set<std::pair<int, int>> seen;
  for (std::size_t k = 0; k < arr.size(); ++k) {
    const std::string key = fmt::format("{}[{}]", name, k);
    const auto& e = entry_array(r, *arr.get(k), key, 3, "[i, j, value]");
    int i = qubit_index(r, *e.get(0), key, n), j = qubit_index(r, *e.get(1), key, n);
    if (i == j && !allow_diagonal)
      r.fail(arr.get(k), key, fmt::format("self-coupling {}-{} is not allowed", i, j),
             "a coupling joins two different qubits; put a single-qubit term in `fields`");
    if (i > j) std::swap(i, j);
    if (!seen.insert({i, j}).second)
      r.fail(arr.get(k), key, fmt::format("duplicate entry for the pair ({}, {})", i, j),
             "give each pair once (i,j and j,i are the same pair); add the values if you meant their sum");
    push(i, j, coefficient(r, *e.get(2), key));
  }
}

}  // namespace

ProblemFile parse_problem_text(std::string_view text, const std::string& name) {
  const TomlReader r = TomlReader::from_string(text, name);
  const toml::table& t = r.root();
  r.allow_keys(t, "", {"format", "format_version", "kind", "qubits", "description", "labels", "offset",
                       "fields", "couplings", "terms"});
  r.check_format(t, kFormat, "problem", /*required=*/false);

  ProblemFile out;
  out.kind = r.get_string(t, "kind", "").value_or("ising");
  if (out.kind != "ising" && out.kind != "qubo")
    r.fail(t.get("kind"), "kind", fmt::format("unknown kind \"{}\"", out.kind), "use \"ising\" or \"qubo\"");

  const toml::node* qn = t.get("qubits");
  if (!qn) r.fail(&t, "qubits", "required key is missing", "add `qubits = <number of qubits>`");
  const long long n = r.integer(*qn, "qubits");
  if (n < 1) r.fail(qn, "qubits", fmt::format("qubits must be at least 1, found {}", n), "give a positive count");
  try {
    check_memory(n, 1, 0, name);
  } catch (const InputError& e) {
    r.fail(qn, "qubits", e.problem(), e.fix());
  }
  IsingProblem& p = out.ising;
  p = IsingProblem(static_cast<int>(n));
  out.qubits_place = SourcePlace{name, static_cast<int>(qn->source().begin.line),
                                 static_cast<int>(qn->source().begin.column), "qubits"};
  p.description = r.get_string(t, "description", "").value_or("");
  if (const toml::node* off = t.get("offset")) p.offset = coefficient(r, *off, "offset");

  if (const toml::array* labels = r.get_array(t, "labels", "")) {
    if (static_cast<long long>(labels->size()) != n)
      r.fail(labels, "labels", fmt::format("{} labels for {} qubits", labels->size(), n), "give one label per qubit");
    std::set<std::string> seen;
    for (std::size_t k = 0; k < labels->size(); ++k) {
      auto s = labels->get(k)->value<std::string>();
      const std::string key = fmt::format("labels[{}]", k);
      if (!s) r.fail(labels->get(k), key, "a label must be a string", "quote it");
      if (!seen.insert(*s).second) r.fail(labels->get(k), key, fmt::format("label \"{}\" repeats", *s), "use distinct labels");
      p.labels.push_back(*s);
    }
  }

  if (out.kind == "ising") {
    if (t.get("terms"))
      r.fail(t.get("terms"), "terms", "`terms` belongs to QUBO files", "use `fields` and `couplings`, or set kind = \"qubo\"");
    if (const toml::array* f = r.get_array(t, "fields", "")) read_fields(r, *f, p);
    if (const toml::array* c = r.get_array(t, "couplings", ""))
      read_pair_list(r, *c, "couplings", p.qubits, false,
                     [&](int i, int j, double v) { p.couplings.push_back({i, j, v}); });
  } else {
    for (const char* k : {"fields", "couplings"})
      if (t.get(k)) r.fail(t.get(k), k, fmt::format("`{}` belongs to Ising files", k),
                           "write QUBO entries in `terms` as [i, j, Q_ij] (i == j for linear terms)");
    out.qubo.variables = p.qubits;
    out.qubo.offset = p.offset;
    if (const toml::array* q = r.get_array(t, "terms", ""))
      read_pair_list(r, *q, "terms", p.qubits, true,
                     [&](int i, int j, double v) { out.qubo.terms.push_back({i, j, v}); });
    auto labels = p.labels;
    auto description = p.description;
    p = qubo_to_ising(out.qubo);
    p.labels = labels;
    p.description = description;
  }
  return out;
}

ProblemFile parse_problem_file(const std::string& path) {
  return parse_problem_text(read_text_file(path), path);
}

std::string format_problem_toml(const IsingProblem& p) {
  std::string s = fmt::format("format = \"{}\"\nformat_version = 1\nkind = \"ising\"\nqubits = {}\n", kFormat, p.qubits);
  if (!p.description.empty()) s += "description = " + toml_quoted(p.description) + "\n";
  if (!p.labels.empty()) {
    s += "labels = [";
    for (std::size_t k = 0; k < p.labels.size(); ++k) s += (k ? ", " : "") + toml_quoted(p.labels[k]);
    s += "]\n";
  }
  if (p.offset != 0.0) s += fmt::format("offset = {:.17g}\n", p.offset);
  s += "fields = [";
  for (int i = 0; i < p.qubits; ++i) s += fmt::format("{}{:.17g}", i ? ", " : "", p.h[static_cast<std::size_t>(i)]);
  s += "]\ncouplings = [\n";
  for (const auto& c : p.couplings) s += fmt::format("  [{}, {}, {:.17g}],\n", c.i, c.j, c.value);
  s += "]\n";
  return s;
}

}  // namespace gapwise
