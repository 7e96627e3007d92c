// Shape generators (src/schedule/path_shapes.hpp): pauses, quenches, reverse
// anneals; their exact durations; refused shapes; and two facts of the physics
// they must respect.
#include <doctest/doctest.h>

#include <cmath>
#include <functional>
#include <numbers>

#include "dynamics/anneal_simulation.hpp"
#include "io/input_error.hpp"
#include "schedule/path_shapes.hpp"

using namespace gapwise;

namespace {

const AnnealPath kRamp({{0.0, 0.0}, {1.0, 1.0}});

std::string refused_key(const std::function<void()>& f) {
  try {
    f();
  } catch (const InputError& e) {
    CHECK(!e.fix().empty());
    return e.place().key;
  }
  return "(not refused)";
}

}  // namespace

TEST_CASE("a pause on the linear ramp at equal total duration") {
  // Common practice: the ramp keeps one rate and gives up the pause's time.
  const AnnealPath p = forward_shape(kRamp, {.pause = PauseSpec{0.45, 0.2}}, 1.0);
  REQUIRE(p.points().size() == 4);
  CHECK(p.points()[1].t_ns == doctest::Approx(0.36));
  CHECK(p.points()[1].s == 0.45);
  CHECK(p.points()[2].t_ns == doctest::Approx(0.56));
  CHECK(p.points()[2].s == 0.45);
  CHECK(p.duration_ns() == 1.0);
  CHECK(p.ds_dt_ns(0) == doctest::Approx(p.ds_dt_ns(2)));
}

TEST_CASE("pause then quench, and a quench alone") {
  const AnnealPath q = forward_shape(kRamp, {.pause = PauseSpec{0.6, 10.0}, .quench = QuenchSpec{0.6, 2.0}}, 100.0);
  // ramp 0 -> 0.6 in 100 - 10 - 2 = 88 ns, pause 10 ns, quench 2 ns.
  REQUIRE(q.points().size() == 4);
  CHECK(q.points()[1].t_ns == doctest::Approx(88.0));
  CHECK(q.points()[2].t_ns == doctest::Approx(98.0));
  CHECK(q.points()[3].t_ns == 100.0);
  CHECK(q.ds_dt_ns(2) == doctest::Approx(0.4 / 2.0));
  const AnnealPath only = forward_shape(kRamp, {.quench = QuenchSpec{0.3, 0.1}}, 1.0);
  REQUIRE(only.points().size() == 3);
  CHECK(only.points()[1].t_ns == doctest::Approx(0.9));
  CHECK(only.points()[1].s == doctest::Approx(0.3));
}

TEST_CASE("a pause inserted into a kinked base path lands where the base first reaches s") {
  const AnnealPath base({{0, 0}, {10, 0.2}, {20, 0.8}, {30, 1.0}});
  const AnnealPath p = insert_pause(base, 0.5, 7.0);
  CHECK(p.duration_ns() == 37.0);
  CHECK(p.s_at(15.0) == doctest::Approx(0.5));
  CHECK(p.s_at(22.0) == doctest::Approx(0.5));
  CHECK(p.s_at(27.0) == doctest::Approx(0.8));
  CHECK(p.s_at(5.0) == doctest::Approx(0.1));
}

TEST_CASE("reverse anneal waypoints") {
  const AnnealPath r = reverse_anneal_path({.turn_s = 0.55, .down = 5, .dwell = 10, .up = 5});
  REQUIRE(r.points().size() == 4);
  CHECK(r.points()[0].s == 1.0);
  CHECK(r.points()[1].s == 0.55);
  CHECK(r.points()[2].t_ns == 15.0);
  CHECK(r.duration_ns() == 20.0);
  CHECK(reverse_anneal_path({.turn_s = 0.3, .down = 2, .dwell = 0, .up = 3}).points().size() == 3);
}

