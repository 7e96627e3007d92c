// The work estimate that refuses runs which would never finish
// (studies/work_estimate.hpp), checked against what the split propagator
// really does: its accepted-step count on problems users run (fields,
// real-valued couplings, a QUBO-derived one), and the limit itself.
#include <doctest/doctest.h>

#include "dynamics/anneal_simulation.hpp"
#include "io/problem_file.hpp"
#include "io/schedule_file.hpp"
#include "studies/work_estimate.hpp"
#include "test_support.hpp"

using namespace gapwise;

TEST_CASE("estimated time steps are within a few times the split propagator's real steps") {
  const auto dir = testing::source_dir();
  const Schedule sch = read_schedule_file((dir / "schedules/linear.toml").string());
  // triangle: fields and couplings; weak-field-ring: small fields; meeting-slots: from a QUBO.
  for (const char* name : {"triangle.toml", "weak-field-ring.toml", "meeting-slots-qubo.toml"}) {
    const IsingProblem p = read_problem_file((dir / "data-samples" / name).string());
    const TransverseIsingHamiltonian H(p);
    const GroundManifold gm = find_ground_manifold(p, H.diagonal());
    const AnnealPath path = sch.path_for(200.0);
    SimulationOptions sim;  // split4, tolerance 1e-6: what the constants were measured with
    sim.top_outcomes = 0;
    const AnnealResult r = simulate_anneal(H, gm, sch.scales, path, initial_state(H, sch, path), sim);
    const double estimated = anneal_work(p, sch.scales, 200.0).time_steps;
    INFO(std::string(name) << ": " << r.stats.steps << " steps, estimated " << estimated);
    // The header promises an order of magnitude (low by a few times when the grid is halved more often).
    CHECK(estimated > static_cast<double>(r.stats.steps) / 8.0);
    CHECK(estimated < static_cast<double>(r.stats.steps) * 8.0);
  }
}

TEST_CASE("the steps grow with the largest energy times the duration; the limit refuses and --allow-long lifts it") {
  IsingProblem p(3);
  p.couplings = {{0, 1, 1.0}, {1, 2, 1.0}, {0, 2, 1.0}};
  const EnergyScales sc = EnergyScales::linear(5.0, 5.0);
  // B_max x 2 (|h| + sum |J|) + 2 A_max = 5 x 4 + 10 GHz, as in split_operator_propagator.cpp.
  CHECK(propagation_rate_ghz(p, sc) == doctest::Approx(30.0));
  const double base = anneal_work(p, sc, 100.0).time_steps;
  CHECK(anneal_work(p, sc, 1000.0).time_steps == doctest::Approx(10 * base));
  p.h[0] = 1e6;  // a huge field: steps scale with it
  CHECK(anneal_work(p, sc, 100.0).time_steps > 1e5 * base);

  const WorkEstimate w = anneal_work(p, sc, 1e4);
  REQUIRE(w.operations > kWorkLimitOperations);
  const auto e = testing::input_error_of([&] { check_work_limit(w, false, {"--durations", 0, 0, "--durations"}); });
  REQUIRE(e.has_value());
  CHECK(e->problem().find("time steps") != std::string::npos);
  CHECK(e->fix().find("--allow-long") != std::string::npos);
  CHECK_NOTHROW(check_work_limit(w, true, {}));
  CHECK_NOTHROW(check_work_limit(anneal_work(p, sc, 1e-3), false, {}));
}
