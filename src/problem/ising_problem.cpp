#include "problem/ising_problem.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <utility>

namespace gapwise {

double IsingProblem::energy(BasisIndex b) const {
  double e = offset;
  for (int i = 0; i < qubits; ++i) e += h[static_cast<std::size_t>(i)] * spin_of(b, i);
  for (const auto& c : couplings) e += c.value * spin_of(b, c.i) * spin_of(b, c.j);
  return e;
}

bool IsingProblem::has_fields() const {
  return std::any_of(h.begin(), h.end(), [](double x) { return x != 0.0; });
}

double IsingProblem::largest_term() const {
  double m = 0.0;
  for (double x : h) m = std::max(m, std::abs(x));
  for (const auto& c : couplings) m = std::max(m, std::abs(c.value));
  return m;
}

std::string IsingProblem::label(int i) const {
  if (static_cast<std::size_t>(i) < labels.size() && !labels[static_cast<std::size_t>(i)].empty())
    return labels[static_cast<std::size_t>(i)];
  return "q" + std::to_string(i);
}

double QuboProblem::energy(BasisIndex b) const {
  double e = offset;
  for (const auto& t : terms) {
    const auto xi = (b >> t.i) & 1U, xj = (b >> t.j) & 1U;
    e += t.value * static_cast<double>(xi * xj);
  }
  return e;
}

IsingProblem qubo_to_ising(const QuboProblem& qubo) {
  IsingProblem p(qubo.variables);
  p.offset = qubo.offset;
  std::map<std::pair<int, int>, double> j;
  for (const auto& t : qubo.terms) {
    if (t.i == t.j) {  // Q x = Q (1 - s)/2
      p.offset += t.value / 2.0;
      p.h[static_cast<std::size_t>(t.i)] -= t.value / 2.0;
    } else {  // Q x_i x_j = Q (1 - s_i - s_j + s_i s_j)/4
      const int a = std::min(t.i, t.j), b = std::max(t.i, t.j);
      p.offset += t.value / 4.0;
      p.h[static_cast<std::size_t>(a)] -= t.value / 4.0;
      p.h[static_cast<std::size_t>(b)] -= t.value / 4.0;
      j[{a, b}] += t.value / 4.0;
    }
  }
  for (const auto& [key, v] : j) p.couplings.push_back({key.first, key.second, v});
  return p;
}

QuboProblem ising_to_qubo(const IsingProblem& ising) {
  QuboProblem q;
  q.variables = ising.qubits;
  q.offset = ising.offset;
  std::vector<double> diag(static_cast<std::size_t>(ising.qubits), 0.0);
  for (int i = 0; i < ising.qubits; ++i) {  // h s = h - 2 h x
    q.offset += ising.h[static_cast<std::size_t>(i)];
    diag[static_cast<std::size_t>(i)] -= 2.0 * ising.h[static_cast<std::size_t>(i)];
  }
  for (const auto& c : ising.couplings) {  // J s s = J (1 - 2x_i - 2x_j + 4 x_i x_j)
    q.offset += c.value;
    diag[static_cast<std::size_t>(c.i)] -= 2.0 * c.value;
    diag[static_cast<std::size_t>(c.j)] -= 2.0 * c.value;
    q.terms.push_back({c.i, c.j, 4.0 * c.value});
  }
  for (int i = 0; i < ising.qubits; ++i)
    if (diag[static_cast<std::size_t>(i)] != 0.0) q.terms.push_back({i, i, diag[static_cast<std::size_t>(i)]});
  return q;
}

std::string bits_string(BasisIndex b, int qubits) {
  std::string s(static_cast<std::size_t>(qubits), '0');
  for (int i = 0; i < qubits; ++i) s[static_cast<std::size_t>(i)] = ((b >> i) & 1U) ? '1' : '0';
  return s;
}

std::string spins_string(BasisIndex b, int qubits) {
  std::string s(static_cast<std::size_t>(qubits), '+');
  for (int i = 0; i < qubits; ++i) s[static_cast<std::size_t>(i)] = ((b >> i) & 1U) ? '-' : '+';
  return s;
}

}  // namespace gapwise