TEST_CASE("shapes stretched to a duration end at exactly that duration") {
  // Equal-duration comparisons rest on this: every generated shape, stretched to
  // T, ends at T to round-off (in fact exactly). Common practice.
  const std::vector<AnnealPath> shapes{
      kRamp,
      forward_shape(kRamp, {.pause = PauseSpec{0.45, 0.2}}, 1.0),
      forward_shape(kRamp, {.pause = PauseSpec{0.3, 1.0 / 3.0}, .quench = QuenchSpec{0.7, 0.01}}, 1.0),
      forward_shape(kRamp, {.quench = QuenchSpec{0.61, 0.037}}, 1.0),
  };
  for (double T : {0.7, 3.0, 17.3, 123.456, 1e4 / 3.0}) {
    for (const auto& s : shapes) {
      const AnnealPath p = s.scaled_to(T);
      CHECK(p.duration_ns() == T);
      CHECK(p.points().front().t_ns == 0.0);
    }
    CHECK(forward_shape(kRamp, {.pause = PauseSpec{0.45, T / 7.0}}, T).duration_ns() == T);
  }
}

TEST_CASE("bad shapes are refused with the field named") {
  CHECK(refused_key([] { forward_shape(kRamp, {.pause = PauseSpec{1.2, 0.1}}, 1.0); }) == "pause.s");
  CHECK(refused_key([] { forward_shape(kRamp, {.pause = PauseSpec{-0.1, 0.1}}, 1.0); }) == "pause.s");
  CHECK(refused_key([] { forward_shape(kRamp, {.pause = PauseSpec{0.5, -0.1}}, 1.0); }) == "pause.duration");
  CHECK(refused_key([] { forward_shape(kRamp, {.pause = PauseSpec{0.5, 1.0}}, 1.0); }) == "pause.duration");
  CHECK(refused_key([] { forward_shape(kRamp, {.quench = QuenchSpec{0.5, 0.0}}, 1.0); }) == "quench.duration");
  CHECK(refused_key([] { forward_shape(kRamp, {.quench = QuenchSpec{1.0, 0.1}}, 1.0); }) == "quench.s");
  CHECK(refused_key([] { forward_shape(kRamp, {.pause = PauseSpec{0.7, 0.1}, .quench = QuenchSpec{0.5, 0.1}}, 1.0); }) ==
        "pause.s");
  CHECK(refused_key([] { reverse_anneal_path({.turn_s = 0.5, .down = 1, .dwell = -1, .up = 1}); }) == "reverse.dwell");
  CHECK(refused_key([] { reverse_anneal_path({.turn_s = 1.5, .down = 1, .dwell = 1, .up = 1}); }) == "reverse.turn_s");
  CHECK(refused_key([] { reverse_anneal_path({.turn_s = 0.5, .down = 0, .dwell = 1, .up = 1}); }) == "reverse.down");
  CHECK(refused_key([] { insert_pause(AnnealPath({{0, 0}, {1, 0.5}}), 0.8, 0.1); }) == "pause.s");
  // Durations so unequal that their sum rounds back (found by fuzzing the schedule
  // parser): refused as input, never a bare invalid_argument from AnnealPath.
  CHECK(refused_key([] { reverse_anneal_path({.turn_s = 0.6, .down = 4, .dwell = 1e308, .up = 4}); }) ==
        "reverse.dwell");
  CHECK(refused_key([] { reverse_anneal_path({.turn_s = 0.6, .down = 4, .dwell = 1e-20, .up = 4}); }) ==
        "reverse.dwell");
  CHECK(refused_key([] { reverse_anneal_path({.turn_s = 0.6, .down = 4, .dwell = 0, .up = 1e-20}); }) == "reverse.up");
  CHECK(refused_key([] { forward_shape(kRamp, {.quench = QuenchSpec{0.5, 1e-300}}, 1.0); }) == "quench.duration");
  CHECK(refused_key([] { forward_shape(kRamp, {.pause = PauseSpec{0.5, 1e-300}}, 1.0); }) == "pause.duration");
  CHECK(refused_key([] { path_from_shape({.forward = {.quench = QuenchSpec{0.5, 0.01}}}, 1e-310); }) ==
        "quench.duration");
}

namespace {

// Energy scales with the transverse term switched off for s >= 0.7 (linear
// interpolation, so A is exactly 0 there).
EnergyScales scales_with_a_off() {
  return EnergyScales::table({0.0, 0.7, 1.0}, {4.0, 0.0, 0.0}, {0.5, 3.0, 5.0}, ScaleInterpolation::Linear);
}

IsingProblem three_qubits() {
  IsingProblem p(3);
  p.h = {0.3, -0.1, 0.05};
  p.couplings = {{0, 1, 1.0}, {1, 2, 1.0}, {0, 2, 1.0}};
  return p;
}

}  // namespace

