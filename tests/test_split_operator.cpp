// The split-operator propagators against independent references: the exact
// matrix exponential of Eigen's MatrixFunctions module (a general-purpose
// library), Boost.Odeint's Dormand-Prince stepper at a tight tolerance, the
// factorisation of non-interacting qubits, and the order of convergence the
// compositions promise (Strang: 2; Yoshida, Phys. Lett. A 150, 262 (1990) and
// Suzuki, Phys. Lett. A 146, 319 (1990): 4; references from memory).
#include <doctest/doctest.h>

#include <cmath>
#include <numbers>
#include <random>

#include <Eigen/Dense>
#include <unsupported/Eigen/MatrixFunctions>

#include "dynamics/anneal_simulation.hpp"
#include "dynamics/split_operator_propagator.hpp"

using namespace gapwise;

namespace {

IsingProblem random_problem(int n, unsigned seed, bool integer) {
  std::mt19937_64 rng(seed);
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  IsingProblem p(n);
  for (int i = 0; i < n; ++i) p.h[static_cast<std::size_t>(i)] = integer ? 0.0 : 0.3 * u(rng);
  for (int i = 0; i < n; ++i)
    for (int j = i + 1; j < n; ++j)
      if (rng() % 3 != 0) p.couplings.push_back({i, j, integer ? ((rng() & 1) ? 1.0 : -1.0) : u(rng)});
  return p;
}

// Total variation distance of two outcome distributions.
double tv(const QuantumState& a, const QuantumState& b) {
  double s = 0;
  for (std::size_t k = 0; k < a.size(); ++k) s += std::abs(std::norm(a[k]) - std::norm(b[k]));
  return 0.5 * s;
}

struct Run {
  double p;
  QuantumState psi;
  PropagationStats stats;
};

// `others`: PropagatorOptions::others_factor (the ground-state probability is
// held to tol, every other outcome set to others x tol).
Run anneal(const IsingProblem& prob, const AnnealPath& path, const std::string& prop, double tol,
           const QuantumState* start = nullptr, double others = 100.0) {
  TransverseIsingHamiltonian H(prob);
  GroundManifold gm = find_ground_manifold(prob, H.diagonal());
  static const EnergyScales scales = EnergyScales::linear(5.0, 5.0);
  SimulationOptions o;
  o.propagator = prop;
  o.propagation.tolerance = tol;
  o.propagation.others_factor = others;
  QuantumState psi0 = start ? *start : uniform_superposition(prob.qubits);
  AnnealResult r = simulate_anneal(H, gm, scales, path, psi0, o);
  return {r.ground_probability, r.final_state, r.stats};
}

}  // namespace

TEST_CASE("transverse rotation equals the matrix exponential of sum sigma^x (Eigen MatrixFunctions)") {
  const int n = 3;
  const std::size_t dim = 8;
  IsingProblem p = random_problem(n, 1, false);
  TransverseIsingHamiltonian H(p);
  SplitExponentials ex(H);
  Eigen::MatrixXcd X = Eigen::MatrixXcd::Zero(dim, dim), D = Eigen::MatrixXcd::Zero(dim, dim);
  for (std::size_t b = 0; b < dim; ++b) {
    D(b, b) = H.diagonal()[b];
    for (int q = 0; q < n; ++q) X(b ^ (std::size_t{1} << q), b) = 1.0;
  }
  std::mt19937_64 rng(5);
  std::normal_distribution<double> g;
  QuantumState psi(dim);
  Eigen::VectorXcd v(dim);
  for (std::size_t b = 0; b < dim; ++b) v(b) = psi[b] = Complex(g(rng), g(rng));
  const double theta = 0.7, phi = 1.3;
  SplitState s = SplitState::from(psi);
  ex.phase_then_rotate(s, phi, theta);
  const Complex I(0, 1);
  Eigen::VectorXcd want = (I * theta * X).exp() * ((-I * phi * D).exp() * v);
  QuantumState got = s.to_complex();
  for (std::size_t b = 0; b < dim; ++b) CHECK(std::abs(got[b] - want(b)) < 1e-12);
}

