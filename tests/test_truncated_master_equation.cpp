// The adiabatic master equation truncated to the lowest K instantaneous levels
// (dynamics/truncated_master_equation.hpp), checked against the full-space
// master equation, the closed-system propagators and analytic facts.
// ctest-labels: slow
#include <doctest/doctest.h>

#include <cmath>
#include <numbers>

#include "dynamics/anneal_simulation.hpp"
#include "dynamics/master_equation.hpp"
#include "dynamics/truncated_master_equation.hpp"
#include "problem/classical_spectrum.hpp"

using namespace gapwise;

namespace {
constexpr double kPi = std::numbers::pi;

OhmicBath bath_at(double mk, double eta) {
  OhmicBath b;
  b.temperature_mk = mk;
  b.coupling = eta;
  b.cutoff_ghz = 8.0;
  return b;
}

// Fields and real-valued couplings (demo values, invented).
IsingProblem mixed_problem(int n) {
  IsingProblem p(n);
  for (int i = 0; i < n; ++i) p.h[static_cast<std::size_t>(i)] = 0.37 * std::sin(1.3 * i + 0.4);
  for (int i = 0; i + 1 < n; ++i) p.couplings.push_back({i, i + 1, -0.8 + 0.21 * i});
  if (n > 2) p.couplings.push_back({0, n - 1, 0.45});
  return p;
}

// A QUBO-derived problem: minimize x^T Q x over bits, Q invented, mapped to Ising by x = (1 - z)/2
// (common practice): h_i = -(Q_ii + sum_{j != i} Q_ij / 2) / 2, J_ij = Q_ij / 4.
IsingProblem qubo_problem() {
  const double q[4][4] = {{-1.0, 0.8, 0.0, 0.3}, {0.8, -0.6, 0.5, 0.0}, {0.0, 0.5, -0.9, 0.7}, {0.3, 0.0, 0.7, -0.4}};
  IsingProblem p(4);
  for (int i = 0; i < 4; ++i) {
    double row = 0;
    for (int j = 0; j < 4; ++j)
      if (j != i) row += q[i][j];
    p.h[static_cast<std::size_t>(i)] = -(q[i][i] + row / 2) / 2;
    for (int j = i + 1; j < 4; ++j)
      if (q[i][j] != 0) p.couplings.push_back({i, j, q[i][j] / 4});
  }
  return p;
}

OpenAnnealResult run(const IsingProblem& p, const AnnealPath& path, const OhmicBath& bath, const std::string& method,
                     int levels = 0, double tol = 1e-7) {
  const TransverseIsingHamiltonian h(p);
  const GroundManifold gm = find_ground_manifold(p, h.diagonal());
  Schedule sch;
  sch.scales = EnergyScales::linear(5.0, 5.0);
  OpenPropagatorOptions o{.tolerance = tol};
  o.method = method;
  o.levels = levels;
  return simulate_open_anneal(h, gm, sch.scales, path, initial_state(h, sch, path), bath, o);
}
}  // namespace

TEST_CASE("ame-truncated with every level kept agrees with ame-full (fields, QUBO-derived; with and without bath)") {
  // Keeping K = 2^n levels the truncation is exact and only the time discretizations differ: both schemes
  // solve the same Davies generator (Albash, Boixo, Lidar & Zanardi, New J. Phys. 14, 123016 (2012)).
  // Tolerance 1e-6 on p: twice the measured difference of 2e-8 to 3e-7 (4-5 qubits) with margin.
  const AnnealPath path({{0.0, 0.0}, {3.0, 0.5}, {8.0, 0.5}, {10.0, 1.0}});  // fast, with a pause
  for (double eta : {0.0, 5e-3}) {
    for (const IsingProblem& p : {mixed_problem(4), qubo_problem()}) {
      const OpenAnnealResult full = run(p, path, bath_at(20.0, eta), "ame-full");
      const OpenAnnealResult trunc = run(p, path, bath_at(20.0, eta), "ame-truncated", 16);
      INFO("eta " << eta << ": p full " << full.ground_probability << ", truncated " << trunc.ground_probability);
      CHECK(trunc.propagator == "ame-truncated");
      CHECK(trunc.levels == 16);
      CHECK(full.ground_probability < 0.999);  // not trivially adiabatic
      CHECK(std::abs(trunc.ground_probability - full.ground_probability) < 1e-6);
      double worst = 0;
      for (std::size_t k = 0; k < full.populations.size(); ++k)
        worst = std::max(worst, std::abs(full.populations[k] - trunc.populations[k]));
      CHECK(worst < 1e-6);
      CHECK(trunc.trace_deviation < 1e-10);
      CHECK(trunc.min_eigenvalue > -1e-10);
    }
  }
}

