// The adiabatic master equation (Albash, Boixo, Lidar & Zanardi, New J. Phys. 14,
// 123016 (2012)) with ohmic sigma^z baths, checked against analytic facts of
// open quantum systems and against the closed-system propagators.
// ctest-labels: slow
#include <doctest/doctest.h>

#include <cmath>
#include <numbers>

#include "dynamics/anneal_simulation.hpp"
#include "dynamics/master_equation.hpp"
#include "problem/classical_spectrum.hpp"

using namespace gapwise;

namespace {
constexpr double kPi = std::numbers::pi;

OhmicBath bath_at(double mk, double eta = 1e-3, double fc = 8.0) {
  OhmicBath b;
  b.temperature_mk = mk;
  b.coupling = eta;
  b.cutoff_ghz = fc;
  return b;
}

// A small problem with fields and real-valued couplings (demo values, invented).
IsingProblem mixed_problem(int n) {
  IsingProblem p(n);
  for (int i = 0; i < n; ++i) p.h[static_cast<std::size_t>(i)] = 0.37 * std::sin(1.3 * i + 0.4);
  for (int i = 0; i + 1 < n; ++i) p.couplings.push_back({i, i + 1, -0.8 + 0.21 * i});
  if (n > 2) p.couplings.push_back({0, n - 1, 0.45});
  return p;
}

double trace_distance_like(const DensityMatrix& x, const DensityMatrix& y) { return (x - y).norm(); }

OpenAnnealResult open_anneal(const IsingProblem& p, const AnnealPath& path, const OhmicBath& bath, double tol,
                             const EnergyScales& scales = EnergyScales::linear(5.0, 5.0)) {
  const TransverseIsingHamiltonian h(p);
  const GroundManifold gm = find_ground_manifold(p, h.diagonal());
  Schedule sch;
  sch.scales = scales;
  return simulate_open_anneal(h, gm, scales, path, initial_state(h, sch, path), bath, {.tolerance = tol});
}
}  // namespace

TEST_CASE("Ohmic spectrum: limits, detailed balance, no overflow at low temperature") {
  // gamma(omega) = 2 pi eta omega e^{-|omega|/omega_c} / (1 - e^{-beta omega}) (Albash et al. 2012, eq. for the
  // ohmic bath); the KMS condition gamma(-omega) = e^{-beta omega} gamma(omega) (Kubo 1957; Martin & Schwinger 1959).
  const OhmicBath b = bath_at(12.0, 2e-3, 6.0);
  // k_B T / h at 12 mK: CODATA 2018 exact constants give 20.8366 GHz/K, so 0.25004 GHz.
  CHECK(b.theta_ghz() == doctest::Approx(0.2500394).epsilon(1e-6));
  const double beta = 1.0 / (2 * kPi * b.theta_ghz());
  const double g0 = 2 * kPi * b.coupling / beta;
  CHECK(b.rate(0.0) == doctest::Approx(g0).epsilon(1e-14));
  // omega -> 0 from both sides approaches gamma(0) continuously (first order: gamma(w) ~ g0 (1 + beta w / 2)).
  for (double w : {1e-9, -1e-9, 1e-6, -1e-6}) CHECK(b.rate(w) == doctest::Approx(g0 * (1 + beta * w / 2)).epsilon(1e-8));
  for (double de : {0.01, 0.3, 2.0, 7.5}) {
    const double w = 2 * kPi * de;
    const double expect = 2 * kPi * b.coupling * w * std::exp(-w / (2 * kPi * b.cutoff_ghz)) / (1 - std::exp(-beta * w));
    CHECK(b.rate(w) == doctest::Approx(expect).epsilon(1e-12));
    CHECK(b.rate(-w) / b.rate(w) == doctest::Approx(std::exp(-beta * w)).epsilon(1e-12));
  }
  // Deep quantum regime: dE/theta = 10 GHz / 0.02 GHz = 500: finite, uphill underflows to 0, downhill is the
  // zero-temperature rate 2 pi eta omega e^{-omega/omega_c}.
  const OhmicBath cold = bath_at(1.0);
  const double w = 2 * kPi * 10.0;
  CHECK(std::isfinite(cold.rate(-w)));
  CHECK(cold.rate(-w) < 1e-200);
  CHECK(cold.rate(w) == doctest::Approx(2 * kPi * 1e-3 * w * std::exp(-10.0 / 8.0)).epsilon(1e-12));
  const OhmicBath zero = bath_at(0.0);
  CHECK(zero.rate(0.0) == 0.0);
  CHECK(zero.rate(-w) == 0.0);
  CHECK(zero.rate(w) == doctest::Approx(2 * kPi * 1e-3 * w * std::exp(-10.0 / 8.0)).epsilon(1e-12));
}

