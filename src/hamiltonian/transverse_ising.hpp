#pragma once
// The transverse-field Ising Hamiltonian, matrix-free:
//
//   H(s) = -(A(s)/2) sum_i sigma^x_i + (B(s)/2) D,   D = diag(E(b) - offset)
//
// in GHz. The problem diagonal D is computed once; sigma^x_i flips bit i, so the
// transverse term is a sum over qubits of paired updates at stride 2^i. This is
// the single kernel every solver uses: the propagators call apply(), the
// eigensolvers wrap it in HamiltonianAtS (Spectra's operator concept).
//
//   TransverseIsingHamiltonian H(problem);
//   H.apply(a_ghz, b_ghz, x.data(), y.data());           // y = H x
//   HamiltonianAtS op(H, scales.a_ghz(s), scales.b_ghz(s));   // for Spectra
#include <complex>
#include <cstddef>
#include <vector>

#include "problem/ising_problem.hpp"

namespace gapwise {

class TransverseIsingHamiltonian {
 public:
  explicit TransverseIsingHamiltonian(const IsingProblem& problem);

  int qubits() const { return n_; }
  std::size_t dim() const { return dim_; }
  const IsingProblem& problem() const { return problem_; }
  /// E(b) - offset for each basis state (dimensionless problem energies).
  const std::vector<double>& diagonal() const { return diag_; }

  /// y = c_x * sum_i sigma^x_i x + c_d * D x, for any scalar type (real or complex
  /// coefficients and states). x and y must not alias.
  template <class T, class C>
  void apply_terms(C c_x, C c_d, const T* x, T* y) const;

  /// y = H x with H = -(a/2) sum sigma^x + (b/2) D, a and b in GHz.
  template <class T>
  void apply(double a_ghz, double b_ghz, const T* x, T* y) const {
    apply_terms<T, double>(-0.5 * a_ghz, 0.5 * b_ghz, x, y);
  }

 private:
  IsingProblem problem_;
  int n_;
  std::size_t dim_;
  std::vector<double> diag_;
};

template <class T, class C>
void TransverseIsingHamiltonian::apply_terms(C c_x, C c_d, const T* x, T* y) const {
  const std::size_t dim = dim_;
  const double* d = diag_.data();
  auto diagonal_row = [&](std::size_t k) { y[k] = (c_d * d[k]) * x[k]; };
  // Blocks of 2*stride: the lower half pairs with the upper half.
  auto flip_block = [&](std::size_t base, std::size_t stride) {
    T* lo = y + base;
    T* hi = y + base + stride;
    const T* xl = x + base;
    const T* xh = x + base + stride;
    for (std::size_t k = 0; k < stride; ++k) {
      lo[k] += c_x * xh[k];
      hi[k] += c_x * xl[k];
    }
  };
  if (dim >= (std::size_t{1} << 16)) {
#pragma omp parallel
    {
#pragma omp for schedule(static)
      for (std::size_t k = 0; k < dim; ++k) diagonal_row(k);
      for (int q = 0; q < n_; ++q) {
        const std::size_t stride = std::size_t{1} << q;
#pragma omp for schedule(static)
        for (std::size_t base = 0; base < dim; base += 2 * stride) flip_block(base, stride);
      }
    }
  } else {
    // Small vectors: plain loops, no OpenMP construct at all. A team of one
    // (`parallel if (false)`) ends every worksharing loop with a barrier that
    // costs a futex system call (measured: half the time of an 8-qubit
    // open-system anneal, whose Lanczos solves apply H ~10^5 times). Orphaned
    // `omp for` loops are no way out: called from inside another parallel
    // region (a control-error ensemble, threaded studies) they would bind to
    // that region's team and split one thread's product among all threads.
    for (std::size_t k = 0; k < dim; ++k) diagonal_row(k);
    for (int q = 0; q < n_; ++q) {
      const std::size_t stride = std::size_t{1} << q;
      for (std::size_t base = 0; base < dim; base += 2 * stride) flip_block(base, stride);
    }
  }
}

/// H(s) at fixed (A, B) as a real symmetric operator in Spectra's concept
/// (Scalar, rows(), cols(), perform_op). H is real in the computational basis.
class HamiltonianAtS {
 public:
  using Scalar = double;
  HamiltonianAtS(const TransverseIsingHamiltonian& h, double a_ghz, double b_ghz)
      : h_(&h), a_(a_ghz), b_(b_ghz) {}
  long rows() const { return static_cast<long>(h_->dim()); }
  long cols() const { return static_cast<long>(h_->dim()); }
  void perform_op(const double* x_in, double* y_out) const { h_->apply(a_, b_, x_in, y_out); }
  double a_ghz() const { return a_; }
  double b_ghz() const { return b_; }
 private:
  const TransverseIsingHamiltonian* h_;
  double a_, b_;
};

}  // namespace gapwise
