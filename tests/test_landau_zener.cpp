// ctest-labels: slow
// Landau-Zener: one qubit, constant transverse scale A = Delta, z-field swept
// linearly through zero. The many-body code path (schedule -> Hamiltonian ->
// propagator -> ground-state probability) must reproduce the exact asymptotic
// formula of Zener, Proc. R. Soc. A 137, 696 (1932): in our units (H in GHz,
// d psi/dt = -i 2 pi H psi) the probability of the diabatic (failed) outcome is
// P_LZ = exp(-pi^2 Delta^2 / v), v = d eps/dt in GHz/ns.
#include <doctest/doctest.h>

#include <cmath>
#include <numbers>

#include "dynamics/anneal_simulation.hpp"
#include "problem/classical_spectrum.hpp"
#include "spectrum/lowest_levels.hpp"

using namespace gapwise;

namespace {

struct LzRun {
  double p_diabatic_computational;  // 1 - p_ground in the computational basis
  double p_diabatic_adiabatic;      // 1 - |<ground of H(end)|psi>|^2
};

// eps(t) = B(s(t)) * h with h = 1, B linear from -W to +W; A = Delta throughout.
LzRun run_lz(double delta, double half_width, double rate, const std::string& propagator) {
  IsingProblem p(1);
  p.h = {1.0};
  const TransverseIsingHamiltonian h(p);
  const GroundManifold gm = find_ground_manifold(p, h.diagonal());  // bit 1 (spin -1)
  // The library accepts any table (files insist on B >= 0); here B crosses zero.
  const EnergyScales scales = EnergyScales::table({0.0, 1.0}, {delta, delta}, {-half_width, half_width},
                                                  ScaleInterpolation::Linear);
  const double duration = 2.0 * half_width / rate;
  const AnnealPath path({{0.0, 0.0}, {duration, 1.0}});
  Schedule sch;
  sch.scales = scales;
  SimulationOptions opt;
  opt.propagator = propagator;
  opt.propagation.tolerance = 1e-7;
  const AnnealResult r = simulate_anneal(h, gm, scales, path, initial_state(h, sch, path), opt);
  const Levels end = lowest_levels(h, delta, half_width, 1, true);
  Complex overlap(0.0, 0.0);
  for (std::size_t k = 0; k < 2; ++k) overlap += end.vectors(static_cast<Eigen::Index>(k), 0) * r.final_state[k];
  return {1.0 - r.ground_probability, 1.0 - std::norm(overlap)};
}

}  // namespace

TEST_CASE("Landau-Zener transition probability over a range of sweep rates (Zener 1932)") {
  const double delta = 0.1;   // GHz
  const double W = 20.0;      // GHz: sweep from -W to +W, W/Delta = 200
  // Finite-sweep tolerance. The sweep starts in the exact ground state at -W, so
  // what remains (Vitanov & Garraway, PRA 53, 4288 (1996): finite-range
  // corrections fall off as the range grows) is dominated by the read-out: at
  // +W the adiabatic ground state differs from the computational state |1> by
  // the mixing angle theta_W/2 ~ Delta/(2W), which enters p through a cross
  // term bounded by 2 sqrt(P(1-P)) sin(theta_W/2) <= Delta/(2W) = 2.5e-3.
  // In the adiabatic basis that term is absent; the remaining end-point
  // corrections are of order Delta v / (2 pi W^3) < 1e-5 here, so 2e-5 leaves
  // room for the integrator tolerance (1e-7). Measured deviations: < 1e-6.
  const double tol_computational = delta / (2.0 * W);
  const double tol_adiabatic = 2e-5;
  // The default (split4) and the reference (odeint); the other split
  // compositions are checked against odeint in test_split_operator.
  for (const std::string& prop : {std::string("split4"), std::string("odeint")}) {
    for (double target : {0.9, 0.6, 0.3, 0.1, 0.03}) {
      const double v = std::numbers::pi * std::numbers::pi * delta * delta / (-std::log(target));
      const double exact = std::exp(-std::numbers::pi * std::numbers::pi * delta * delta / v);
      const LzRun r = run_lz(delta, W, v, prop);
      INFO("propagator " << prop << ", rate v = " << v << " GHz/ns, P_LZ = " << exact
                         << ", computational " << r.p_diabatic_computational << " (dev "
                         << r.p_diabatic_computational - exact << "), adiabatic " << r.p_diabatic_adiabatic
                         << " (dev " << r.p_diabatic_adiabatic - exact << ")");
      MESSAGE("LZ " << prop << " v=" << v << " P_LZ=" << exact << " dev_comp=" << r.p_diabatic_computational - exact
                    << " dev_adiab=" << r.p_diabatic_adiabatic - exact);
      CHECK(std::abs(r.p_diabatic_computational - exact) < tol_computational);
      CHECK(std::abs(r.p_diabatic_adiabatic - exact) < tol_adiabatic);
    }
  }
}

TEST_CASE("Units guard: the simulation matches the 2 pi convention, not the one without it") {
  // Common practice (the classic units bug): integrating d psi/dt = -i H psi
  // with H in GHz instead of -i 2 pi H psi scales H by 1/(2 pi), turning
  // Zener's exponent pi^2 Delta^2 / v into pi Delta^2 / (2 v).
  const double delta = 0.1, W = 20.0, v = 0.1;
  const double with_2pi = std::exp(-std::numbers::pi * std::numbers::pi * delta * delta / v);
  const double without_2pi = std::exp(-std::numbers::pi * delta * delta / (2.0 * v));
  REQUIRE(std::abs(with_2pi - without_2pi) > 0.3);
  const LzRun r = run_lz(delta, W, v, "odeint");
  CHECK(std::abs(r.p_diabatic_adiabatic - with_2pi) < 2e-5);
  CHECK(std::abs(r.p_diabatic_adiabatic - without_2pi) > 0.3);
}