TEST_CASE("At fixed s the Gibbs state is stationary (detailed balance / KMS) and the fixed point of relaxation") {
  // The Davies generator with KMS rates has exp(-H/theta)/Z as a stationary state (Davies, Commun. Math. Phys.
  // 39, 91 (1974); Spohn, Rev. Mod. Phys. 52, 569 (1980)); with every qubit coupled it is the unique one.
  const IsingProblem p = mixed_problem(3);
  const TransverseIsingHamiltonian h(p);
  const OhmicBath b = bath_at(30.0, 5e-3);
  for (double s : {0.3, 0.55}) {
    const double a = 5.0 * (1 - s), bb = 5.0 * s;
    const FrozenGenerator g = build_frozen_generator(h, a, bb, b);
    const DensityMatrix gibbs = gibbs_state(h, a, bb, b.theta_ghz());
    DensityMatrix out;
    g.apply_dissipator(g.to_eigenbasis(gibbs), out);
    INFO("s = " << s);
    CHECK(out.norm() < 1e-13);
    // A non-equilibrium state is not stationary (the check can fail).
    DensityMatrix ground = DensityMatrix::Zero(8, 8);
    ground(0, 0) = 1.0;
    g.apply_dissipator(ground, out);
    CHECK(out.norm() > 1e-4);
  }
  // Relaxation at a pause: from the ground state of H(0.55) toward the Gibbs state of H(0.55).
  const AnnealPath pause({{0.0, 0.55}, {4000.0, 0.55}});
  Schedule sch;
  const GroundManifold gm = find_ground_manifold(p, h.diagonal());
  auto prop = make_full_space_master_equation(h, b, {.tolerance = 1e-8});
  const QuantumState psi = initial_state(h, sch, pause);
  Eigen::Map<const Eigen::VectorXcd> v(psi.data(), 8);
  DensityMatrix rho = v * v.adjoint();
  OpenPropagationStats st;
  AnnealDrive drive{&sch.scales, pause};
  const DensityMatrix gibbs = gibbs_state(h, 2.25, 2.75, b.theta_ghz());
  const double start_distance = trace_distance_like(rho, gibbs);
  prop->advance(drive, 0.0, 4000.0, rho, st);
  INFO("distance to Gibbs: start " << start_distance << ", after 4 us " << trace_distance_like(rho, gibbs));
  CHECK(start_distance > 1e-2);
  CHECK(trace_distance_like(rho, gibbs) < 1e-6);
}

