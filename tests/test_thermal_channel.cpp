// The thermal channel of `diagnose --bath` (studies/thermal_channel.hpp) against
// analytic facts: on one qubit the gap = theta points, the golden-rule
// relaxation rate and the freeze-out point are computed independently here from
// the closed forms; with eta = 0 the open run is the closed one.
#include <doctest/doctest.h>

#include <cmath>
#include <numbers>

#include <boost/math/quadrature/gauss_kronrod.hpp>

#include "dynamics/anneal_simulation.hpp"
#include "problem/classical_spectrum.hpp"
#include "studies/thermal_channel.hpp"

using namespace gapwise;

namespace {
constexpr double kPi = std::numbers::pi;

OhmicBath bath_at(double mk, double eta, double fc = 8.0) {
  OhmicBath b;
  b.temperature_mk = mk;
  b.coupling = eta;
  b.cutoff_ghz = fc;
  return b;
}

// The ohmic spectrum written out again (Albash, Boixo, Lidar & Zanardi, New J. Phys. 14, 123016 (2012)),
// gamma(w)(1 + e^{-beta w}) for w > 0 (the sum of the downhill and uphill rates, detailed balance).
double both_rates(double w, const OhmicBath& b) {
  const double beta_w = w / (2 * kPi * b.theta_ghz());
  const double gamma = 2 * kPi * b.coupling * w * std::exp(-w / (2 * kPi * b.cutoff_ghz)) / (1 - std::exp(-beta_w));
  return gamma * (1 + std::exp(-beta_w));
}
}  // namespace

TEST_CASE("One qubit: gap = theta points, golden-rule rate and freeze-out against the closed forms") {
  // H = -(A/2) sigma^x + (B h/2) sigma^z, A = 5 (1 - s), B = 5 s: gap D = sqrt(A^2 + (B h)^2) (physics
  // conventions, single-qubit check value), |<0|sigma^z|1>|^2 = (A/D)^2, so the golden-rule relaxation rate is
  // Gamma = (A/D)^2 gamma(2 pi D)(1 + e^{-D/theta}) (Fermi's golden rule; the same rate the master equation tests
  // check for relaxation at fixed s).
  const double h = 0.7;
  IsingProblem p(1);
  p.h[0] = h;
  const TransverseIsingHamiltonian H(p);
  const GroundManifold gm = find_ground_manifold(p, H.diagonal());
  Schedule sch;  // linear scales 5 GHz, path s = t / t_f
  const OhmicBath bath = bath_at(150.0, 1e-3);  // theta = 3.1255 GHz: between the minimum gap 5h/sqrt(1+h^2) = 2.867 and 5h = 3.5
  const double theta = bath.theta_ghz();
  const double t_f = 60.0;
  ThermalChannelOptions o;
  o.points = 41;
  o.tolerance = 1e-8;
  const ThermalChannel tc = thermal_channel(H, gm, sch, {t_f}, bath, o);

  // gap(s)^2 = 25 (1-s)^2 + 25 h^2 s^2 = theta^2: (1 + h^2) s^2 - 2 s + 1 - theta^2/25 = 0.
  const double qa = 1 + h * h, qb = -2, qc = 1 - theta * theta / 25;
  const double disc = std::sqrt(qb * qb - 4 * qa * qc);
  REQUIRE(tc.theta_crossings_s.size() == 2);
  CHECK(tc.theta_crossings_s[0] == doctest::Approx((-qb - disc) / (2 * qa)).epsilon(1e-10));
  CHECK(tc.theta_crossings_s[1] == doctest::Approx((-qb + disc) / (2 * qa)).epsilon(1e-10));

  auto gap = [&](double s) { return std::hypot(5 * (1 - s), 5 * h * s); };
  auto rate = [&](double s) {
    const double d = gap(s), a = 5 * (1 - s);
    return a * a / (d * d) * both_rates(2 * kPi * d, bath);
  };
  for (std::size_t k = 0; k < tc.grid_s.size(); ++k) {
    const double s = tc.grid_s[k];
    CHECK(tc.grid_gap_ghz[k] == doctest::Approx(gap(s)).epsilon(1e-11));
    if (s < 1) CHECK(tc.grid_rate_per_ns[k] == doctest::Approx(rate(s)).epsilon(1e-9));
  }
  CHECK(tc.grid_rate_per_ns.back() == doctest::Approx(0.0));  // A(1) = 0: sigma^z commutes with H

  // N(t) = integral from t to t_f of Gamma(s(t')) dt' with s = t/t_f, by adaptive Gauss-Kronrod here
  // (independent of the channel's fixed 4-point rule), and the freeze-out where it falls to 1 by bisection.
  auto remaining = [&](double s0) {
    return t_f * boost::math::quadrature::gauss_kronrod<double, 31>::integrate(rate, s0, 1.0, 15, 1e-13);
  };
  REQUIRE(tc.runs.size() == 1);
  const ThermalRun& r = tc.runs[0];
  CHECK(r.total_relaxations == doctest::Approx(remaining(0.0)).epsilon(1e-8));
  REQUIRE(remaining(0.0) > 1.0);
  double lo = 0, hi = 1;
  for (int it = 0; it < 200 && hi - lo > 1e-14; ++it) ((remaining(0.5 * (lo + hi)) >= 1.0) ? lo : hi) = 0.5 * (lo + hi);
  REQUIRE(r.freeze_s.has_value());
  CHECK(*r.freeze_s == doctest::Approx(0.5 * (lo + hi)).epsilon(1e-8));
  CHECK(*r.freeze_t_ns == doctest::Approx(t_f * 0.5 * (lo + hi)).epsilon(1e-8));
  // Along the track N falls monotonically to 0 and the track matches the rate at its points.
  for (std::size_t k = 1; k < r.track.size(); ++k) CHECK(r.track[k].remaining_relaxations <= r.track[k - 1].remaining_relaxations);
  CHECK(r.track.back().remaining_relaxations == 0.0);
  // The density matrix stays a state.
  CHECK(r.open.stats.max_trace_deviation < 1e-9);
  CHECK(r.open.min_eigenvalue > -1e-9);
  // Populations of the two levels add up to 1 at every observation.
  for (const auto& pt : r.track) CHECK(pt.populations[0] + pt.populations[1] == doctest::Approx(1.0).epsilon(1e-9));

  // A grid that steps over the minimum (only s = 0 and 1, both above theta) finds no crossing; the minimum
  // s* = 1/(1 + h^2) given as an extra point (as diagnose passes its gap minima) restores both.
  ThermalChannelOptions coarse = o;
  coarse.points = 2;
  CHECK(thermal_channel(H, gm, sch, {t_f}, bath, coarse).theta_crossings_s.empty());
  coarse.extra_s = {1 / (1 + h * h)};
  const ThermalChannel with_min = thermal_channel(H, gm, sch, {t_f}, bath, coarse);
  REQUIRE(with_min.theta_crossings_s.size() == 2);
  CHECK(with_min.theta_crossings_s[0] == doctest::Approx((-qb - disc) / (2 * qa)).epsilon(1e-10));
  CHECK(with_min.theta_crossings_s[1] == doctest::Approx((-qb + disc) / (2 * qa)).epsilon(1e-10));
  CHECK(with_min.min_gap_over_theta == doctest::Approx(5 * h / std::sqrt(1 + h * h) / theta).epsilon(1e-10));

  // A bath colder than the smallest gap: no crossing at all (the gap stays above theta).
  const ThermalChannel cold = thermal_channel(H, gm, sch, {t_f}, bath_at(12.0, 1e-3), o);
  CHECK(cold.theta_crossings_s.empty());
  CHECK(cold.min_gap_over_theta > 1.0);
}