TEST_CASE("eta = 0: ame-truncated reproduces the closed-system p of the split-operator propagator") {
  // Without dissipator the master equation is the von Neumann equation (common practice); 6 qubits, K = 12,
  // an anneal slow enough that the levels above K stay nearly empty (the regime the truncation is for).
  const IsingProblem p = mixed_problem(6);
  const TransverseIsingHamiltonian h(p);
  const GroundManifold gm = find_ground_manifold(p, h.diagonal());
  Schedule sch;
  sch.scales = EnergyScales::linear(5.0, 5.0);
  const AnnealPath path({{0.0, 0.0}, {150.0, 1.0}});
  SimulationOptions opt;
  opt.propagator = "split4";
  opt.propagation.tolerance = 1e-9;
  const AnnealResult closed = simulate_anneal(h, gm, sch.scales, path, initial_state(h, sch, path), opt);
  const OpenAnnealResult open = run(p, path, bath_at(12.0, 0.0), "ame-truncated", 12);
  INFO("closed p " << closed.ground_probability << ", truncated (eta 0) " << open.ground_probability
                   << ", top level population " << open.top_level_population);
  CHECK(closed.ground_probability < 0.99);
  CHECK(std::abs(open.ground_probability - closed.ground_probability) < 1e-5);
}

TEST_CASE("p converges as K grows; the automatic K meets the tolerance") {
  // Truncation error falls as more levels are kept (the dropped levels' population shrinks): common practice
  // for truncated adiabatic-frame methods. Reference: ame-full on 5 qubits with a bath.
  const IsingProblem p = mixed_problem(5);
  const AnnealPath path({{0.0, 0.0}, {30.0, 1.0}});
  const OhmicBath b = bath_at(15.0, 3e-3);
  const double ref = run(p, path, b, "ame-full").ground_probability;
  const double e4 = std::abs(run(p, path, b, "ame-truncated", 4).ground_probability - ref);
  const double e8 = std::abs(run(p, path, b, "ame-truncated", 8).ground_probability - ref);
  const double e16 = std::abs(run(p, path, b, "ame-truncated", 16).ground_probability - ref);
  INFO("|p(K) - p_full|: K=4 " << e4 << ", K=8 " << e8 << ", K=16 " << e16);
  CHECK(e8 < e4);
  CHECK(e16 < e8);
  CHECK(e16 < 1e-5);
  const OpenAnnealResult autok = run(p, path, b, "ame-truncated", 0, 1e-5);
  INFO("auto K " << autok.levels << ", estimate " << autok.truncation_estimate << ", error "
                 << std::abs(autok.ground_probability - ref));
  CHECK(!autok.level_cap_hit);
  CHECK(autok.truncation_estimate <= 1e-5);
  CHECK(std::abs(autok.ground_probability - ref) < 2e-5);
}

TEST_CASE("At fixed s the truncated generator relaxes to the Gibbs state of the kept levels (KMS)") {
  // The Davies generator restricted to the lowest K levels keeps detailed balance between them, so
  // exp(-E_k/theta)/Z_K is its stationary state (Davies, Commun. Math. Phys. 39, 91 (1974); Spohn, Rev.
  // Mod. Phys. 52, 569 (1980)); where the dropped levels are thermally empty it is the full Gibbs state.
  const IsingProblem p = mixed_problem(5);
  const TransverseIsingHamiltonian h(p);
  const OhmicBath b = bath_at(60.0, 5e-3);
  const EnergyScales scales = EnergyScales::linear(5.0, 5.0);
  const AnnealPath pause({{0.0, 0.55}, {3000.0, 0.55}});
  AnnealDrive drive{&scales, pause};
  TruncatedMasterEquation me(h, b, {.levels = 6});
  Schedule sch;
  sch.scales = scales;
  const QuantumState psi = initial_state(h, sch, pause);
  me.start(drive, 0.0, Eigen::VectorXcd(Eigen::Map<const Eigen::VectorXcd>(psi.data(), 32)));
  me.advance(drive, 0.0, 3000.0);
  const Eigen::VectorXd& e = me.energies();
  Eigen::VectorXd w = (-(e.array() - e(0)) / b.theta_ghz()).exp();
  w /= w.sum();
  const DensityMatrix expect = w.cast<Complex>().asDiagonal();
  INFO("Gibbs weights of the kept levels " << w.transpose() << "; rho diagonal " << me.reduced().diagonal().real().transpose());
  CHECK(w(1) > 1e-3);  // the check sees thermal population, not only the ground state
  CHECK((me.reduced() - expect).norm() < 1e-8);
  // Against the full Gibbs state of H(0.55): they differ by about the weight the dropped levels hold there.
  const DensityMatrix full_gibbs = gibbs_state(h, 2.25, 2.75, b.theta_ghz());
  const Eigen::VectorXd all = build_frozen_generator(h, 2.25, 2.75, bath_at(60.0, 0.0)).energies;
  Eigen::VectorXd wf = (-(all.array() - all(0)) / b.theta_ghz()).exp();
  wf /= wf.sum();
  const double dropped = wf.tail(32 - 6).sum();
  const double distance = (me.full_density() - full_gibbs).norm();
  INFO("weight of the dropped levels " << dropped << ", distance to the full Gibbs state " << distance);
  CHECK(distance < 2 * dropped + 1e-8);
}