TEST_CASE("One qubit relaxes at the golden-rule rate |<0|sigma^z|1>|^2 gamma(omega) (1 + e^{-beta omega})") {
  // H = -(A/2) X + (B h/2) Z = (D/2) n.sigma with D = sqrt(A^2 + (B h)^2) and n = (-A, 0, B h)/D. In its
  // eigenbasis sigma^z has the off-diagonal element of modulus |n_x| = A/D (the component of z perpendicular to
  // n), so the Pauli master equation gives dP1/dt = -(A/D)^2 [gamma(w) P1 - gamma(-w) P0], w = 2 pi D:
  // P1(t) = P_eq + (P1(0) - P_eq) e^{-Gamma t}, Gamma = (A/D)^2 gamma(w) (1 + e^{-beta w}), P_eq = 1/(1 + e^{D/theta})
  // (Fermi's golden rule; e.g. Breuer & Petruccione, The Theory of Open Quantum Systems (2002), sec. 3.4; the
  // physics-conventions check for h = 0).
  const OhmicBath b = bath_at(60.0, 1e-3);
  for (double hval : {0.0, 0.6}) {
    IsingProblem p(1);
    p.h = {hval};
    const TransverseIsingHamiltonian h(p);
    const double s = 0.5, a = 2.5, bb = 2.5;
    const double gap = std::hypot(a, bb * hval);
    const double w = 2 * kPi * gap;
    const double x = gap / b.theta_ghz();
    const double rate = (a / gap) * (a / gap) * b.rate(w) * (1 + std::exp(-x));
    const double p_eq = 1 / (1 + std::exp(x));
    const double t_end = 1.3 / rate;
    // Start in the excited level of H(s).
    const FrozenGenerator g = build_frozen_generator(h, a, bb, bath_at(60.0, 0.0));
    DensityMatrix rho = (g.vectors.col(1) * g.vectors.col(1).transpose()).cast<Complex>();
    Schedule sch;
    const AnnealPath pause({{0.0, s}, {t_end, s}});
    AnnealDrive drive{&sch.scales, pause};
    OpenPropagationStats st;
    make_full_space_master_equation(h, b, {.tolerance = 1e-10})->advance(drive, 0.0, t_end, rho, st);
    const double p1 = (g.vectors.col(1).transpose() * rho.real() * g.vectors.col(1))(0, 0);
    const double expect = p_eq + (1 - p_eq) * std::exp(-rate * t_end);
    INFO("h = " << hval << ": rate " << rate << " /ns, P1 " << p1 << ", expected " << expect);
    CHECK(p1 == doctest::Approx(expect).epsilon(1e-9));
  }
}

TEST_CASE("eta = 0 reproduces the closed-system anneal (split-operator and odeint propagators)") {
  // The master equation without dissipator is the von Neumann equation of the same H(t); its populations must
  // match |psi|^2 from the Schroedinger propagators (common practice).
  const IsingProblem p = mixed_problem(4);
  const TransverseIsingHamiltonian h(p);
  const GroundManifold gm = find_ground_manifold(p, h.diagonal());
  Schedule sch;
  const AnnealPath path({{0.0, 0.0}, {1.5, 0.45}, {2.5, 0.45}, {4.0, 1.0}});  // with a pause
  SimulationOptions opt;
  opt.propagator = "odeint";
  opt.propagation.tolerance = 1e-10;
  const AnnealResult closed = simulate_anneal(h, gm, sch.scales, path, initial_state(h, sch, path), opt);
  const OpenAnnealResult open = open_anneal(p, path, bath_at(12.0, 0.0), 1e-8);
  INFO("closed p " << closed.ground_probability << ", open (eta 0) p " << open.ground_probability);
  CHECK(closed.ground_probability < 0.999);  // short enough that p is not trivially 1
  CHECK(std::abs(open.ground_probability - closed.ground_probability) < 1e-7);
  const auto probs = probabilities(closed.final_state);
  double worst = 0;
  for (std::size_t k = 0; k < probs.size(); ++k) worst = std::max(worst, std::abs(probs[k] - open.populations[k]));
  CHECK(worst < 1e-7);
}

