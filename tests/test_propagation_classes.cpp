// The fast propagators on the problem classes users run (fields, real-valued
// couplings, QUBO-derived and embedded problems), against Boost.Odeint's
// Dormand-Prince 5(4) at a tight tolerance (a general-purpose reference
// library), and the order of convergence with fields. Small sizes and short
// anneals: the point is the kind of diagonal, not the size.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <random>

#include "dynamics/anneal_simulation.hpp"
#include "dynamics/split_operator_propagator.hpp"
#include "problem/embedding.hpp"

using namespace gapwise;

namespace {

// kind: 0 +-1 glass with fields +-0.15 and one coupling 0.3; 1 Gaussian
// couplings and fields; 2 integer QUBO converted exactly; 3 the class-0
// problem on n/2 variables embedded in chains of two qubits.
IsingProblem class_problem(int kind, int n, unsigned seed) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> g;
  if (kind == 3) {
    const IsingProblem logical = class_problem(0, n / 2, seed);
    Embedding e;
    e.physical_qubits = n;
    e.couplers_given = true;
    for (int v = 0; v < n / 2; ++v) {
      e.chains.push_back({2 * v, 2 * v + 1});
      e.couplers.push_back({2 * v, 2 * v + 1});
    }
    for (const Coupling& c : logical.couplings) e.couplers.push_back({2 * c.i + 1, 2 * c.j});
    std::sort(e.couplers.begin(), e.couplers.end());
    return embed_problem(logical, e, ChainStrength::relative_to_largest(2.0)).physical;
  }
  if (kind == 2) {
    QuboProblem q;
    q.variables = n;
    for (int i = 0; i < n; ++i) q.terms.push_back({i, i, static_cast<double>(static_cast<int>(rng() % 7) - 3)});
    for (int i = 0; i < n; ++i) q.terms.push_back({std::min(i, (i + 1) % n), std::max(i, (i + 1) % n), (rng() & 1) ? 2.0 : -1.0});
    q.offset = 1.5;
    return qubo_to_ising(q);
  }
  IsingProblem p(n);
  for (int i = 0; i < n; ++i) {
    const int j = (i + 1) % n;
    p.couplings.push_back({std::min(i, j), std::max(i, j), kind == 1 ? g(rng) : ((rng() & 1) ? 1.0 : -1.0)});
  }
  if (n > 3) p.couplings.push_back({0, n / 2, kind == 1 ? g(rng) : -1.0});
  for (double& h : p.h) h = kind == 1 ? 0.3 * g(rng) : ((rng() & 1) ? 0.15 : -0.15);
  if (kind == 0) p.couplings[1].value = 0.3;
  return p;
}

struct Result {
  double p;
  double est;
};

Result anneal(const IsingProblem& prob, double T, const std::string& prop, double tol) {
  TransverseIsingHamiltonian H(prob);
  const GroundManifold gm = find_ground_manifold(prob, H.diagonal());
  static const EnergyScales scales = EnergyScales::linear(5.0, 5.0);
  SimulationOptions o;
  o.propagator = prop;
  o.propagation.tolerance = tol;
  const AnnealResult r = simulate_anneal(H, gm, scales, AnnealPath({{0.0, 0.0}, {T, 1.0}}),
                                         uniform_superposition(prob.qubits), o);
  return {r.ground_probability, r.stats.error_estimate};
}

}  // namespace

TEST_CASE("every split propagator agrees with the odeint reference on every problem class") {
  for (int kind = 0; kind < 4; ++kind) {
    const IsingProblem prob = class_problem(kind, 6, 300u + static_cast<unsigned>(kind));
    // The QUBO's large fields make 5 ns nearly adiabatic: 1 ns keeps p away from 1.
    const double T = kind == 2 ? 1.0 : 5.0;
    const Result ref = anneal(prob, T, "odeint", 1e-10);
    for (const std::string name : {"split2", "split4", "split4-yoshida", "split4-bm", "split-auto"}) {
      const Result r = anneal(prob, T, name, 1e-6);
      CAPTURE(kind);
      CAPTURE(name);
      CAPTURE(ref.p);
      CHECK(ref.p > 0.05);  // a probability that moves with the dynamics, not 0 or 1
      CHECK(ref.p < 0.999);
      CHECK(std::abs(r.p - ref.p) < 1e-6);
      CHECK(r.est <= 0.5e-6);
    }
  }
}

