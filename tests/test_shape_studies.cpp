// Shape studies (src/studies/shape_comparison.hpp, src/studies/shape_maps.hpp):
// equal durations, thread-count independence, resume, and the exact facts each
// map must reproduce.
#include <doctest/doctest.h>

#include <filesystem>

#include "io/input_error.hpp"
#include "studies/shape_comparison.hpp"
#include "studies/shape_maps.hpp"
#include "test_support.hpp"

using namespace gapwise;

namespace {

IsingProblem triangle() {
  IsingProblem p(3);
  p.h = {0.3, -0.1, 0.05};
  p.couplings = {{0, 1, 1.0}, {1, 2, 1.0}, {0, 2, 1.0}};
  return p;
}

Schedule linear_schedule() {
  Schedule s;
  s.duration_ns = 4.0;
  return s;
}

Schedule paused(double at, double fraction) {
  Schedule s = linear_schedule();
  s.shape = forward_shape(s.shape, {.pause = PauseSpec{at, fraction}}, 1.0);
  return s;
}

}  // namespace

TEST_CASE("equal-duration comparison: every path ends at the requested duration, at any thread count") {
  // Common practice: a comparison at equal cost must run every path for the same
  // time; the end times are checked to round-off (here: exactly).
  const std::vector<ShapeCandidate> c{{"linear", linear_schedule()},
                                      {"pause", paused(0.45, 0.2)},
                                      {"quench", [] {
                                         Schedule s = linear_schedule();
                                         s.shape = forward_shape(s.shape, {.quench = QuenchSpec{0.6, 0.05}}, 1.0);
                                         return s;
                                       }()}};
  ShapeComparisonOptions o;
  o.durations_ns = {1.7, 3.0, 6.1};
  o.levels = 3;
  o.population_points = 12;
  o.threads = 1;
  const ShapeComparison serial = compare_shapes(triangle(), c, o);
  o.threads = 2;
  const ShapeComparison threaded = compare_shapes(triangle(), c, o);
  REQUIRE(serial.runs.size() == 9);
  for (std::size_t k = 0; k < serial.runs.size(); ++k) {
    const ShapeRun &a = serial.runs[k], &b = threaded.runs[k];
    CHECK(a.end_time_ns == a.duration_ns);
    CHECK(a.ground_probability == b.ground_probability);  // bit for bit
    CHECK(a.populations.size() == b.populations.size());
    // TTS uses the run's own duration (Ronnow et al., Science 345, 420 (2014)).
    CHECK(a.tts.tts_ns == doctest::Approx(time_to_solution(a.end_time_ns, a.ground_probability).tts_ns));
    // With A(1) = 0 the final instantaneous ground level is the classical ground state.
    CHECK(a.populations.back().levels.populations[0] == doctest::Approx(a.ground_probability).epsilon(1e-9));
    CHECK(a.populations.size() >= 10);  // "about" population_points (12) observations
  }
  // The paths differ, so their p differ (the comparison is not comparing one path thrice).
  CHECK(serial.at(0, 1).ground_probability != serial.at(1, 1).ground_probability);
  // Other energy scales are refused: that compares hardware, not paths.
  Schedule other = linear_schedule();
  other.scales = EnergyScales::linear(5.0, 6.0);
  CHECK_THROWS_AS(compare_shapes(triangle(), {{"a", linear_schedule()}, {"b", other}}, o), InputError);
}

TEST_CASE("pause map: equal cost, reference column, thread independence and resume") {
  SimulationOptions sim;
  const AnnealSetup setup(triangle(), linear_schedule(), sim);
  PauseMapOptions o;
  o.pause_s = {0.3, 0.6, 0.9};
  o.pause_ns = {0.0, 0.5, 1.5};
  o.duration_ns = 4.0;
  o.threads = 1;
  const PauseMap serial = pause_map(setup, o);
  // Every run takes T under EqualTotal; the d = 0 column is the unpaused path.
  for (std::size_t i = 0; i < 3; ++i)
    for (std::size_t j = 0; j < 3; ++j) CHECK(serial.at(i, j).total_ns == 4.0);
  const double p_plain = simulate_anneal(setup.hamiltonian, setup.ground, setup.schedule.scales,
                                         setup.schedule.path_for(4.0), setup.start, sim).ground_probability;
  CHECK(serial.reference[1].ground_probability == p_plain);
  for (std::size_t i = 0; i < 3; ++i) CHECK(serial.at(i, 0).ground_probability == p_plain);
  CHECK(serial.at(1, 2).ground_probability != p_plain);
  CHECK(serial.simulated == 7);  // 6 paused points + one shared reference

  o.threads = 2;
  const PauseMap threaded = pause_map(setup, o);
  for (std::size_t k = 0; k < 9; ++k) CHECK(threaded.points[k].ground_probability == serial.points[k].ground_probability);

  // Resume (common practice for long studies): a run over part of the grid, then
  // the full grid with the same journal, gives the uninterrupted results.
  const testing::TempDir dir;
  const std::string jpath = (dir.path / "map.h5.journal").string();
  {
    ResultJournal j(jpath, pause_map_journal_layout(), "fp");
    PauseMapOptions part = o;
    part.pause_s = {0.6};
    const PauseMap first = pause_map(setup, part, &j);
    CHECK(first.simulated == 3);
  }
  ResultJournal j(jpath, pause_map_journal_layout(), "fp");
  CHECK(j.resumed() == 3);
  const PauseMap resumed = pause_map(setup, o, &j);
  CHECK(resumed.resumed == 3);
  CHECK(resumed.simulated == 4);
  for (std::size_t k = 0; k < 9; ++k) CHECK(resumed.points[k].ground_probability == serial.points[k].ground_probability);

  // AddedTime: the run takes T + pause; the reference is stretched to match.
  o.cost = PauseCost::AddedTime;
  const PauseMap added = pause_map(setup, o);
  CHECK(added.at(2, 2).total_ns == 5.5);
  CHECK(added.reference[2].total_ns == 5.5);
  // A pause as long as the whole run is refused, naming the option.
  o.cost = PauseCost::EqualTotal;
  o.pause_ns = {4.0};
  try {
    pause_map(setup, o);
    FAIL("not refused");
  } catch (const InputError& e) {
    CHECK(e.place().key.find("--pause-ns") == 0);
  }
}

TEST_CASE("reverse map: a turn at s = 1 returns the start state exactly; deeper turns do not") {
  // Common practice: with A(1) = 0 a basis state is an eigenstate of H(1).
  Schedule s = linear_schedule();
  s.start = {StartKind::Classical, {0, 1, 1}};
  s.shape = reverse_anneal_path({.turn_s = 0.5, .down = 0.4, .dwell = 0.2, .up = 0.4});
  SimulationOptions sim;
  const AnnealSetup setup(triangle(), s, sim);
  ReverseMapOptions o;
  o.turn_s = {0.35, 1.0};
  o.dwell_ns = {0.0, 3.0};
  o.ramp_ns = 2.0;
  const ReverseMap m = reverse_map(setup, o);
  CHECK(m.start_state == 0b110);
  CHECK(m.at(1, 0).start_probability == doctest::Approx(1.0).epsilon(1e-15));
  CHECK(m.at(1, 1).start_probability == doctest::Approx(1.0).epsilon(1e-15));
  CHECK(m.at(1, 1).total_ns == 7.0);
  CHECK(m.at(0, 1).start_probability < 0.99);
  Schedule fwd = linear_schedule();
  CHECK_THROWS_AS(reverse_map(AnnealSetup(triangle(), fwd, sim), o), InputError);
}
