// The Landau-Zener prediction of the anneal-time study (two-level fit at the
// minimum gap, converted with the path's ds/dt) against the simulation, for an
// isolated avoided crossing that sharpens. Reference: Zener, Proc. R. Soc. A 137,
// 696 (1932): for H = -(Delta/2) sigma^x + (eps(t)/2) sigma^z with eps swept at
// rate v through zero, the diabatic probability is exp(-pi^2 Delta^2 / v) in
// our units (GHz, ns, d psi/dt = -i 2 pi H psi). Finite sweeps from -W to +W
// differ by corrections that vanish as Delta/W -> 0 (Vitanov and Garraway, PRA
// 53, 4288 (1996)); read out in the computational basis they are of order
// Delta/(2W) (mixing angle at the end of the sweep).
#include <cmath>
#include <numbers>

#include <doctest/doctest.h>
#include <fmt/format.h>

#include "studies/anneal_predictions.hpp"
#include "studies/duration_sweep.hpp"

using namespace gapwise;

namespace {

// One qubit with h = 1: A(s) = Delta, B(s) = W (2 s - 1), so the gap is
// sqrt(Delta^2 + W^2 (2 s - 1)^2): s* = 1/2, slope difference alpha = 2 W per unit s.
// A falls to 0 over the last 10 % (where B >= 0.8 W >> Delta, adiabatically), so
// the final ground state is the computational state and p carries no read-out
// term; what remains of the finite sweep shrinks as Delta/W does.
AnnealSetup crossing(double delta, double w, std::vector<Waypoint> shape) {
  IsingProblem p(1);
  p.h = {1.0};
  Schedule sch;
  sch.scales = EnergyScales::table({0.0, 0.9, 1.0}, {delta, delta, 0.0}, {-w, 0.8 * w, w}, ScaleInterpolation::Linear);
  sch.shape = AnnealPath(std::move(shape));
  SimulationOptions o;
  o.propagation.tolerance = 1e-8;
  return AnnealSetup(p, sch, o);
}

// |p_sim - p_LZ| at the duration where Landau-Zener predicts p = 1/2.
double deviation(double delta, double w, const std::vector<Waypoint>& shape, double expected_rate) {
  const AnnealSetup setup = crossing(delta, w, shape);
  const AnnealPredictions pr = predict_anneal(setup);
  REQUIRE(pr.lz.applicable);
  CHECK(pr.lz.s_star == doctest::Approx(0.5).epsilon(1e-6));
  CHECK(pr.lz.gap_ghz == doctest::Approx(delta).epsilon(1e-6));
  // Exact hyperbola while A is constant; the fit window reaches the taper at s = 0.9 only for Delta/W = 0.1.
  CHECK(pr.lz.slope_difference_ghz == doctest::Approx(2.0 * w).epsilon(1e-4));
  CHECK(pr.lz.fit_deviation < 1e-4);
  CHECK(pr.lz.path_rate == doctest::Approx(expected_rate).epsilon(1e-12));
  // The asymptotic slopes of the two levels: -+ W on the left, +- W on the right (h = 1, dB/ds = 2 W, levels +-B/2).
  CHECK(std::abs(pr.lz.upper_slope_left - pr.lz.lower_slope_left) == doctest::Approx(2.0 * w).epsilon(0.02));
  const double tf = pr.lz.duration_for(0.5);
  // Zener's formula in closed form with the fitted slope: v = alpha r / t_f, 1 - exp(-pi^2 Delta^2 / v) = 1/2.
  const double v = pr.lz.slope_difference_ghz * expected_rate / tf;
  CHECK(std::exp(-std::numbers::pi * std::numbers::pi * delta * delta / v) == doctest::Approx(0.5).epsilon(1e-9));
  CHECK(pr.lz.p_at(tf) == doctest::Approx(0.5).epsilon(1e-12));
  const double p_sim = anneal_for_duration(setup, tf).ground_probability;
  const double dev = std::abs(p_sim - 0.5);
  MESSAGE(fmt::format("Delta/W = {:.3g}, rate {:.3g}: t_f = {:.4g} ns, p_sim = {:.6f}, p_LZ = 0.5, |dp| = {:.2e}",
                      delta / w, expected_rate, tf, p_sim, dev));
  return dev;
}

}  // namespace

TEST_CASE("Landau-Zener prediction converges to the simulation as the crossing sharpens (linear path)") {
  const std::vector<Waypoint> linear{{0.0, 0.0}, {1.0, 1.0}};
  const double w = 10.0;
  const double d1 = deviation(1.0, w, linear, 1.0);
  const double d2 = deviation(0.3, w, linear, 1.0);
  const double d3 = deviation(0.1, w, linear, 1.0);
  CHECK(d2 < d1);
  CHECK(d3 < d2);
  // What is left at Delta/W = 0.01 is the end-point correction, of order Delta v / (2 pi W^3) ~ 2e-6 here.
  CHECK(d3 < 2e-5);
}

TEST_CASE("the path's ds/dt at s* converts the fit: a slow stretch through the crossing") {
  // s goes 0 -> 0.4 in 30 % of the time, 0.4 -> 0.6 in 40 %, the rest in 30 %: r = 0.2/0.4 at s* = 1/2.
  const std::vector<Waypoint> slow{{0.0, 0.0}, {0.3, 0.4}, {0.7, 0.6}, {1.0, 1.0}};
  const double w = 10.0;
  const double d1 = deviation(0.3, w, slow, 0.5);
  const double d2 = deviation(0.1, w, slow, 0.5);
  CHECK(d2 < d1);
  CHECK(d2 < 2e-3);  // the kinks of the path 10 widths away still show
}

TEST_CASE("predictions refuse what they do not model") {
  // A pause at s*: no finite sweep rate through the crossing.
  const AnnealSetup paused = crossing(0.3, 10.0, {{0.0, 0.0}, {0.4, 0.5}, {0.6, 0.5}, {1.0, 1.0}});
  const AnnealPredictions pr = predict_anneal(paused);
  CHECK_FALSE(pr.lz.applicable);
  CHECK(pr.lz.why_not.find("pauses") != std::string::npos);
  // Agreement ranges: contiguous stretches of the grid within the tolerance.
  const auto r = agreement_ranges({1, 2, 3, 4, 5}, {0.1, 0.5, 0.52, 0.9, 0.95}, {0.5, 0.5, 0.5, 0.5, 0.95}, 0.03);
  REQUIRE(r.size() == 2);
  CHECK(r[0].from_ns == 2);
  CHECK(r[0].to_ns == 3);
  CHECK(r[1].from_ns == 5);
}