TEST_CASE("blocked and paired rotation kernels match a plain per-qubit loop for every qubit count") {
  // Covers n below, at and above the cache block (10 qubits), even and odd numbers of high qubits.
  for (int n : {1, 2, 5, 10, 11, 12, 13}) {
    IsingProblem p = random_problem(n, 3, true);
    TransverseIsingHamiltonian H(p);
    SplitExponentials ex(H);
    std::mt19937_64 rng(n);
    std::normal_distribution<double> g;
    QuantumState psi(H.dim());
    for (auto& c : psi) c = Complex(g(rng), g(rng));
    for (const double theta : {0.37, 1.3}) {  // tangent form, plain form (|cos theta| < 1/2)
    SplitState s = SplitState::from(psi);
    ex.rotate(s, theta);
    // Reference: exp(i theta sigma^x) = cos theta + i sin theta sigma^x, qubit by qubit.
    QuantumState ref = psi;
    for (int q = 0; q < n; ++q) {
      QuantumState next(ref.size());
      for (std::size_t b = 0; b < ref.size(); ++b)
        next[b] = std::cos(theta) * ref[b] + Complex(0, std::sin(theta)) * ref[b ^ (std::size_t{1} << q)];
      ref = next;
    }
    QuantumState got = s.to_complex();
    double worst = 0;
    for (std::size_t b = 0; b < ref.size(); ++b) worst = std::max(worst, std::abs(got[b] - ref[b]));
    CAPTURE(n);
    CAPTURE(theta);
    CHECK(worst < 1e-12);
    }
  }
}

TEST_CASE("fused phase + rotation: tangent and plain rotation forms, permute, gather and per-state phases") {
  // Reference: exp(-i phi D_b) per amplitude, then cos theta + i sin theta
  // sigma^x qubit by qubit (the operators' definition, applied naively: common
  // practice for checking optimised kernels, no outside source). The kernels use the form
  // cos^n theta prod (1 + i tan theta sigma^x) while |cos theta| >= 1/2 and the
  // plain form beyond (theta = 1.3, 2.0: |cos| < 1/2); the phase looks its
  // factors up by permutes (<= 32 distinct levels, AVX-512 builds), from a
  // table (more levels) or computes them per state (> 65536 levels).
  struct Case { int n; unsigned seed; bool integer; double scale; };
  // +-1 couplings: at most 32 levels at 12 qubits; couplings scaled by 1/16 of
  // random integers give more than 32 table levels; real random couplings at
  // 17 qubits give more than 65536 (per-state).
  // The level table forced (the default would compute the 1/16 case's phases
  // per state; tests/test_phase_kernels.cpp covers every method).
  SplitExponentials::set_phase_method(PhaseMethod::Table);
  for (const Case c : {Case{12, 3, true, 1.0}, Case{11, 4, false, 0.0}, Case{17, 11, false, -1.0}}) {
    IsingProblem p = random_problem(c.n, c.seed, c.integer);
    if (c.scale == 0.0)  // integer multiples of 1/16 (exactly representable) in [-2, 2]
      for (auto& k : p.couplings) k.value = std::round(k.value * 32.0) / 16.0;
    TransverseIsingHamiltonian H(p);
    SplitExponentials ex(H);
    const std::size_t levels = ex.distinct_levels();
    CAPTURE(c.n);
    CAPTURE(levels);
    if (c.integer) CHECK((levels > 0 && levels <= 32));
    if (c.scale == 0.0) CHECK((levels > 32 && levels <= 65536));
    if (c.scale < 0.0) CHECK(levels == 0);
    std::mt19937_64 rng(c.seed);
    std::normal_distribution<double> g;
    QuantumState psi(H.dim());
    for (auto& z : psi) z = Complex(g(rng), g(rng));
    for (const double theta : {0.37, -0.9, 1.3, 2.0}) {
      const double phi = 0.913;
      QuantumState ref(psi.size());
      for (std::size_t b = 0; b < ref.size(); ++b) ref[b] = psi[b] * std::exp(Complex(0, -phi * H.diagonal()[b]));
      for (int q = 0; q < c.n; ++q) {
        QuantumState next(ref.size());
        for (std::size_t b = 0; b < ref.size(); ++b)
          next[b] = std::cos(theta) * ref[b] + Complex(0, std::sin(theta)) * ref[b ^ (std::size_t{1} << q)];
        ref = next;
      }
      SplitState s = SplitState::from(psi);
      ex.phase_then_rotate(s, phi, theta);
      QuantumState got = s.to_complex();
      double worst = 0, norm = 0;
      for (std::size_t b = 0; b < ref.size(); ++b) {
        worst = std::max(worst, std::abs(got[b] - ref[b]));
        norm = std::max(norm, std::abs(ref[b]));
      }
      CAPTURE(theta);
      CHECK(worst < 1e-12 * std::max(1.0, norm));
    }
  }
  SplitExponentials::set_phase_method(PhaseMethod::Auto);
}

