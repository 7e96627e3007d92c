// The split propagators' step control: the delivered p meets the requested
// tolerance against an independent reference (Boost.Odeint's Dormand-Prince
// 5(4), a general-purpose library, at tolerance 1e-11, converged against
// 1e-12), a looser tolerance costs fewer steps, and the
// default never takes 8 times the steps of the Blanes-Moan method (Blanes &
// Moan, J. Comput. Appl. Math. 142, 313 (2002), from memory). Step counts are
// deterministic (no timing here). Over 20 s on the loaded 2-core machine (the
// odeint references at 1e-11 and 1e-12):
// ctest-labels: slow
#include <doctest/doctest.h>

#include <cmath>
#include <complex>
#include <numbers>
#include <random>
#include <string>

#include "dynamics/anneal_simulation.hpp"
#include "dynamics/split_operator_propagator.hpp"
#include "problem/classical_spectrum.hpp"
#include "problem/instance_families.hpp"
#include "problem/seeded_random.hpp"

using namespace gapwise;

namespace {

// 0: +-1 glass (ring + one chord) with fields +-0.15 and one coupling 0.3;
// 1: Gaussian couplings and fields; 2: an integer QUBO converted exactly;
// 3: the +-1 glass without fields.
IsingProblem problem(int kind, int n, unsigned seed) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> g;
  if (kind == 2) {
    QuboProblem q;
    q.variables = n;
    for (int i = 0; i < n; ++i) q.terms.push_back({i, i, static_cast<double>(static_cast<int>(rng() % 7) - 3)});
    for (int i = 0; i < n; ++i) q.terms.push_back({std::min(i, (i + 1) % n), std::max(i, (i + 1) % n), (rng() & 1) ? 2.0 : -1.0});
    q.terms.push_back({0, n / 2, -2.0});
    q.offset = 0.5;
    return qubo_to_ising(q);
  }
  IsingProblem p(n);
  for (int i = 0; i < n; ++i) {
    const int j = (i + 1) % n;
    p.couplings.push_back({std::min(i, j), std::max(i, j), kind == 1 ? g(rng) : ((rng() & 1) ? 1.0 : -1.0)});
  }
  p.couplings.push_back({0, n / 2, kind == 1 ? g(rng) : -1.0});
  if (kind == 0 || kind == 1)
    for (double& h : p.h) h = kind == 1 ? 0.3 * g(rng) : ((rng() & 1) ? 0.15 : -0.15);
  if (kind == 0) p.couplings[1].value = 0.3;
  return p;
}

const EnergyScales& scales() {
  static const EnergyScales s = EnergyScales::linear(5.0, 5.0);
  return s;
}

// psi(T) from Boost.Odeint's Dormand-Prince 5(4) (a general-purpose library,
// independent of the splitting) at a tight tolerance.
QuantumState odeint_final(const TransverseIsingHamiltonian& H, double T, double tol) {
  auto prop = make_propagator("odeint", H, {.tolerance = tol});
  const AnnealDrive drive{&scales(), AnnealPath({{0.0, 0.0}, {T, 1.0}})};
  QuantumState psi = uniform_superposition(H.qubits());
  PropagationStats st;
  prop->advance(drive, 0.0, T, psi, st);
  return psi;
}

struct RunOutcome {
  double p = 0, tv = 0;  // TV: against the reference
  long steps = 0, stages = 0;  // stages: exponential sweeps, the work (a Blanes-Moan step has 6)
};

RunOutcome anneal(const IsingProblem& prob, double T, const std::string& prop, double tol,
               const QuantumState* ref = nullptr) {
  TransverseIsingHamiltonian H(prob);
  const GroundManifold gm = find_ground_manifold(prob, H.diagonal());
  SimulationOptions o;
  if (!prop.empty()) o.propagator = prop;
  o.propagation.tolerance = tol;
  const AnnealResult r =
      simulate_anneal(H, gm, scales(), AnnealPath({{0.0, 0.0}, {T, 1.0}}), uniform_superposition(prob.qubits), o);
  RunOutcome out{r.ground_probability, 0.0, r.stats.steps, r.stats.hamiltonian_applications};
  if (ref)
    for (std::size_t b = 0; b < ref->size(); ++b) out.tv += 0.5 * std::abs(std::norm((*ref)[b]) - std::norm(r.final_state[b]));
  return out;
}

double ground_p(const IsingProblem& prob, const QuantumState& psi) {
  TransverseIsingHamiltonian H(prob);
  const GroundManifold gm = find_ground_manifold(prob, H.diagonal());
  double p = 0;
  for (const auto b : gm.states) p += std::norm(psi[b]);
  return p;
}

}  // namespace

