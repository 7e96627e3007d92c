#include "dynamics/quantum_state.hpp"

#include <cmath>
#include <numeric>

namespace gapwise {

QuantumState uniform_superposition(int qubits) {
  const std::size_t dim = std::size_t{1} << qubits;
  return QuantumState(dim, Complex(std::pow(2.0, -0.5 * qubits), 0.0));
}

QuantumState basis_state(int qubits, BasisIndex b) {
  QuantumState psi(std::size_t{1} << qubits, Complex(0.0, 0.0));
  psi[b] = 1.0;
  return psi;
}

double norm_squared(const QuantumState& psi) {
  double s = 0.0;
  for (const auto& c : psi) s += std::norm(c);
  return s;
}

std::vector<double> probabilities(const QuantumState& psi) {
  std::vector<double> p(psi.size());
  for (std::size_t b = 0; b < psi.size(); ++b) p[b] = std::norm(psi[b]);
  return p;
}

}  // namespace gapwise
