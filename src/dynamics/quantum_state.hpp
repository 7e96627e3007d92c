#pragma once
// State vectors over the 2^n computational basis states (index b, bit i = qubit i).
#include <complex>
#include <vector>

#include "problem/ising_problem.hpp"

namespace gapwise {

using Complex = std::complex<double>;
using QuantumState = std::vector<Complex>;

/// |+>^n: every amplitude 2^(-n/2), the ground state of the transverse term.
QuantumState uniform_superposition(int qubits);
/// |b>
QuantumState basis_state(int qubits, BasisIndex b);
/// <psi|psi>
double norm_squared(const QuantumState& psi);
/// Probabilities |psi_b|^2.
std::vector<double> probabilities(const QuantumState& psi);

}  // namespace gapwise
