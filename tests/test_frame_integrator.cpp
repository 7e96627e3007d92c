// The frame propagator's interval step (src/dynamics/frame_propagator.cpp,
// oscillatory_step) and its oscillatory weights (src/frame/oscillatory_quadrature.*):
//  - the weights against a brute-force composite Simpson rule on a fine grid
//    (common practice for checking a quadrature), from slow to very fast phases;
//  - the order of convergence of the whole frame integration in the grid
//    spacing, against the full-space split propagator held to 1e-11 (the
//    project's reference, itself checked against Zener and Pfeuty elsewhere):
//    a Filon-type / modified Magnus step (Iserles, BIT 42, 561 (2002)) is
//    second order whether the phases between levels turn slowly or by many
//    radians per interval; the first-order step it replaced was not.
#include <doctest/doctest.h>

#include <cmath>
#include <complex>
#include <numbers>
#include <vector>

#include "dynamics/anneal_simulation.hpp"
#include "dynamics/frame_propagator.hpp"
#include "frame/instantaneous_frame.hpp"
#include "frame/oscillatory_quadrature.hpp"
#include "io/problem_file.hpp"
#include "io/schedule_file.hpp"
#include "test_support.hpp"

using namespace gapwise;

namespace {

std::pair<std::complex<double>, std::complex<double>> simpson_weights(const PhasePolynomial& d, int n) {
  std::complex<double> w0(0, 0), w1(0, 0);
  const double h = 1.0 / n;
  for (int i = 0; i <= n; ++i) {
    const double x = i * h;
    const double c = (i == 0 || i == n) ? 1.0 : (i % 2 ? 4.0 : 2.0);
    const std::complex<double> e = std::polar(1.0, d.at(x));
    w0 += c * (1.0 - x) * e;
    w1 += c * x * e;
  }
  return {w0 * h / 3.0, w1 * h / 3.0};
}

}  // namespace

TEST_CASE("Oscillatory weights match a fine Simpson rule, slow to very fast phases") {
  const std::vector<PhasePolynomial> cases = {
      {{0.0, 0.0, 0.0, 0.0, 0.0}},           // no phase: 1/2, 1/2
      {{0.3, 0.01, 0.0, 0.0, 0.0}},          // nearly constant
      {{0.0, 0.7, 0.2, -0.1, 0.05}},         // slow
      {{1.0, 40.0, 3.0, -2.0, 0.5}},         // several turns
      {{0.0, -2500.0, 150.0, 30.0, -12.0}},  // hundreds of turns, curved
      {{0.0, 30.0, -60.0, 0.0, 0.0}},        // stationary point at x = 1/4
  };
  for (const PhasePolynomial& d : cases) {
    const auto [w0, w1] = linear_oscillatory_weights(d);
    const auto [r0, r1] = simpson_weights(d, 400000);
    INFO("phase " << d.c[1] << " x + " << d.c[2] << " x^2 ...: w0 " << w0 << " vs " << r0 << ", w1 " << w1 << " vs "
                  << r1);
    CHECK(std::abs(w0 - r0) < 1e-8);  // the quadrature's stated accuracy at the default bound
    CHECK(std::abs(w1 - r1) < 1e-8);
  }
  const auto [z0, z1] = linear_oscillatory_weights(PhasePolynomial{});
  CHECK(std::abs(z0 - 0.5) < 1e-15);  // int_0^1 (1 - x) dx, exact
  CHECK(std::abs(z1 - 0.5) < 1e-15);
}

TEST_CASE("Frame integration is second order in the grid spacing, slow and fast phases") {
  // 3-qubit QUBO sample (fields, real couplings), linear scales; K = 8 keeps the
  // whole space, so only the grid errs. At 15 ns the phases turn slowly per
  // interval; at 400 ns by several radians per interval on the coarse grids.
  const auto dir = gapwise::testing::source_dir();
  const IsingProblem p = read_problem_file((dir / "data-samples/meeting-slots-qubo.toml").string());
  const TransverseIsingHamiltonian h(p);
  const SectorHamiltonian full(h, SpinFlipSector::Full);
  const GroundManifold gm = find_ground_manifold(p, h.diagonal());
  Schedule sch;
  for (double duration : {15.0, 40.0}) {
    const AnnealPath path = sch.path_for(duration);
    const QuantumState psi0 = initial_state(h, sch, path);
    SimulationOptions ref_opt;
    ref_opt.propagator = "split4";
    ref_opt.propagation.tolerance = 1e-11;
    const AnnealResult ref = simulate_anneal(h, gm, sch.scales, path, psi0, ref_opt);
    std::vector<double> points, errors;
    for (double rot : {0.8, 0.4, 0.2, 0.1}) {
      FrameOptions fo;
      fo.levels = 8;
      fo.ns_per_unit_s = duration;
      fo.max_rotation = rot;
      fo.max_phase_error = 1e9;  // the grid set by the turn of the frame alone
      const InstantaneousFrame fr(full, sch.scales, 0.0, 1.0, fo);
      const Eigen::Map<const Eigen::VectorXcd> x(psi0.data(), static_cast<Eigen::Index>(psi0.size()));
      const Eigen::VectorXcd c0 = fr.first_vectors_full().cast<Complex>().adjoint() * x;
      const Eigen::VectorXcd c1 = propagate_through_frame(fr, c0, duration);
      const Eigen::VectorXcd psi1 = fr.last_vectors_full().cast<Complex>() * c1;
      double pg = 0.0;
      for (std::size_t b : gm.states) pg += std::norm(psi1(static_cast<Eigen::Index>(b)));
      points.push_back(static_cast<double>(fr.points().size()));
      errors.push_back(std::abs(pg - ref.ground_probability));
      MESSAGE(duration << " ns, max turn " << rot << ": " << fr.points().size() << " points, |p - p_ref| = "
                       << errors.back());
    }
    // Observed order over a fourfold change of the turn per interval (turn 0.4
    // -> 0.1): log(e1/e2) / log(N2/N1). Between neighbouring grids the error is
    // not monotone where the phases turn by many radians per interval (the
    // second Magnus term is taken with linear phases, first order in their
    // curvature, with a small prefactor), so the order is read over the span.
    const std::size_t m = errors.size();
    const double order = std::log(errors[1] / errors[m - 1]) / std::log(points[m - 1] / points[1]);
    MESSAGE(duration << " ns: observed order " << order);
    CHECK(order > 1.7);
    CHECK(errors[m - 1] < 1e-7);
  }
}
