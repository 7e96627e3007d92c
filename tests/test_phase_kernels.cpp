// The phase kernels on real-valued diagonals (fields, Gaussian couplings,
// QUBO-derived energies) against the operators' definition applied naively:
// exp(-i phi D_b) per amplitude with the C++ library's std::exp of a complex
// number, then cos theta + i sin theta sigma^x qubit by qubit. Checking an
// optimised kernel against the plain definition is common practice; the
// sine/cosine without library calls is checked against the C++ library's
// std::sin and std::cos (glibc, correctly rounded to within an ulp or so).
#include <doctest/doctest.h>

#include <cmath>
#include <random>
#include <stdexcept>
#include <string>

#include <Eigen/Dense>
#include <unsupported/Eigen/MatrixFunctions>

#include "dynamics/split_exponentials.hpp"
#include "problem/ising_problem.hpp"

using namespace gapwise;

namespace {

struct MethodGuard {
  explicit MethodGuard(PhaseMethod m) { SplitExponentials::set_phase_method(m); }
  ~MethodGuard() { SplitExponentials::set_phase_method(PhaseMethod::Auto); }
};

// Couplings on about two thirds of the pairs and fields; `kind` 0: Gaussian
// couplings and fields; 1: +-1 couplings with fields +-0.15 (a few hundred
// levels); 2: a QUBO with integer terms converted exactly (few levels, offset).
IsingProblem problem(int n, unsigned seed, int kind) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> g;
  if (kind == 2) {
    QuboProblem q;
    q.variables = n;
    for (int i = 0; i < n; ++i)
      for (int j = i; j < n; ++j)
        if (i == j || rng() % 3 != 0) q.terms.push_back({i, j, static_cast<double>(static_cast<int>(rng() % 7) - 3)});
    q.offset = 0.5;
    return qubo_to_ising(q);
  }
  IsingProblem p(n);
  for (int i = 0; i < n; ++i) p.h[static_cast<std::size_t>(i)] = kind == 0 ? 0.4 * g(rng) : ((rng() & 1) ? 0.15 : -0.15);
  for (int i = 0; i < n; ++i)
    for (int j = i + 1; j < n; ++j)
      if (rng() % 3 != 0) p.couplings.push_back({i, j, kind == 0 ? g(rng) : ((rng() & 1) ? 1.0 : -1.0)});
  return p;
}

QuantumState reference(const QuantumState& psi, const std::vector<double>& d, int n, double phi, double theta,
                       bool rotate) {
  QuantumState ref(psi.size());
  for (std::size_t b = 0; b < ref.size(); ++b) ref[b] = psi[b] * std::exp(Complex(0, -phi * d[b]));
  if (!rotate) return ref;
  for (int q = 0; q < n; ++q) {
    QuantumState next(ref.size());
    for (std::size_t b = 0; b < ref.size(); ++b)
      next[b] = std::cos(theta) * ref[b] + Complex(0, std::sin(theta)) * ref[b ^ (std::size_t{1} << q)];
    ref = next;
  }
  return ref;
}

double worst_difference(const QuantumState& a, const QuantumState& b) {
  double w = 0;
  for (std::size_t k = 0; k < a.size(); ++k) w = std::max(w, std::abs(a[k] - b[k]));
  return w;
}

}  // namespace