TEST_CASE("One qubit through the truncated code relaxes at the golden-rule rate gamma(w) (1 + e^{-beta w})") {
  // H = -(A/2) X + (B h/2) Z: sigma^z has the off-diagonal element A/D in the eigenbasis (D the gap), so
  // P1(t) = P_eq + (1 - P_eq) e^{-Gamma t}, Gamma = (A/D)^2 gamma(w) (1 + e^{-beta w}), w = 2 pi D
  // (Fermi's golden rule; Breuer & Petruccione, The Theory of Open Quantum Systems (2002), sec. 3.4).
  const OhmicBath b = bath_at(60.0, 1e-3);
  for (double hval : {0.0, 0.6}) {
    IsingProblem p(1);
    p.h = {hval};
    const TransverseIsingHamiltonian h(p);
    const double a = 2.5, bb = 2.5;
    const double gap = std::hypot(a, bb * hval);
    const double x = gap / b.theta_ghz();
    const double rate = (a / gap) * (a / gap) * b.rate(2 * kPi * gap) * (1 + std::exp(-x));
    const double p_eq = 1 / (1 + std::exp(x));
    const double t_end = 1.3 / rate;
    const EnergyScales scales = EnergyScales::linear(5.0, 5.0);
    const AnnealPath pause({{0.0, 0.5}, {t_end, 0.5}});
    AnnealDrive drive{&scales, pause};
    const FrozenGenerator g = build_frozen_generator(h, a, bb, bath_at(60.0, 0.0));
    const DensityMatrix excited = (g.vectors.col(1) * g.vectors.col(1).transpose()).cast<Complex>();
    TruncatedMasterEquation me(h, b, {.levels = 2});
    me.start(drive, 0.0, excited);
    me.advance(drive, 0.0, t_end);
    const double p1 = me.reduced()(1, 1).real();
    const double expect = p_eq + (1 - p_eq) * std::exp(-rate * t_end);
    INFO("h = " << hval << ": rate " << rate << " /ns, P1 " << p1 << ", expected " << expect);
    CHECK(p1 == doctest::Approx(expect).epsilon(1e-9));
  }
}

TEST_CASE("Degenerate spectrum: identical free qubits give p1^n through the truncated code (basis independence)") {
  // Without couplings the master equation factorizes, so p(3 qubits) = p(1 qubit)^3 (common practice); the
  // spectrum is then exactly degenerate all along s, and the product holds only if the frame and the
  // dissipator treat each eigenspace as a whole (Albash et al. 2012).
  const OhmicBath b = bath_at(40.0, 2e-3);
  const AnnealPath path({{0.0, 0.0}, {20.0, 0.6}, {60.0, 0.6}, {80.0, 1.0}});
  IsingProblem one(1);
  one.h = {0.4};
  IsingProblem three(3);
  three.h = {0.4, 0.4, 0.4};
  const double p1 = run(one, path, b, "ame-full").ground_probability;
  const OpenAnnealResult r3 = run(three, path, b, "ame-truncated", 8);
  INFO("one qubit p " << p1 << ", three qubits (truncated, K = 8) p " << r3.ground_probability << ", p1^3 "
                      << p1 * p1 * p1);
  CHECK(p1 < 0.99);
  CHECK(r3.ground_probability == doctest::Approx(p1 * p1 * p1).epsilon(1e-6));
}