TEST_CASE("Non-interacting identical qubits with independent baths: p is the n-th power of the one-qubit p") {
  // Without couplings H and the sigma^z_i couplings act qubit by qubit, so the master equation factorizes and
  // rho(t) is a product (common practice). With equal fields the many-body spectrum is degenerate and Bohr
  // frequencies are shared by many level pairs: the product rule holds only if L_omega groups them as
  // P_a sigma^z P_b over eigenspaces (basis independence, Albash et al. 2012).
  const OhmicBath b = bath_at(40.0, 2e-3);
  const AnnealPath path({{0.0, 0.0}, {20.0, 0.6}, {60.0, 0.6}, {80.0, 1.0}});
  IsingProblem one(1);
  one.h = {0.4};
  IsingProblem three(3);
  three.h = {0.4, 0.4, 0.4};
  const double p1 = open_anneal(one, path, b, 1e-9).ground_probability;
  const OpenAnnealResult r3 = open_anneal(three, path, b, 1e-9);
  INFO("one qubit p " << p1 << ", three qubits p " << r3.ground_probability << ", p1^3 " << p1 * p1 * p1);
  CHECK(p1 < 0.99);
  CHECK(r3.ground_probability == doctest::Approx(p1 * p1 * p1).epsilon(1e-6));
  CHECK(r3.stats.max_jump_terms > 0);
}

TEST_CASE("Trace stays 1 and rho stays positive through a thermal anneal with a pause; error control converges") {
  // Lindblad generators are trace preserving and completely positive (Lindblad, Commun. Math. Phys. 48, 119
  // (1976)); the integrator must keep both to rounding. Halving the tolerance tenfold must move p by less
  // than the tolerance (common practice for adaptive integrators).
  const IsingProblem p = mixed_problem(4);
  const AnnealPath path({{0.0, 0.0}, {40.0, 0.5}, {140.0, 0.5}, {200.0, 1.0}});
  const OhmicBath b = bath_at(15.0, 1e-3);
  const OpenAnnealResult r = open_anneal(p, path, b, 1e-6);
  const OpenAnnealResult fine = open_anneal(p, path, b, 1e-7);
  INFO("p " << r.ground_probability << " (tol 1e-6), " << fine.ground_probability << " (tol 1e-7); trace dev "
            << r.stats.max_trace_deviation << ", min eigenvalue " << r.stats.min_eigenvalue << ", steps "
            << r.stats.steps);
  CHECK(r.stats.max_trace_deviation < 1e-9);  // rounding over thousands of steps
  CHECK(r.stats.min_eigenvalue > -1e-10);
  CHECK(r.min_eigenvalue > -1e-10);
  CHECK(std::abs(r.ground_probability - fine.ground_probability) < 1e-6);
}

TEST_CASE("A pause after the minimum gap raises p when the temperature is comparable to the gap (thermal relaxation)") {
  // Qualitative, as reported for annealing hardware and reproduced with the adiabatic master equation by
  // Marshall, Venturelli, Hen & Rieffel, Phys. Rev. Applied 11, 044083 (2019) (from memory): population
  // thermally excited around the minimum gap relaxes back to the ground level during a pause placed after it,
  // where the gap is larger than k_B T/h but the transverse field still gives sigma^z matrix elements between
  // the levels; without a pause the rest of the anneal is too fast for that relaxation. A closed system shows
  // no such gain. Invented 2-qubit problem: minimum gap 1.85 GHz at s = 0.39 (gapwise gap), theta = 0.83 GHz.
  IsingProblem p(2);
  p.h = {0.5, -0.3};
  p.couplings = {{0, 1, -1.0}};
  const EnergyScales scales = EnergyScales::linear(5.0, 20.0);
  const OhmicBath b = bath_at(40.0, 1e-2);
  auto path_with_pause = [](double pause_ns) {
    const double sp = 0.6;  // after the gap
    if (pause_ns == 0) return AnnealPath({{0, 0}, {50, sp}, {55, 1}});
    return AnnealPath({{0, 0}, {50, sp}, {50 + pause_ns, sp}, {55 + pause_ns, 1}});
  };
  std::vector<double> open_p;
  for (double pause : {0.0, 30.0, 100.0, 300.0}) {
    open_p.push_back(open_anneal(p, path_with_pause(pause), b, 1e-7, scales).ground_probability);
    const double closed = open_anneal(p, path_with_pause(pause), bath_at(40.0, 0.0), 1e-7, scales).ground_probability;
    INFO("pause " << pause << " ns: p open " << open_p.back() << ", closed " << closed);
    CHECK(closed > 0.9999);  // slow enough to be adiabatic without a bath: any gain below is thermal
  }
  INFO("p with bath for pauses 0, 30, 100, 300 ns: " << open_p[0] << " " << open_p[1] << " " << open_p[2] << " "
                                                      << open_p[3]);
  CHECK(open_p[0] < open_p[1]);
  CHECK(open_p[1] < open_p[2]);
  CHECK(open_p[2] <= open_p[3] + 1e-6);
  CHECK(open_p[3] - open_p[0] > 0.01);
}