TEST_CASE("phase table and per-state phases agree (few distinct levels versus many)") {
  // 17 qubits with real random couplings: more than 65536 distinct energies,
  // so the per-state fallback runs; compare it with exp(-i phi D_b) directly.
  IsingProblem p = random_problem(17, 11, false);
  TransverseIsingHamiltonian H(p);
  SplitExponentials ex(H);
  CHECK(ex.distinct_levels() == 0);
  IsingProblem q = random_problem(12, 11, true);
  TransverseIsingHamiltonian Hq(q);
  SplitExponentials exq(Hq);
  CHECK(exq.distinct_levels() > 0);
  CHECK(exq.distinct_levels() < 200);
  for (auto* pair : {&ex, &exq}) {
    const auto& d = pair == &ex ? H.diagonal() : Hq.diagonal();
    QuantumState psi(d.size(), Complex(0.6, -0.8));
    SplitState s = SplitState::from(psi);
    pair->phase(s, 0.913);
    QuantumState got = s.to_complex();
    double worst = 0;
    for (std::size_t b = 0; b < d.size(); b += 97)
      worst = std::max(worst, std::abs(got[b] - psi[b] * std::exp(Complex(0, -0.913 * d[b]))));
    CHECK(worst < 1e-12);
  }
}

TEST_CASE("split propagators agree with the odeint reference on random problems") {
  // Reference: Boost.Odeint Dormand-Prince 5(4) at tolerance 1e-10.
  const AnnealPath path({{0.0, 0.0}, {6.0, 1.0}});
  for (unsigned seed : {21u, 22u}) {
    for (bool integer : {true, false}) {
      IsingProblem prob = random_problem(5, seed, integer);
      Run ref = anneal(prob, path, "odeint", 1e-10);
      for (const char* name : {"split4", "split2", "split4-yoshida", "split4-bm"}) {
        Run r = anneal(prob, path, name, 1e-6);
        CAPTURE(seed);
        CAPTURE(integer);
        CAPTURE(name);
        CHECK(std::abs(r.p - ref.p) < 1e-6);
        CHECK(tv(r.psi, ref.psi) < 1e-4);  // every outcome set: others_factor (100) x tolerance
        CHECK(r.stats.error_estimate <= 0.5e-6);
        CHECK(r.stats.error_estimate >= 0.0);
      }
      // With others_factor = 1 every outcome set is held to the tolerance.
      Run all = anneal(prob, path, "split4", 1e-6, nullptr, 1.0);
      CHECK(std::abs(all.p - ref.p) < 1e-6);
      CHECK(tv(all.psi, ref.psi) < 1e-6);
    }
  }
}

TEST_CASE("split propagator agrees with odeint across a pause and on a reverse anneal") {
  IsingProblem prob = random_problem(5, 31, true);
  SUBCASE("pause at s = 0.45") {
    const AnnealPath path({{0.0, 0.0}, {3.0, 0.45}, {6.0, 0.45}, {9.0, 1.0}});
    Run ref = anneal(prob, path, "odeint", 1e-10);
    Run r = anneal(prob, path, "split4", 1e-6, nullptr, 1.0);
    CHECK(std::abs(r.p - ref.p) < 1e-6);
    CHECK(tv(r.psi, ref.psi) < 1e-6);
  }
  SUBCASE("reverse anneal from a classical state, turn at s = 0.6") {
    const AnnealPath path({{0.0, 1.0}, {2.0, 0.6}, {5.0, 0.6}, {7.0, 1.0}});
    const QuantumState start = basis_state(5, 0b10110);
    Run ref = anneal(prob, path, "odeint", 1e-10, &start);
    Run r = anneal(prob, path, "split4", 1e-6, &start, 1.0);
    CHECK(std::abs(r.p - ref.p) < 1e-6);
    CHECK(tv(r.psi, ref.psi) < 1e-6);
    CHECK(std::norm(ref.psi[0b10110]) < 0.9);  // the dwell moves real probability, so the check has teeth
  }
}

TEST_CASE("non-interacting qubits: ground-state probability is the product of single-qubit ones") {
  // Exact physics: with no couplings H is a sum of commuting one-qubit terms.
  IsingProblem prob(3);
  prob.h = {0.4, -0.7, 1.1};
  const AnnealPath path({{0.0, 0.0}, {1.5, 1.0}});
  Run all = anneal(prob, path, "split4", 1e-8);
  double product = 1.0;
  for (int i = 0; i < 3; ++i) {
    IsingProblem one(1);
    one.h = {prob.h[static_cast<std::size_t>(i)]};
    product *= anneal(one, path, "odeint", 1e-10).p;
  }
  CHECK(all.p < 0.999);  // short enough to be non-adiabatic
  CHECK(std::abs(all.p - product) < 1e-7);
}

