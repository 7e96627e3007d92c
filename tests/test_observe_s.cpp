// Observations at chosen s (SimulationOptions::observe_s): recorded exactly at
// the requested s, on every passage of the path, and without disturbing the
// result. The split propagators take an off-grid observation as a side branch
// from the last grid point (split_operator_propagator.hpp), so the final state
// must be bit for bit the one of a run without it; that is a property of the
// design, checked here, not a physics fact.
#include <doctest/doctest.h>

#include <cmath>
#include <vector>

#include "dynamics/anneal_simulation.hpp"
#include "dynamics/level_population_observer.hpp"
#include "schedule/schedule.hpp"

using namespace gapwise;

namespace {
IsingProblem frustrated_four() {  // invented: a frustrated square with one diagonal and weak fields
  IsingProblem p(4);
  p.h = {0.1, -0.2, 0.05, 0.0};
  p.couplings = {{0, 1, 1.0}, {1, 2, 1.0}, {2, 3, 1.0}, {0, 3, 1.0}, {0, 2, -0.5}};
  return p;
}
}  // namespace

TEST_CASE("observations at chosen s are recorded there and leave p bit for bit unchanged") {
  const IsingProblem p = frustrated_four();
  const TransverseIsingHamiltonian H(p);
  const GroundManifold gm = find_ground_manifold(p, H.diagonal());
  const EnergyScales sc = EnergyScales::linear(5.0, 5.0);
  const AnnealPath path({{0.0, 0.0}, {3.0, 1.0}});
  const QuantumState psi0 = uniform_superposition(p.qubits);
  for (const char* prop : {"split4", "split2", "split4-yoshida"}) {
    INFO(prop);
    SimulationOptions plain;
    plain.propagator = prop;
    plain.samples_per_piece = 4;  // samples at s = 0.2, 0.4, 0.6, 0.8
    TraceObserver t0(H, gm);
    const AnnealResult r0 = simulate_anneal(H, gm, sc, path, psi0, plain, {&t0});
    SimulationOptions asked = plain;
    asked.observe_s = {0.3, 0.5, 0.62, 0.4};  // 0.4 coincides with a sample
    TraceObserver t1(H, gm);
    const AnnealResult r1 = simulate_anneal(H, gm, sc, path, psi0, asked, {&t1});
    CHECK(r1.ground_probability == r0.ground_probability);  // bit for bit
    CHECK(r1.final_state == r0.final_state);
    std::vector<double> got;
    for (const auto& row : t1.rows())
      if (row.requested) got.push_back(row.s);
    CHECK(got == std::vector<double>{0.3, 0.4, 0.5, 0.62});  // in path order, exactly as asked
    CHECK(t1.rows().size() == t0.rows().size() + 3);         // 0.4 merged with its sample
    for (const auto& row : t1.rows())
      if (row.requested) CHECK(row.t_ns == doctest::Approx(3.0 * row.s).epsilon(1e-12));  // s = t / 3 ns
  }
}

TEST_CASE("a reverse anneal passes a requested s twice; s off the path is refused") {
  const IsingProblem p = frustrated_four();
  const TransverseIsingHamiltonian H(p);
  const GroundManifold gm = find_ground_manifold(p, H.diagonal());
  // From s = 1 down to 0.4, a pause there, and back up (times in ns).
  const AnnealPath path({{0.0, 1.0}, {2.0, 0.4}, {3.0, 0.4}, {5.0, 1.0}});
  auto times = [&](double s) {
    std::vector<double> t = times_at_s(path, s);
    for (double& x : t) x = std::round(x * 1e9) / 1e9;  // ns, to 1e-9
    return t;
  };
  CHECK(times(0.7) == std::vector<double>{1.0, 4.0});
  CHECK(times(0.4) == std::vector<double>{2.0});  // the pause is observed at its start
  CHECK(times(1.0) == std::vector<double>{0.0, 5.0});
  CHECK(times(0.2).empty());
  SimulationOptions o;
  o.observe_s = {0.7};
  LevelPopulationOptions lo;
  lo.levels = 2;
  lo.requested_only = true;
  LevelPopulationObserver pops(H, lo);
  TraceObserver trace(H, gm);
  simulate_anneal(H, gm, EnergyScales::linear(5.0, 5.0), path, basis_state(p.qubits, gm.states.front()), o,
                  {&trace, &pops});
  REQUIRE(pops.rows().size() == 2);  // only the requested passages, both of them
  CHECK(pops.rows()[0].t_ns == doctest::Approx(1.0));
  CHECK(pops.rows()[1].t_ns == doctest::Approx(4.0));
  CHECK(pops.rows()[0].s == 0.7);
  o.observe_s = {0.2};
  CHECK_THROWS_AS(simulate_anneal(H, gm, EnergyScales::linear(5.0, 5.0), path, basis_state(p.qubits, 0), o, {&trace}),
                  std::invalid_argument);
}
