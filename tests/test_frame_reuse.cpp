// ctest-labels: slow
// Frame reuse across durations (src/frame/frame_point_cache.*): the
// instantaneous eigenpairs along s do not depend on the duration, so anneals of
// one problem and schedule share them. The answer must not depend on it: p from
// a frame built on shared, stored points must equal p from a fresh frame per
// duration within the tolerance asked (1e-6), on a problem with fields, and the
// shared run must really have taken stored points (fewer solves).
// The reference for p itself is the full-space split propagator ten times
// tighter (the project's own reference; test_adiabatic_frame compares them at
// more sizes), checked here too so the shared run cannot agree by a common error.
#include <doctest/doctest.h>

#include <cmath>
#include <memory>

#include "dynamics/anneal_simulation.hpp"
#include "frame/frame_point_cache.hpp"
#include "io/problem_file.hpp"
#include "io/schedule_file.hpp"
#include "problem/classical_spectrum.hpp"
#include "studies/duration_sweep.hpp"
#include "test_support.hpp"

using namespace gapwise;

TEST_CASE("A frame built on stored points gives the p of a fresh frame, per duration (ring with fields)") {
  constexpr double kTol = 1e-6;
  const auto dir = gapwise::testing::source_dir();
  const IsingProblem p = read_problem_file((dir / "data-samples/weak-field-ring.toml").string());
  REQUIRE(p.has_fields());
  const Schedule sch = read_schedule_file((dir / "schedules/linear.toml").string());
  const TransverseIsingHamiltonian h(p);
  const GroundManifold gm = find_ground_manifold(p, h.diagonal());
  SimulationOptions fresh;
  fresh.propagator = "frame";
  fresh.propagation.tolerance = kTol;
  SimulationOptions shared = fresh;
  shared.propagation.frame_cache = std::make_shared<FramePointCache>();
  SimulationOptions ref;
  ref.propagator = "split4";
  ref.propagation.tolerance = kTol / 10;
  long fresh_solves = 0, shared_solves = 0, shared_reused = 0;
  // Longest first, as the duration study runs them: the shorter durations take
  // the longer one's finer grid; then a longer one refines the stored grid.
  for (double t : {4000.0, 2000.0, 1000.0, 8000.0}) {
    const AnnealPath path = sch.path_for(t);
    const QuantumState psi0 = initial_state(h, sch, path);
    const AnnealResult a = simulate_anneal(h, gm, sch.scales, path, psi0, fresh);
    const AnnealResult b = simulate_anneal(h, gm, sch.scales, path, psi0, shared);
    MESSAGE(t << " ns: p fresh " << a.ground_probability << " (" << a.stats.frame_eigen_solves << " solves), shared "
              << b.ground_probability << " (" << b.stats.frame_eigen_solves << " solves, "
              << b.stats.frame_reused_points << " stored points), H products " << b.stats.hamiltonian_applications);
    CHECK(std::abs(a.ground_probability - b.ground_probability) <= kTol);
    CHECK(b.stats.frame_fallback_pieces == 0);
    CHECK(b.stats.hamiltonian_applications > 0);  // the frame's eigen-solves are counted
    fresh_solves += a.stats.frame_eigen_solves;
    shared_solves += b.stats.frame_eigen_solves;
    shared_reused += b.stats.frame_reused_points;
    if (t == 1000.0) {
      const AnnealResult r = simulate_anneal(h, gm, sch.scales, path, psi0, ref);
      CHECK(std::abs(b.ground_probability - r.ground_probability) <= kTol);
    }
  }
  CHECK(shared_reused > 0);
  CHECK(shared_solves < fresh_solves);
  const FrameCacheStats cs = shared.propagation.frame_cache->stats();
  CHECK(cs.reused == shared_reused);
  CHECK(cs.bytes > 0.0);
}

TEST_CASE("A duration setup shares one store of eigenpairs among its anneals") {
  const auto dir = gapwise::testing::source_dir();
  const IsingProblem p = read_problem_file((dir / "data-samples/weak-field-ring.toml").string());
  const Schedule sch = read_schedule_file((dir / "schedules/linear.toml").string());
  SimulationOptions o;
  o.propagator = "frame";
  AnnealSetup setup(p, sch, o);
  REQUIRE(setup.options.propagation.frame_cache);
  const DurationPoint a = anneal_for_duration(setup, 3000.0);
  const long after_first = setup.options.propagation.frame_cache->stats().reused;
  const DurationPoint b = anneal_for_duration(setup, 1500.0);
  CHECK(setup.options.propagation.frame_cache->stats().reused > after_first);
  CHECK(a.hamiltonian_applications > 0);
  CHECK(b.ground_probability > 0.0);
}
