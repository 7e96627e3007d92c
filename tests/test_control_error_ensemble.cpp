// Control-error Monte Carlo: Gaussian tails, reproducibility, sigma = 0.
#include <doctest/doctest.h>

#include <cmath>
#include <stdexcept>

#include "studies/control_error_ensemble.hpp"

using namespace gapwise;

namespace {
IsingProblem single_field(double h) {
  IsingProblem p(1);
  p.h[0] = h;
  return p;
}
}  // namespace

TEST_CASE("ground-state flip rate of a single field equals the Gaussian tail probability") {
  // One qubit with h > 0: the ground state is bit 1 (E = -h), the other state
  // lies 2h above. With h' = h + sigma xi the ground state flips when h' < 0,
  // i.e. with probability P(xi < -h/sigma) = erfc(h / (sigma sqrt 2)) / 2
  // (Gaussian tail; Abramowitz & Stegun, Handbook of Mathematical Functions
  // (1964), 26.2.2 with 7.1.2, from memory). Reference value from std::erfc.
  const IsingProblem p = single_field(0.3);
  const GroundManifold gm = find_ground_manifold(p);
  REQUIRE(gm.states == std::vector<BasisIndex>{1});
  SUBCASE("absolute sigma") {
    ControlEnsembleOptions o;
    o.model.sigma_h = 0.2;
    o.samples = 40000;
    o.seed = 12345;
    const ControlEnsemble e = run_control_error_ensemble(p, gm, o);
    const double expected = 0.5 * std::erfc(0.3 / (0.2 * std::sqrt(2.0)));  // 0.0668
    const double se = std::sqrt(expected * (1 - expected) / 40000.0);
    CHECK(std::abs(e.ground_change_rate - expected) < 4 * se);
    CHECK(e.ground_change_stderr == doctest::Approx(se).epsilon(0.1));
    // Each flagged sample really has a negative perturbed field, and its margin is 2h'.
    for (std::uint64_t k = 0; k < 50; ++k) {
      const IsingProblem q = perturb_problem(p, o.model, o.seed, k);
      CHECK(e.samples[k].classical_margin == doctest::Approx(2 * q.h[0]));
      CHECK(e.samples[k].ground_changed == (q.h[0] <= 0));
    }
  }
  SUBCASE("relative sigma") {
    // h' = h (1 + sigma_rel xi) flips when xi < -1/sigma_rel: erfc(1/(sigma_rel sqrt 2))/2.
    ControlEnsembleOptions o;
    o.model.sigma_h = 0.5;
    o.model.relative = true;
    o.samples = 40000;
    o.seed = 99;
    const ControlEnsemble e = run_control_error_ensemble(p, gm, o);
    const double expected = 0.5 * std::erfc(1.0 / (0.5 * std::sqrt(2.0)));  // 0.02275
    const double se = std::sqrt(expected * (1 - expected) / 40000.0);
    CHECK(std::abs(e.ground_change_rate - expected) < 4 * se);
  }
}

TEST_CASE("a coupling error flips the ground state of a pinned ferromagnetic pair at the Gaussian tail rate") {
  // Two qubits, h = (-0.5, 0), J_01 = J' (programmed -1). Energies:
  // E(00) = -0.5 + J', E(10) = 0.5 - J', E(01) = -0.5 - J', E(11) = 0.5 + J'
  // (bit string q0 q1). 00 is the ground state while J' < 0; it then loses to
  // 01 (qubit 1 flipped). With J' = -1 + 0.4 xi the flip probability is
  // P(xi > 2.5) = erfc(2.5 / sqrt 2) / 2 (Gaussian tail, as above).
  IsingProblem p(2);
  p.h = {-0.5, 0.0};  // favours spin +1 (bit 0) on qubit 0
  p.couplings = {{0, 1, -1.0}};
  const GroundManifold gm = find_ground_manifold(p);
  REQUIRE(gm.states == std::vector<BasisIndex>{0});
  ControlEnsembleOptions o;
  o.model.sigma_j = 0.4;
  o.samples = 40000;
  o.seed = 2026;
  const ControlEnsemble e = run_control_error_ensemble(p, gm, o);
  const double expected = 0.5 * std::erfc(2.5 / std::sqrt(2.0));  // 0.00621
  const double se = std::sqrt(expected * (1 - expected) / 40000.0);
  CHECK(std::abs(e.ground_change_rate - expected) < 4 * se);
}

