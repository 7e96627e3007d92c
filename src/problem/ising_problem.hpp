#pragma once
// The classical problem: an Ising model over n qubits, and the QUBO form with
// its exact conversion.
//
// Conventions (docs/method notes): bit i of a basis index b is z_i; the spin is
// s_i = 1 - 2 z_i; E(s) = sum_i h_i s_i + sum_{i<j} J_ij s_i s_j + offset.
// A QUBO E(x) = sum_{i<=j} Q_ij x_i x_j + offset maps with x_i = z_i exactly.
//
//   IsingProblem p(3);
//   p.h = {0.1, 0.0, -0.2};
//   p.couplings = {{0, 1, -1.0}, {1, 2, 1.0}};
//   double e = p.energy(0b101);   // qubits 0 and 2 in bit 1 (spin -1)
#include <cstdint>
#include <string>
#include <vector>

namespace gapwise {

using BasisIndex = std::uint64_t;

/// Largest |h|, |J|, |Q| or |offset| a problem may hold. Energies enter H as
/// (B/2) E in GHz; a coefficient of 1e9 at B = 1 GHz already needs time steps of
/// 1e-10 ns, and sums of larger values can overflow to infinity. Only the ratio
/// of the coefficients to each other matters once B(s) sets the scale, so
/// rescaling loses nothing.
inline constexpr double kMaxProblemCoefficient = 1e9;

struct Coupling {
  int i = 0;  ///< always i < j after validation
  int j = 0;
  double value = 0.0;
};

struct IsingProblem {
  int qubits = 0;
  std::vector<double> h;             ///< size qubits
  std::vector<Coupling> couplings;   ///< unique pairs, i < j
  double offset = 0.0;
  std::vector<std::string> labels;   ///< optional, size qubits when given
  std::string description;

  IsingProblem() = default;
  explicit IsingProblem(int n) : qubits(n), h(static_cast<std::size_t>(n), 0.0) {}

  /// Problem energy of basis state b, offset included.
  double energy(BasisIndex b) const;
  /// True when any field is non-zero (the global spin flip is then not a symmetry).
  bool has_fields() const;
  /// Largest |h_i| or |J_ij| (the problem's energy scale; 0 for an empty problem).
  double largest_term() const;
  /// Label of qubit i ("q<i>" when none was given).
  std::string label(int i) const;
};

struct QuboTerm {
  int i = 0;  ///< i <= j; i == j is a linear term
  int j = 0;
  double value = 0.0;
};

struct QuboProblem {
  int variables = 0;
  std::vector<QuboTerm> terms;
  double offset = 0.0;

  /// E(x) with x_i = bit i of b.
  double energy(BasisIndex b) const;
};

/// Exact: qubo.energy(b) == ising.energy(b) for every b.
IsingProblem qubo_to_ising(const QuboProblem& qubo);
QuboProblem ising_to_qubo(const IsingProblem& ising);

/// Spin of qubit i in basis state b: +1 for bit 0, -1 for bit 1.
inline int spin_of(BasisIndex b, int i) { return 1 - 2 * static_cast<int>((b >> i) & 1U); }

/// Bits in qubit order, qubit 0 first: "0110".
std::string bits_string(BasisIndex b, int qubits);
/// Spins in qubit order, qubit 0 first: "+--+".
std::string spins_string(BasisIndex b, int qubits);

}  // namespace gapwise