TEST_CASE("the default meets loose and tight tolerances against a tight odeint reference (fields, Gaussian, QUBO)") {
  // 6 qubits; durations where p is well away from 0 and 1 (the dynamics
  // matters) and where p is near 1 (the adiabatic case the benchmark runs).
  for (int kind = 0; kind < 3; ++kind)
    for (const double T : {2.0, 6.0}) {
      const IsingProblem prob = problem(kind, 6, 700u + static_cast<unsigned>(kind));
      TransverseIsingHamiltonian H(prob);
      const QuantumState ref = odeint_final(H, T, 1e-11), ref2 = odeint_final(H, T, 1e-12);
      const double p_ref = ground_p(prob, ref);
      CAPTURE(kind);
      CAPTURE(T);
      CAPTURE(p_ref);
      CHECK(std::abs(p_ref - ground_p(prob, ref2)) < 1e-10);  // the reference is converged
      CHECK(p_ref > 0.02);
      for (const double tol : {1e-4, 1e-8}) {
        const RunOutcome r = anneal(prob, T, "", tol, &ref);
        CAPTURE(tol);
        CAPTURE(r.p);
        CAPTURE(r.steps);
        CHECK(std::abs(r.p - p_ref) <= tol);
        CHECK(r.tv <= 100.0 * tol);  // every other outcome set: others_factor x tolerance
      }
    }
}

TEST_CASE("a looser tolerance costs fewer steps: 1e-4 at most half of 1e-6 (glass with fields)") {
  // Where accuracy, not the splitting threshold, sets the step: the 8-qubit
  // glass with fields at 20 ns. split2's step count; the default's work in
  // stages (it moves to Blanes-Moan, 6 stages per step, at the tight tolerance,
  // so its step counts at the two tolerances are not the same unit).
  const IsingProblem prob = problem(0, 8, 801);
  const RunOutcome loose = anneal(prob, 20.0, "", 1e-4), tight = anneal(prob, 20.0, "", 1e-6);
  const RunOutcome loose2 = anneal(prob, 20.0, "split2", 1e-4), tight2 = anneal(prob, 20.0, "split2", 1e-6);
  CAPTURE(loose.stages);
  CAPTURE(tight.stages);
  CAPTURE(loose2.steps);
  CAPTURE(tight2.steps);
  CAPTURE(tight.p);
  CHECK(tight.p < 0.9995);
  CHECK(2 * loose.stages <= tight.stages);
  CHECK(2 * loose2.steps <= tight2.steps);
}

TEST_CASE("the default takes at most 8 times the steps of split4-bm on the same problem") {
  // Including the field-free glass, whose outcome distribution (TV) converges
  // slowly under second order: split2 alone takes more than 8 times the steps
  // there (checked, so the comparison can fail), the default moves to
  // Blanes-Moan.
  for (int kind = 0; kind < 4; ++kind)
    for (const double tol : {1e-4, 1e-6, 1e-8}) {
      const IsingProblem prob = problem(kind, 8, 900u + static_cast<unsigned>(kind));
      const RunOutcome d = anneal(prob, 10.0, "", tol), bm = anneal(prob, 10.0, "split4-bm", tol);
      CAPTURE(kind);
      CAPTURE(tol);
      CAPTURE(d.steps);
      CAPTURE(bm.steps);
      CHECK(d.steps <= 8 * bm.steps);
    }
}

TEST_CASE("the default switches to Blanes-Moan when a later pair shows slow convergence (14 qubits, Gaussian)") {
  // An invented 14-qubit Gaussian glass (ring plus chords, N(0,1) couplings,
  // N(0, 0.3^2) fields; the benchmark's class, seed 2026) at 100 ns, p about
  // 0.684: Strang's first pair sits just past the splitting threshold and
  // reads as nearly converged, the second shows first-order convergence. The
  // controller used to decide on Blanes-Moan after the first pair only and then
  // halved Strang's step to 526,383 steps, 6 times Blanes-Moan's work; it now
  // decides after every pair. Work counted in exponential sweeps (stages).
  FamilySpec f;
  f.graph = GraphKind::RingPlusChords;
  f.couplings = CouplingKind::Gaussian;
  f.seed = 2026;
  IsingProblem prob = generate_instance(f, 14, 0).problem;
  std::mt19937_64 rng(derive_seed(2026, {14u, 77}));
  std::normal_distribution<double> g(0.0, 0.3);
  for (double& h : prob.h) h = g(rng);
  const RunOutcome d = anneal(prob, 100.0, "", 1e-6), bm = anneal(prob, 100.0, "split4-bm", 1e-6);
  CAPTURE(d.steps);
  CAPTURE(d.stages);
  CAPTURE(bm.stages);
  CHECK(std::abs(d.p - bm.p) < 2e-6);
  CHECK(static_cast<double>(d.stages) <= 1.5 * static_cast<double>(bm.stages));
}