#include <fstream>

#include "test_support.hpp"

namespace {
// A value inside the JSON text (a dotted path such as "open_system.ground_probability"), read by Python's json module.
std::string json_at(const testing::TempDir& dir, const std::string& json, const std::string& dotted) {
  const auto f = dir.write("summary.json", json);
  const auto out = dir.path / "value.txt";
  const std::string cmd = "/usr/bin/python3 -c \"import json,sys,functools; d=json.load(open(sys.argv[1])); "
                          "print(functools.reduce(lambda x, k: x[int(k)] if k.isdigit() else x[k], sys.argv[2].split('.'), d))\" '" +
                          f.string() + "' " + dotted + " > '" + out.string() + "'";
  REQUIRE(std::system(cmd.c_str()) == 0);
  std::ifstream in(out);
  std::string v;
  std::getline(in, v);
  return v;
}
}  // namespace

TEST_CASE("anneal --bath: the closed and open results side by side; eta = 0 in a bath file gives the closed p") {
  // End to end through the command line: a bath file with coupling 0 is the closed system (common practice), and
  // the JSON carries the bath and the open-system result with trace and positivity; a cold bath with coupling
  // changes p (the check can fail).
  testing::TempDir dir;
  dir.write("closed.toml", "format = \"gapwise-bath\"\ntemperature_mk = 12\ncoupling = 0\n");
  dir.write("warm.toml", "format = \"gapwise-bath\"\ntemperature_mk = 40\ncoupling = 5e-3\n");
  const auto src = testing::source_dir();
  const std::string base = "anneal '" + (src / "data-samples/triangle.toml").string() + "' '" +
                           (src / "schedules/linear.toml").string() + "' -d 30 --json --tolerance 1e-8 --bath ";
  const auto r0 = testing::run_gapwise(base + "'" + (dir.path / "closed.toml").string() + "'", dir);
  REQUIRE(r0.exit_code == 0);
  const double closed = std::stod(json_at(dir, r0.out, "ground_probability"));
  const double open0 = std::stod(json_at(dir, r0.out, "open_system.ground_probability"));
  CHECK(std::abs(open0 - closed) < 1e-7);
  CHECK(json_at(dir, r0.out, "bath.illustrative_defaults_used") == "True");  // cutoff_ghz was left out
  CHECK(std::stod(json_at(dir, r0.out, "bath.theta_ghz")) == doctest::Approx(0.2500394).epsilon(1e-6));
  const auto r1 = testing::run_gapwise(base + "'" + (dir.path / "warm.toml").string() + "'", dir);
  REQUIRE(r1.exit_code == 0);
  const double open1 = std::stod(json_at(dir, r1.out, "open_system.ground_probability"));
  INFO("closed p " << closed << ", open p (eta 0) " << open0 << ", open p (40 mK, eta 5e-3) " << open1);
  CHECK(std::abs(open1 - closed) > 1e-3);
  CHECK(std::stod(json_at(dir, r1.out, "open_system.max_trace_deviation")) < 1e-9);
  CHECK(std::stod(json_at(dir, r1.out, "open_system.min_eigenvalue")) > -1e-10);
}