TEST_CASE("order of convergence: error ratio ~4 (second order) and ~16 (fourth order) per step halving") {
  IsingProblem prob = random_problem(4, 41, false);
  TransverseIsingHamiltonian H(prob);
  const EnergyScales scales = EnergyScales::linear(5.0, 5.0);
  const AnnealDrive drive{&scales, AnnealPath({{0.0, 0.0}, {2.0, 1.0}})};
  // Reference: odeint at tolerance 1e-12 (independent of the splitting).
  QuantumState ref = uniform_superposition(4);
  {
    auto odeint = make_propagator("odeint", H, {.tolerance = 1e-12});
    PropagationStats st;
    odeint->advance(drive, 0.0, 2.0, ref, st);
  }
  const SplitState ref_split = SplitState::from(ref);
  for (auto [comp, want] : {std::pair{SplitComposition::Strang2, 4.0}, std::pair{SplitComposition::Suzuki4, 16.0},
                            std::pair{SplitComposition::Yoshida4, 16.0},
                            std::pair{SplitComposition::BlanesMoan4, 16.0}}) {
    SplitOperatorPropagator prop(H, {}, comp);
    auto error = [&](long steps) {
      SplitState x = SplitState::from(uniform_superposition(4));
      for (long k = 0; k < steps; ++k) prop.fixed_step(drive, 2.0 * k / steps, 2.0 / steps, x);
      return x.distance(ref_split);
    };
    const long base = comp == SplitComposition::Strang2 ? 200 : 100;
    const double e1 = error(base), e2 = error(2 * base), e3 = error(4 * base);
    CAPTURE(prop.name());
    CAPTURE(e1);
    CAPTURE(e2);
    CAPTURE(e3);
    CHECK(e3 > 1e-11);  // still far above the reference's own error
    CHECK(e1 / e2 == doctest::Approx(want).epsilon(0.15));
    CHECK(e2 / e3 == doctest::Approx(want).epsilon(0.15));
  }
}

TEST_CASE("anneals run one per OpenMP thread give the serial result bit for bit") {
  // Studies run one anneal per thread; the kernels must not share work with
  // the caller's threads (common practice: nested work sharing binds to the
  // innermost parallel region).
  IsingProblem prob = random_problem(6, 51, true);
  const AnnealPath path({{0.0, 0.0}, {3.0, 1.0}});
  const double serial = anneal(prob, path, "split4", 1e-6).p;
  double threaded[2] = {0, 0};
#pragma omp parallel for num_threads(2)
  for (int k = 0; k < 2; ++k) threaded[k] = anneal(prob, path, "split4", 1e-6).p;
  CHECK(threaded[0] == serial);
  CHECK(threaded[1] == serial);
}

TEST_CASE("a kink of the energy-scale table inside a path piece keeps the error estimate honest") {
  // A(s) switched off at s = 0.7 by a linear table (a kink in A(t) in the middle
  // of the path's one ramp), and the same ramp with a pause at s = 0.85 where
  // A = 0. A step across the kink drops the method's order and makes the error
  // erratic in N; the propagator cuts its pieces at the table's knots. Before
  // that, the paused run at tolerance 1e-8 was off by 1.8e-8 with an estimate
  // of 1e-10. Reference: Boost.Odeint's Dormand-Prince 5(4), an independent
  // method, at tolerance 1e-12.
  IsingProblem prob(3);
  prob.h = {0.3, -0.1, 0.05};
  prob.couplings = {{0, 1, 1.0}, {1, 2, 1.0}, {0, 2, 1.0}};
  const TransverseIsingHamiltonian H(prob);
  const GroundManifold gm = find_ground_manifold(prob, H.diagonal());
  const EnergyScales sc =
      EnergyScales::table({0.0, 0.7, 1.0}, {4.0, 0.0, 0.0}, {0.5, 3.0, 5.0}, ScaleInterpolation::Linear);
  const AnnealPath ramp({{0.0, 0.0}, {8.0, 1.0}});
  const AnnealPath paused({{0.0, 0.0}, {6.8, 0.85}, {11.8, 0.85}, {13.0, 1.0}});
  for (const AnnealPath* path : {&ramp, &paused}) {
    SimulationOptions ref_opt;
    ref_opt.propagator = "odeint";
    ref_opt.propagation.tolerance = 1e-12;
    const double p_ref = simulate_anneal(H, gm, sc, *path, uniform_superposition(3), ref_opt).ground_probability;
    CHECK(p_ref > 0.05);
    CHECK(p_ref < 0.95);  // far from adiabatic: the dynamics is not trivial
    for (double tol : {1e-6, 1e-8}) {
      SimulationOptions o;
      o.propagation.tolerance = tol;
      const AnnealResult r = simulate_anneal(H, gm, sc, *path, uniform_superposition(3), o);
      const double err = std::abs(r.ground_probability - p_ref);
      CAPTURE(tol);
      CAPTURE(path->points().size());
      CHECK(err < tol);
      // The estimate is of the right size: not 100 times too small.
      CHECK(r.stats.error_estimate >= 0.01 * err);
    }
  }
}