TEST_CASE("phase kernels equal the definition on random real diagonals, for every phase method") {
  struct Case { int n; int kind; };
  for (const Case c : {Case{9, 0}, Case{12, 0}, Case{13, 1}, Case{11, 2}, Case{14, 1}}) {
    const IsingProblem p = problem(c.n, 100u + static_cast<unsigned>(c.n), c.kind);
    TransverseIsingHamiltonian H(p);
    std::mt19937_64 rng(7);
    std::normal_distribution<double> g;
    QuantumState psi(H.dim());
    for (auto& z : psi) z = Complex(g(rng), g(rng));
    for (const PhaseMethod m : {PhaseMethod::Auto, PhaseMethod::Table, PhaseMethod::Direct, PhaseMethod::Factored}) {
      MethodGuard guard(m);
      SplitExponentials ex(H);
      CAPTURE(c.n);
      CAPTURE(c.kind);
      CAPTURE(static_cast<int>(m));
      CAPTURE(ex.distinct_levels());
      if (m == PhaseMethod::Direct) CHECK(ex.direct_phases());
      if (m == PhaseMethod::Table) CHECK(!ex.direct_phases());
      if (m == PhaseMethod::Factored) CHECK(ex.factored_phases());
      // Auto factors the many-valued diagonals (Gaussian couplings: one level per state).
      if (m == PhaseMethod::Auto && c.kind == 0) CHECK(ex.factored_phases());
      // phi spans small steps to phases of many turns (|phi D| up to ~100 rad);
      // theta both rotation forms (|cos theta| >= 1/2 and below).
      for (const double phi : {1e-3, 0.913, -2.7, 9.5}) {
        // The factored phases add up to n rounded terms of size up to |phi| max|D|
        // per amplitude (D(l, 0), the block phase, one w_i per set low bit), where
        // the reference rounds the one product phi D_b: allow (n + 2) ulps of
        // that phase, times the largest amplitude (a rounding bound, no fit).
        double max_d = 0, max_psi = 0;
        for (const double v : H.diagonal()) max_d = std::max(max_d, std::abs(v));
        for (const auto& z : psi) max_psi = std::max(max_psi, std::abs(z));
        const double factored_slack =
            ex.factored_phases() ? 2 * (c.n + 2) * 2.2e-16 * std::abs(phi) * max_d * max_psi : 0.0;
        for (const double theta : {0.37, -1.3}) {
          CAPTURE(phi);
          CAPTURE(theta);
          SplitState s = SplitState::from(psi);
          ex.phase_then_rotate(s, phi, theta);
          const QuantumState want = reference(psi, H.diagonal(), c.n, phi, theta, true);
          CHECK(worst_difference(s.to_complex(), want) < 1e-13 + factored_slack);
        }
        SplitState s = SplitState::from(psi);
        ex.phase(s, phi);
        CHECK(worst_difference(s.to_complex(), reference(psi, H.diagonal(), c.n, phi, 0, false)) < 1e-14 + factored_slack);
      }
    }
  }
}

TEST_CASE("phases beyond the vectorized range fall back to the library and stay exact") {
  // |phi D| > 1e5: the direct kernel's reduction by pi/2 would lose digits; the
  // library's sincos takes over (same definition as above).
  const IsingProblem p = problem(8, 5, 0);
  TransverseIsingHamiltonian H(p);
  QuantumState psi(H.dim(), Complex(0.6, -0.8));
  for (const PhaseMethod m : {PhaseMethod::Table, PhaseMethod::Direct, PhaseMethod::Factored}) {
    MethodGuard guard(m);
    SplitExponentials ex(H);
    SplitState s = SplitState::from(psi);
    ex.phase(s, 3.0e5);
    // The reference's own rounding of phi * D (about 1e6 rad, ulp 1e-10) bounds the agreement;
    // the factored phases add n + 2 such rounded terms (see above).
    double max_d = 0;
    for (const double v : H.diagonal()) max_d = std::max(max_d, std::abs(v));
    const double bound = ex.factored_phases() ? 2 * (8 + 2) * 2.2e-16 * 3.0e5 * max_d : 1e-9;
    CHECK(worst_difference(s.to_complex(), reference(psi, H.diagonal(), 8, 3.0e5, 0, false)) < bound);
  }
}

TEST_CASE("the table and the per-state phases give the same bits (the method is a speed choice only)") {
  // Both evaluate the same sine/cosine of the same products phi * D_b (the
  // table per distinct level, looked up by gathers here), so a run's result
  // does not depend on which one Auto picks.
  const IsingProblem p = problem(10, 21, 0);
  TransverseIsingHamiltonian H(p);
  QuantumState psi(H.dim(), Complex(0.3, 0.4));
  SplitState a = SplitState::from(psi), b = SplitState::from(psi);
  {
    MethodGuard guard(PhaseMethod::Table);
    SplitExponentials ex(H);
    REQUIRE(ex.distinct_levels() > 32);  // the gather path
    for (int k = 0; k < 50; ++k) ex.phase_then_rotate(a, 0.05 + 0.01 * k, 0.2);
  }
  {
    MethodGuard guard(PhaseMethod::Direct);
    SplitExponentials ex(H);
    for (int k = 0; k < 50; ++k) ex.phase_then_rotate(b, 0.05 + 0.01 * k, 0.2);
  }
  CHECK(a.distance(b) == 0.0);
}