TEST_CASE("eta = 0: the thermal channel's open run is the closed anneal (Albash et al. 2012)") {
  // Three qubits with fields and real-valued couplings (invented demo values); linear scales.
  IsingProblem p(3);
  p.h = {0.31, -0.12, 0.07};
  p.couplings = {{0, 1, -0.9}, {1, 2, 0.55}, {0, 2, 0.4}};
  const TransverseIsingHamiltonian H(p);
  const GroundManifold gm = find_ground_manifold(p, H.diagonal());
  Schedule sch;
  const double t_f = 3.0;
  ThermalChannelOptions o;
  o.tolerance = 1e-8;
  o.points = 11;
  const ThermalChannel tc = thermal_channel(H, gm, sch, {t_f}, bath_at(12.0, 0.0), o);
  SimulationOptions so;
  so.propagation.tolerance = 1e-9;
  const AnnealPath path = sch.path_for(t_f);
  const AnnealResult closed = simulate_anneal(H, gm, sch.scales, path, initial_state(H, sch, path), so);
  REQUIRE(tc.runs.size() == 1);
  const ThermalRun& r = tc.runs[0];
  CHECK(r.open.ground_probability == doctest::Approx(closed.ground_probability).epsilon(1e-6));
  CHECK(closed.ground_probability < 0.99);  // a duration where the closed system does lose population
  CHECK(r.total_relaxations == 0.0);
  CHECK_FALSE(r.freeze_s.has_value());
  // The ground group's population at the end is p (A(1) = 0 on linear scales).
  CHECK(r.track.back().group_population == doctest::Approx(closed.ground_probability).epsilon(1e-6));
}