TEST_CASE("durations --bath: open and closed p(t_f) side by side; coupling 0 gives the closed p at every duration") {
  // eta = 0 is the closed system (common practice): p with the "bath" must equal the closed study's p at each
  // grid duration, to the tolerances of the two propagators; TTS = t_f ln(1 - p*) / ln(1 - p) (Ronnow et al.,
  // Science 345, 420 (2014)) must follow from the printed p.
  testing::TempDir dir;
  dir.write("closed.toml", "format = \"gapwise-bath\"\ncoupling = 0\n");
  const auto src = testing::source_dir();
  const auto r = testing::run_gapwise("durations '" + (src / "data-samples/triangle.toml").string() + "' '" +
                                          (src / "schedules/linear.toml").string() +
                                          "' --durations 2,6 --no-search --no-predictions --tolerance 1e-8 --json --bath '" +
                                          (dir.path / "closed.toml").string() + "'",
                                      dir);
  REQUIRE(r.exit_code == 0);
  for (int k = 0; k < 2; ++k) {
    const std::string at = "open_system.points." + std::to_string(k) + ".";
    auto value = [&](const std::string& key) {
      // json_at takes a dotted path; list indices are digits
      return std::stod(json_at(dir, r.out, at + key));
    };
    const double t = value("duration_ns"), closed = value("closed_ground_probability"), open = value("ground_probability");
    INFO("t_f " << t << ": closed " << closed << ", open " << open);
    CHECK(closed < 0.99);
    CHECK(std::abs(open - closed) < 1e-6);
    CHECK(value("tts_ns") == doctest::Approx(t * std::log(0.01) / std::log(1 - open)).epsilon(1e-6));
  }
}

#include "studies/shape_maps.hpp"

TEST_CASE("pause-map --bath runs the pause map's own paths: coupling 0 reproduces the closed map; a bath after the gap helps") {
  // eta = 0 is the closed system (common practice); with a bath comparable to the gap the best pause lies after
  // the minimum gap (s* = 0.39 for this invented problem, gapwise gap), as in Marshall et al. 2019 (from memory).
  IsingProblem p(2);
  p.h = {0.5, -0.3};
  p.couplings = {{0, 1, -1.0}};
  Schedule sch;
  sch.scales = EnergyScales::linear(5.0, 20.0);
  SimulationOptions sim;
  sim.propagation.tolerance = 1e-8;
  const AnnealSetup setup(p, sch, sim);
  PauseMapOptions mo;
  mo.pause_s = {0.3, 0.6};
  mo.pause_ns = {0, 100};
  mo.duration_ns = 20;
  mo.cost = PauseCost::AddedTime;
  const PauseMap closed = pause_map(setup, mo);
  const auto paths = pause_map_paths(setup, mo);
  CHECK(paths.size() == 4);  // two references (0 and 100 ns added) and two paused paths
  for (std::size_t i = 0; i < 2; ++i) {
    const auto& path = paths.at({mo.pause_s[i], 100.0});
    const double open0 =
        simulate_open_anneal(setup.hamiltonian, setup.ground, sch.scales, path, setup.start, bath_at(40, 0.0), {.tolerance = 1e-8})
            .ground_probability;
    CHECK(std::abs(open0 - closed.at(i, 1).ground_probability) < 1e-6);
  }
  const OhmicBath warm = bath_at(40.0, 1e-2);
  auto open_p = [&](const AnnealPath& path) {
    return simulate_open_anneal(setup.hamiltonian, setup.ground, sch.scales, path, setup.start, warm, {.tolerance = 1e-7})
        .ground_probability;
  };
  const double before_gap = open_p(paths.at({0.3, 100.0})), after_gap = open_p(paths.at({0.6, 100.0}));
  const double reference = open_p(paths.at(pause_map_reference_key(mo, 100.0)));
  INFO("with the bath: pause at 0.3 " << before_gap << ", at 0.6 " << after_gap << ", no pause " << reference);
  CHECK(after_gap > before_gap + 0.01);
  CHECK(after_gap > reference + 0.005);
}