TEST_CASE("a pause where A = 0 changes only phases: p and every |amplitude| unchanged to round-off") {
  // Common practice (elementary quantum mechanics): with A = 0 the Hamiltonian is
  // diagonal in the computational basis, so evolving under it multiplies each
  // amplitude by exp(-i 2 pi (B/2) D_b t) and changes no probability.
  const IsingProblem prob = three_qubits();
  const TransverseIsingHamiltonian H(prob);
  const GroundManifold gm = find_ground_manifold(prob, H.diagonal());
  const EnergyScales sc = scales_with_a_off();
  SimulationOptions sim;
  sim.propagation.tolerance = 1e-8;
  const AnnealPath up_to({{0.0, 0.0}, {6.0, 0.8}});
  const AnnealPath paused({{0.0, 0.0}, {6.0, 0.8}, {9.5, 0.8}});
  const QuantumState psi0 = uniform_superposition(3);
  const AnnealResult a = simulate_anneal(H, gm, sc, up_to, psi0, sim);
  const AnnealResult b = simulate_anneal(H, gm, sc, paused, psi0, sim);
  // The pause is exactly the diagonal phase, with the 2 pi of the units.
  const double w = -2.0 * std::numbers::pi * 0.5 * sc.b_ghz(0.8) * 3.5;
  for (std::size_t k = 0; k < H.dim(); ++k) {
    const Complex expect = a.final_state[k] * std::polar(1.0, w * H.diagonal()[k]);
    CHECK(std::abs(b.final_state[k] - expect) < 1e-14);
    CHECK(std::abs(std::norm(b.final_state[k]) - std::norm(a.final_state[k])) < 1e-15);
  }
  // In the middle of a full forward anneal: p at the end is unchanged.
  const AnnealPath ramp({{0.0, 0.0}, {8.0, 1.0}});
  const AnnealPath with = insert_pause(ramp, 0.85, 5.0);
  const AnnealResult c = simulate_anneal(H, gm, sc, ramp, psi0, sim);
  const AnnealResult d = simulate_anneal(H, gm, sc, with, psi0, sim);
  CHECK(c.ground_probability > 0.05);
  CHECK(c.ground_probability < 0.999);
  // The two runs take different step grids (the pause adds a waypoint), each
  // accurate to the tolerance, so they agree to the tolerance, not to round-off.
  CHECK(std::abs(c.ground_probability - d.ground_probability) < sim.propagation.tolerance);
  // Control: the same pause where A > 0 does change p (so the check above can fail).
  const AnnealResult e = simulate_anneal(H, gm, sc, insert_pause(ramp, 0.35, 5.0), psi0, sim);
  CHECK(std::abs(c.ground_probability - e.ground_probability) > 1e-3);
}

TEST_CASE("a reverse anneal whose turn point is s = 1 returns the start state exactly") {
  // Common practice: with A(1) = 0 (linear scales) H(1) is diagonal, a basis
  // state is an eigenstate, and staying at s = 1 only adds a phase.
  const IsingProblem prob = three_qubits();
  const TransverseIsingHamiltonian H(prob);
  const GroundManifold gm = find_ground_manifold(prob, H.diagonal());
  const EnergyScales sc = EnergyScales::linear(5.0, 5.0);
  SimulationOptions sim;
  for (BasisIndex start : {BasisIndex{0b011}, BasisIndex{0b110}}) {
    const AnnealPath r = reverse_anneal_path({.turn_s = 1.0, .down = 5, .dwell = 10, .up = 5});
    const AnnealResult res = simulate_anneal(H, gm, sc, r, basis_state(3, start), sim);
    CHECK(std::norm(res.final_state[start]) == doctest::Approx(1.0).epsilon(1e-15));
    // Control: turning at s = 0.4 moves the state away from the start.
    const AnnealPath deep = reverse_anneal_path({.turn_s = 0.4, .down = 5, .dwell = 10, .up = 5});
    CHECK(std::norm(simulate_anneal(H, gm, sc, deep, basis_state(3, start), sim).final_state[start]) < 0.99);
  }
}
