#pragma once
// H(s) restricted to a sector of the global spin flip P = prod_i sigma^x_i.
//
// When every field h_i is zero, P commutes with H(s) and the forward anneal
// starts in the P = +1 (even) sector, so its spectrum there is what matters.
// A sector state is (|b> + p |~b>)/sqrt(2) with b a representative whose top
// qubit (n-1) is in bit 0 and ~b the complement of b; p = +1 (even) or -1 (odd).
// On these 2^(n-1) representatives
//
//   H_p = H'(n-1 qubits) + p * (-(A/2)) * R,
//
// where H' is the ordinary transverse-field Ising Hamiltonian of the reduced
// problem (qubit n-1 fixed to spin +1: its couplings J_{i,n-1} become fields on
// qubit i) and R maps representative b to b ^ (2^(n-1) - 1) (sigma^x on qubit n-1,
// seen through the complement). H' is applied by the one shared kernel
// (TransverseIsingHamiltonian::apply); only the R term is added here.
//
//   TransverseIsingHamiltonian H(problem);               // problem without fields
//   SectorHamiltonian even(H, SpinFlipSector::Even);     // dim() == H.dim() / 2
//   even.apply(a_ghz, b_ghz, x.data(), y.data());        // y = H_even x
//   SectorOperatorAtS op(even, a_ghz, b_ghz);            // Spectra operator concept
//   std::vector<double> full = even.to_full(x);          // back to the 2^n basis
//
// SpinFlipSector::Full wraps H itself (no copy), so one code path serves both.
#include <cstddef>
#include <memory>
#include <string>
#include <vector>

#include "hamiltonian/transverse_ising.hpp"

namespace gapwise {

enum class SpinFlipSector { Full, Even, Odd };

/// "full space", "even spin-flip sector (P = +1)", "odd spin-flip sector (P = -1)".
std::string describe_sector(SpinFlipSector sector);
/// "full", "even", "odd".
std::string sector_name(SpinFlipSector sector);

class SectorHamiltonian {
 public:
  /// `full` must outlive this object. Even/Odd require a problem without fields
  /// and at least one qubit (throws InputError otherwise, naming the fix).
  SectorHamiltonian(const TransverseIsingHamiltonian& full, SpinFlipSector sector);

  SpinFlipSector sector() const { return sector_; }
  const TransverseIsingHamiltonian& full() const { return *full_; }
  int qubits() const { return full_->qubits(); }
  std::size_t dim() const { return dim_; }
  /// Problem energy (minus offset) of each sector basis state (ascending index).
  const std::vector<double>& diagonal() const { return reduced_ ? reduced_->diagonal() : full_->diagonal(); }
  /// The computational basis state a sector index stands for (its representative b;
  /// in a sector the state is the pair b, ~b).
  BasisIndex representative(std::size_t index) const { return static_cast<BasisIndex>(index); }
  /// The partner ~b of a representative (same as the representative in the full space).
  BasisIndex partner(std::size_t index) const;

  /// y = H x in this sector, H = -(a/2) sum sigma^x + (b/2) D. Also gives
  /// dH/ds when called with (dA/ds, dB/ds). x and y must not alias.
  void apply(double a_ghz, double b_ghz, const double* x, double* y) const;

  /// A sector vector written in the 2^n computational basis (norm preserved).
  std::vector<double> to_full(const double* x) const;
  std::vector<double> to_full(const std::vector<double>& x) const { return to_full(x.data()); }

 private:
  const TransverseIsingHamiltonian* full_;
  SpinFlipSector sector_;
  std::size_t dim_;
  std::shared_ptr<const TransverseIsingHamiltonian> reduced_;  ///< n-1 qubits, for Even/Odd
};

/// The problem with qubit n-1 fixed to spin +1 (bit 0): its couplings to the other
/// qubits become fields. E_reduced(b) == E(b) for every b < 2^(n-1).
IsingProblem fix_last_qubit_up(const IsingProblem& problem);

/// H(s) at fixed (A, B) in a sector, as a real symmetric operator in Spectra's concept.
class SectorOperatorAtS {
 public:
  using Scalar = double;
  SectorOperatorAtS(const SectorHamiltonian& h, double a_ghz, double b_ghz) : h_(&h), a_(a_ghz), b_(b_ghz) {}
  long rows() const { return static_cast<long>(h_->dim()); }
  long cols() const { return static_cast<long>(h_->dim()); }
  void perform_op(const double* x_in, double* y_out) const { h_->apply(a_, b_, x_in, y_out); }

 private:
  const SectorHamiltonian* h_;
  double a_, b_;
};

}  // namespace gapwise