TEST_CASE("samples are bit-identical for any thread count and sigma = 0 leaves the problem untouched") {
  // Common practice, no source: a seeded Monte Carlo must not depend on scheduling.
  IsingProblem p(4);
  p.h = {0.1, -0.2, 0.05, 0.0};
  p.couplings = {{0, 1, 1.0}, {1, 2, -0.7}, {2, 3, 0.4}, {0, 3, -1.0}};
  const GroundManifold gm = find_ground_manifold(p);
  ControlEnsembleOptions o;
  o.model = {0.1, 0.1, false};
  o.samples = 300;
  o.seed = 7;
  auto eval = [](const IsingProblem& q, ControlSample& s) {
    s.delta_min_ghz = q.h[0] + q.couplings[2].value;  // any deterministic function of the draw
    s.p_intended = {q.h[1]};
  };
  o.threads = 1;
  const ControlEnsemble one = run_control_error_ensemble(p, gm, o, eval);
  o.threads = 2;
  const ControlEnsemble two = run_control_error_ensemble(p, gm, o, eval);
  for (std::size_t k = 0; k < one.samples.size(); ++k) {
    CHECK(one.samples[k].classical_margin == two.samples[k].classical_margin);
    CHECK(one.samples[k].delta_min_ghz == two.samples[k].delta_min_ghz);
    CHECK(one.samples[k].p_intended == two.samples[k].p_intended);
  }
  CHECK(one.ground_change_rate == two.ground_change_rate);
  // A different seed gives different draws.
  CHECK(perturb_problem(p, o.model, 8, 0).h[0] != perturb_problem(p, o.model, 7, 0).h[0]);

  const IsingProblem same = perturb_problem(p, ControlErrorModel{0.0, 0.0, false}, 7, 3);
  CHECK(same.h == p.h);
  for (std::size_t c = 0; c < p.couplings.size(); ++c) CHECK(same.couplings[c].value == p.couplings[c].value);
  ControlEnsembleOptions zero;
  zero.samples = 5;
  const ControlEnsemble z = run_control_error_ensemble(p, gm, zero);
  CHECK(z.ground_change_rate == 0.0);
  CHECK(z.samples[0].classical_margin == doctest::Approx(gm.first_excited_energy - gm.energy));
}

TEST_CASE("quantiles follow Hyndman and Fan definition 7") {
  // Hyndman & Fan, Am. Stat. 50, 361 (1996), definition 7 (NumPy's default):
  // for 1, 2, 3, 4 the quartiles are 1.75, 2.5, 3.25.
  CHECK(quantile({4, 1, 3, 2}, 0.25) == doctest::Approx(1.75));
  CHECK(quantile({4, 1, 3, 2}, 0.5) == doctest::Approx(2.5));
  CHECK(quantile({4, 1, 3, 2, std::nan("")}, 0.75) == doctest::Approx(3.25));
  CHECK(std::isnan(quantile({std::nan("")}, 0.5)));
}

TEST_CASE("bad ensemble options are refused") {
  IsingProblem p(1);
  p.h[0] = 1;
  const GroundManifold gm = find_ground_manifold(p);
  ControlEnsembleOptions o;
  o.model.sigma_h = -1;
  CHECK_THROWS_AS(run_control_error_ensemble(p, gm, o), std::invalid_argument);
  o.model.sigma_h = 0.1;
  o.samples = 0;
  CHECK_THROWS_AS(run_control_error_ensemble(p, gm, o), std::invalid_argument);
  o.samples = 10;
  CHECK_THROWS_AS(run_control_error_ensemble(p, gm, o, [](const IsingProblem&, ControlSample&) {
                    throw std::runtime_error("evaluator failed");
                  }),
                  std::runtime_error);
}