TEST_CASE("orders of convergence with fields: 2 (Strang), 4 (Suzuki, Blanes-Moan) on each class") {
  // Error of the final state against odeint at 1e-12 after uniform steps; the
  // ratio per halving of the step tends to 2^order (common practice).
  const EnergyScales scales = EnergyScales::linear(5.0, 5.0);
  const AnnealDrive drive{&scales, AnnealPath({{0.0, 0.0}, {2.0, 1.0}})};
  for (int kind = 0; kind < 4; ++kind) {
    const IsingProblem prob = class_problem(kind, 4, 400u + static_cast<unsigned>(kind));
    TransverseIsingHamiltonian H(prob);
    QuantumState ref = uniform_superposition(4);
    {
      auto odeint = make_propagator("odeint", H, {.tolerance = 1e-12});
      PropagationStats st;
      odeint->advance(drive, 0.0, 2.0, ref, st);
    }
    const SplitState ref_split = SplitState::from(ref);
    for (auto [comp, want] : {std::pair{SplitComposition::Strang2, 4.0}, std::pair{SplitComposition::Suzuki4, 16.0},
                              std::pair{SplitComposition::BlanesMoan4, 16.0}}) {
      SplitOperatorPropagator prop(H, {}, comp);
      auto error = [&](long steps) {
        SplitState x = SplitState::from(uniform_superposition(4));
        for (long k = 0; k < steps; ++k) prop.fixed_step(drive, 2.0 * k / steps, 2.0 / steps, x);
        return x.distance(ref_split);
      };
      const long base = comp == SplitComposition::Strang2 ? 400 : 200;
      const double e1 = error(base), e2 = error(2 * base), e3 = error(4 * base);
      CAPTURE(kind);
      CAPTURE(prop.name());
      CAPTURE(e1);
      CAPTURE(e2);
      CAPTURE(e3);
      CHECK(e3 > 1e-11);
      CHECK(e1 / e2 == doctest::Approx(want).epsilon(0.15));
      CHECK(e2 / e3 == doctest::Approx(want).epsilon(0.15));
    }
  }
}

TEST_CASE("split-auto keeps second order at loose tolerances and switches to fourth order at tight ones") {
  // A 4-qubit class-0 problem at 5 ns, tolerances 1e-2 .. 1e-10: the loosest is
  // met by Strang's threshold grid, the tightest needs many halvings of it, so
  // the run moves to the Blanes-Moan method; once switched at some tolerance
  // it stays switched at every tighter one. Every run matches odeint at 1e-12
  // to its tolerance (TV: every outcome set, nothing watched).
  const IsingProblem prob = class_problem(0, 4, 500);
  TransverseIsingHamiltonian H(prob);
  const EnergyScales scales = EnergyScales::linear(5.0, 5.0);
  const AnnealDrive drive{&scales, AnnealPath({{0.0, 0.0}, {5.0, 1.0}})};
  QuantumState ref = uniform_superposition(4);
  {
    auto odeint = make_propagator("odeint", H, {.tolerance = 1e-12});
    PropagationStats st;
    odeint->advance(drive, 0.0, 5.0, ref, st);
  }
  bool switched = false;
  for (const double tol : {1e-2, 1e-3, 1e-4, 1e-6, 1e-8, 1e-10}) {
    SplitOperatorPropagator prop(H, {.tolerance = tol}, SplitComposition::Auto);
    QuantumState psi = uniform_superposition(4);
    PropagationStats st;
    prop.advance(drive, 0.0, 5.0, psi, st);
    CAPTURE(tol);
    CHECK(prop.name() == "split-auto");
    const bool now = prop.composition() == SplitComposition::BlanesMoan4;
    if (tol == 1e-2) CHECK(!now);
    if (tol == 1e-10) CHECK(now);
    if (switched) CHECK(now);
    switched = switched || now;
    double tvd = 0;
    for (std::size_t k = 0; k < psi.size(); ++k) tvd += 0.5 * std::abs(std::norm(psi[k]) - std::norm(ref[k]));
    CHECK(tvd < tol);
  }
}