TEST_CASE("factored phases and fused step equal dense matrix exponentials (Eigen) on up to 8 qubits") {
  // The definition taken literally: exp(-i phi D) and exp(+i theta sum_i
  // sigma^x_i) as dense 2^n x 2^n matrices, exponentiated by Eigen's
  // MatrixExponential (Pade approximant with scaling and squaring; Higham,
  // SIAM J. Matrix Anal. Appl. 26, 1179 (2005)), on random real fields and
  // couplings (Gaussian, +-1 with fields, QUBO-derived).
  using Mat = Eigen::MatrixXcd;
  struct Case { int n; int kind; unsigned seed; };
  for (const Case c : {Case{6, 0, 1}, Case{7, 1, 2}, Case{8, 0, 3}, Case{8, 2, 4}}) {
    const IsingProblem p = problem(c.n, c.seed, c.kind);
    TransverseIsingHamiltonian H(p);
    const auto dim = static_cast<Eigen::Index>(H.dim());
    Mat d = Mat::Zero(dim, dim), x = Mat::Zero(dim, dim);
    for (Eigen::Index b = 0; b < dim; ++b) {
      d(b, b) = H.diagonal()[static_cast<std::size_t>(b)];
      for (int q = 0; q < c.n; ++q) x(b ^ (Eigen::Index{1} << q), b) += 1.0;
    }
    std::mt19937_64 rng(c.seed);
    std::normal_distribution<double> g;
    Eigen::VectorXcd v(dim);
    QuantumState psi(H.dim());
    for (Eigen::Index b = 0; b < dim; ++b) {
      psi[static_cast<std::size_t>(b)] = Complex(g(rng), g(rng));
      v(b) = psi[static_cast<std::size_t>(b)];
    }
    MethodGuard guard(PhaseMethod::Factored);
    SplitExponentials ex(H);
    REQUIRE(ex.factored_phases());
    CAPTURE(c.n);
    CAPTURE(c.kind);
    for (const double phi : {0.004, 0.71, -3.3}) {
      for (const double theta : {0.05, -1.2}) {
        CAPTURE(phi);
        CAPTURE(theta);
        const Mat step = (Complex(0, theta) * x).exp() * (Complex(0, -phi) * d).exp();
        const Eigen::VectorXcd want = step * v;
        SplitState s = SplitState::from(psi);
        ex.phase_then_rotate(s, phi, theta);
        const QuantumState got = s.to_complex();
        double worst = 0;
        for (Eigen::Index b = 0; b < dim; ++b) worst = std::max(worst, std::abs(got[static_cast<std::size_t>(b)] - want(b)));
        CHECK(worst < 1e-11);
      }
      const Eigen::VectorXcd want = (Complex(0, -phi) * d).exp() * v;
      SplitState s = SplitState::from(psi);
      ex.phase(s, phi);
      const QuantumState got = s.to_complex();
      double worst = 0;
      for (Eigen::Index b = 0; b < dim; ++b) worst = std::max(worst, std::abs(got[static_cast<std::size_t>(b)] - want(b)));
      CHECK(worst < 1e-12);
    }
  }
}

TEST_CASE("every kernel variant this CPU runs equals the definition; unknown variants are refused by name") {
  // The AVX2 and AVX-512 builds of the same kernels (chosen at run time) must
  // give the plain definition above, like the baseline build, on every phase
  // method and on Gaussian, +-1-with-fields and QUBO-derived diagonals.
  const std::vector<std::string> variants = SplitExponentials::available_kernel_variants();
  REQUIRE(!variants.empty());
  CHECK(variants.back() == "baseline");
  CHECK(variants.front() == std::string(SplitExponentials::kernel_variant()));  // widest first, chosen by default
  struct Case { int n; int kind; };
  for (const std::string& v : variants) {
    SplitExponentials::set_kernel_variant(v);
    for (const Case c : {Case{11, 0}, Case{12, 1}, Case{10, 2}}) {
      const IsingProblem p = problem(c.n, 300u + static_cast<unsigned>(c.n), c.kind);
      TransverseIsingHamiltonian H(p);
      std::mt19937_64 rng(11);
      std::normal_distribution<double> g;
      QuantumState psi(H.dim());
      for (auto& z : psi) z = Complex(g(rng), g(rng));
      for (const PhaseMethod m : {PhaseMethod::Auto, PhaseMethod::Table, PhaseMethod::Direct, PhaseMethod::Factored}) {
        MethodGuard guard(m);
        SplitExponentials ex(H);
        CHECK(std::string(ex.kernels()) == v);
        CAPTURE(v);
        CAPTURE(c.n);
        CAPTURE(static_cast<int>(m));
        for (const double theta : {0.21, -1.25}) {  // both rotation forms
          SplitState s = SplitState::from(psi);
          ex.phase_then_rotate(s, 0.37, theta);
          CHECK(worst_difference(s.to_complex(), reference(psi, H.diagonal(), c.n, 0.37, theta, true)) < 1e-12);
        }
      }
    }
  }
  SplitExponentials::set_kernel_variant(variants.front());
  try {
    SplitExponentials::set_kernel_variant("avx9");
    FAIL("an unknown kernel variant was accepted");
  } catch (const std::runtime_error& e) {
    const std::string what = e.what();
    CHECK(what.find("avx9") != std::string::npos);
    CHECK(what.find("baseline") != std::string::npos);  // names the choices
  }
  CHECK(std::string(SplitExponentials::kernel_variant()) == variants.front());  // a refused request changes nothing
}
