// Anneals of (almost) zero duration: the sudden limit, never a crash.
// A run shorter than the split propagators' time resolution (about 1e-12 ns)
// once left them with no piece to step and indexed an empty list (segfault in
// every split-propagator command). The answer is the sudden limit: the state
// has no time to change, so p is the weight of the start state on the ground
// manifold, g / 2^n for a forward anneal from |+>^n (sudden approximation,
// A. Messiah, Quantum Mechanics vol. II (North-Holland 1962), ch. XVII; from
// memory), and 0 or 1 for a classical start. Durations too short to keep a
// path's waypoints apart in double precision are refused (exit 2).
#include <doctest/doctest.h>

#include <cmath>
#include <string>
#include <vector>

#include "dynamics/propagator.hpp"
#include "io/input_error.hpp"
#include "io/problem_file.hpp"
#include "io/schedule_file.hpp"
#include "studies/duration_sweep.hpp"
#include "test_support.hpp"

using namespace gapwise;
using testing::TempDir;

namespace {

std::string sample(const std::string& rel) { return (testing::source_dir() / rel).string(); }

}  // namespace

TEST_CASE("every propagator gives the sudden limit g/2^n for durations at and below 1e-12 ns") {
  // Problems users run: fields with real couplings, and a QUBO-derived one.
  for (const std::string problem : {"data-samples/weak-field-ring.toml", "data-samples/meeting-slots-qubo.toml",
                                    "data-samples/triangle.toml"}) {
    const IsingProblem p = read_problem_file(sample(problem));
    for (const std::string& prop : propagator_names()) {
      INFO(problem << ", " << prop);
      SimulationOptions sim;
      sim.propagator = prop;
      const AnnealSetup setup(p, read_schedule_file(sample("schedules/linear.toml")), sim);
      const double sudden = static_cast<double>(setup.ground.degeneracy()) / std::ldexp(1.0, p.qubits);
      const auto pts = sweep_durations(setup, {5e-324, 1e-300, 1e-13, 1e-12, 2e-12});
      REQUIRE(pts.size() == 5);
      for (const auto& pt : pts) {
        INFO("duration " << pt.duration_ns << " ns");
        CHECK(pt.ground_probability == doctest::Approx(sudden).epsilon(1e-9));
      }
      // Continuity: a short but resolved run (1e-6 ns; p - g/2^n is of order
      // (E t)^2 ~ 1e-9 here) agrees with the limit.
      CHECK(std::abs(sweep_durations(setup, {1e-6}).front().ground_probability - sudden) < 1e-6);
    }
  }
}

TEST_CASE("a reverse anneal of almost zero duration ends in its classical start state") {
  const IsingProblem p = read_problem_file(sample("data-samples/triangle.toml"));
  const AnnealSetup setup(p, read_schedule_file(sample("schedules/reverse.toml")), SimulationOptions{});
  const bool start_is_ground = setup.ground.contains(start_basis_state(setup.schedule, p.qubits));
  const auto pts = sweep_durations(setup, {1e-13, 1e-300});
  for (const auto& pt : pts) CHECK(pt.ground_probability == doctest::Approx(start_is_ground ? 1.0 : 0.0));
}

TEST_CASE("a duration too short to hold the waypoints apart is refused with the schedule named") {
  const Schedule s = read_schedule_file(sample("schedules/pause.toml"));  // 4 waypoints
  try {
    (void)s.path_for(5e-324);
    FAIL("accepted");
  } catch (const InputError& e) {
    CHECK(e.place().file == s.source);
    CHECK(e.place().key == "duration_ns");
    CHECK(std::string(e.what()).find("cannot hold the path's 4 waypoints apart") != std::string::npos);
  }
  CHECK(s.path_for(1e-13).points().size() == 4);  // representable: kept (the sudden limit when run)
}

TEST_CASE("every duration-taking command answers a 1e-13 ns run with the sudden limit") {
  TempDir dir;
  const std::string tri = "'" + sample("data-samples/triangle.toml") + "' ";
  const std::string lin = "'" + sample("schedules/linear.toml") + "' ";
  const std::string pause = "'" + sample("schedules/pause.toml") + "' ";
  const std::string rev = "'" + sample("schedules/reverse.toml") + "' ";
  const std::string out = " --out '" + (dir.path / "r").string();
  const std::vector<std::string> commands = {
      "anneal " + tri + lin + "-d 1e-13 --json",
      "anneal " + tri + pause + "-d 1e-13 --json",
      "anneal " + tri + lin + "-d 1e-13 --propagator split2 --json",
      "durations " + tri + lin + "--durations 1e-14,1e-13 --json" + out + "d.h5'",
      "pause-map " + tri + lin + "-d 1e-13 --at 0.5 --pause-ns 0,1e-14 --json" + out + "p.h5'",
      "reverse-map " + tri + rev + "--turn 0.5 --dwell-ns 0,1e-14 --ramp-ns 1e-13" + out + "r.h5'",
      "compare-paths " + tri + lin + pause + "-d 1e-13" + out + "c.h5'",
      "diagnose " + tri + lin + "-d 1e-13" + out + "g.h5'",
      "embed-cost " + tri + "'" + sample("data-samples/triangle-ring-embedding.toml") + "' " + lin +
          "--search-durations log:1e-14:1e-13:2 -d 1e-13",
      "ensemble '" + sample("data-samples/ring-chords-glasses") + "' " + lin + "-d 1e-14,1e-13 --quiet" + out + "e.h5'",
  };
  for (const auto& c : commands) {
    INFO("gapwise " << c);
    const auto r = testing::run_gapwise(c, dir);
    INFO(r.err);
    CHECK(r.exit_code == 0);  // a crash is -1 (signal)
  }
  // The number itself: the triangle has one ground state among 8.
  const auto r = testing::run_gapwise("anneal " + tri + lin + "-d 1e-13 --json", dir);
  const std::string key = "\"ground_probability\" : ";
  const auto at = r.out.find(key);
  REQUIRE(at != std::string::npos);
  CHECK(std::stod(r.out.substr(at + key.size())) == doctest::Approx(0.125).epsilon(1e-12));
}

TEST_CASE("too short to represent: the library names the schedule and the key; the command line refuses it first") {
  // A subnormal duration (5e-324 ns) cannot keep the path's 4 waypoints apart.
  const Schedule pause = read_schedule_file(sample("schedules/pause.toml"));
  const auto e = testing::input_error_of([&] { (void)pause.path_for(5e-324); });
  REQUIRE(e.has_value());
  CHECK(std::string(e->what()).find("pause.toml: key 'duration_ns': a duration of 5e-324 ns cannot hold") != std::string::npos);
  // On the command line such a number is below the smallest duration gapwise accepts (exit 2, naming the option).
  TempDir dir;
  const auto r = testing::run_gapwise(
      "anneal '" + sample("data-samples/triangle.toml") + "' '" + sample("schedules/pause.toml") + "' -d 5e-324", dir);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("--durations: 5e-324 ns is below the smallest duration gapwise accepts") != std::string::npos);
}
