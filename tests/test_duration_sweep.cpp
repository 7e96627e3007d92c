// Duration sweeps: threaded runs equal serial runs bit for bit, journaled points
// are reused exactly, log spacing, and the bracketing/bisection search for the
// duration needed on curves whose answer is known in closed form.
#include <cmath>

#include <doctest/doctest.h>

#include "io/input_error.hpp"
#include "io/problem_file.hpp"
#include "io/schedule_file.hpp"
#include "studies/duration_needed.hpp"
#include "studies/duration_study.hpp"
#include "studies/duration_sweep.hpp"
#include "test_support.hpp"

using namespace gapwise;

namespace {
AnnealSetup triangle_setup() {
  const auto dir = testing::source_dir();
  return AnnealSetup(read_problem_file((dir / "data-samples/triangle.toml").string()),
                     read_schedule_file((dir / "schedules/linear.toml").string()), SimulationOptions{});
}
}  // namespace

TEST_CASE("log-spaced durations: exact ends, constant ratio") {
  const auto t = log_spaced_durations(1.0, 1000.0, 7);
  REQUIRE(t.size() == 7);
  CHECK(t.front() == 1.0);
  CHECK(t.back() == 1000.0);
  for (std::size_t k = 1; k < t.size(); ++k) CHECK(t[k] / t[k - 1] == doctest::Approx(std::sqrt(10.0)).epsilon(1e-12));
  CHECK(log_spaced_durations(3.0, 3.0, 1) == std::vector<double>{3.0});
  CHECK_THROWS_AS(log_spaced_durations(0.0, 10.0, 3), InputError);
  CHECK_THROWS_AS(log_spaced_durations(10.0, 1.0, 3), InputError);
  CHECK_THROWS_AS(log_spaced_durations(1.0, 10.0, 0), InputError);
}

TEST_CASE("a threaded sweep gives bit for bit the numbers of a serial one") {
  const AnnealSetup setup = triangle_setup();
  const std::vector<double> t{0.5, 1.0, 2.0, 3.0, 5.0, 8.0};
  const auto serial = sweep_durations(setup, t, 1);
  const auto threaded = sweep_durations(setup, t, 2);
  REQUIRE(serial.size() == t.size());
  for (std::size_t k = 0; k < t.size(); ++k) {
    CHECK(serial[k].duration_ns == t[k]);
    CHECK(serial[k].ground_probability == threaded[k].ground_probability);  // exact
    CHECK(serial[k].steps == threaded[k].steps);
    CHECK(serial[k].ground_probability >= 0.0);
    CHECK(serial[k].ground_probability <= 1.0 + 1e-9);
  }
  // Physics sanity (adiabatic theorem, Born and Fock 1928): slow enough reaches the ground state.
  CHECK(sweep_durations(setup, {200.0}, 1)[0].ground_probability > 0.99);
}

TEST_CASE("journaled points are reused exactly; only missing ones are simulated") {
  const AnnealSetup setup = triangle_setup();
  testing::TempDir dir;
  const std::string path = (dir.path / "s.journal").string();
  std::vector<DurationPoint> first;
  {
    ResultJournal j(path, duration_journal_layout(), input_fingerprint({"triangle"}));
    DurationEvaluator ev(setup, &j);
    int calls = 0;
    ev.on_finished = [&](const DurationPoint&) { ++calls; };
    first = ev.evaluate({1.0, 2.0}, 2);
    CHECK(calls == 2);
    CHECK(ev.simulated() == 2);
  }
  ResultJournal j(path, duration_journal_layout(), input_fingerprint({"triangle"}));
  DurationEvaluator ev(setup, &j);
  const auto again = ev.evaluate({1.0, 2.0, 4.0}, 2);
  CHECK(ev.simulated() == 1);
  CHECK(again[0].resumed);
  CHECK_FALSE(again[2].resumed);
  CHECK(again[0].ground_probability == first[0].ground_probability);
  CHECK(again[1].ground_probability == first[1].ground_probability);
}

TEST_CASE("duration needed on a monotonic curve with a closed-form answer") {
  // p = 1 - exp(-t/tau) reaches p* at t = tau ln(1/(1-p*)).
  const double tau = 5.0, exact = tau * std::log(100.0);
  auto p_of = [&](const std::vector<double>& t) {
    std::vector<double> p;
    for (double x : t) p.push_back(1.0 - std::exp(-x / tau));
    return p;
  };
  std::map<double, double> grid;
  for (double t : log_spaced_durations(1.0, 1000.0, 7)) grid[t] = p_of({t})[0];
  DurationNeededOptions o;
  o.relative_width = 1e-4;
  const auto dn = find_duration_needed(p_of, grid, o);
  REQUIRE(dn.status == NeededStatus::Reached);
  CHECK(dn.first.lower_ns < exact);
  CHECK(dn.first.upper_ns >= exact);
  CHECK(dn.first.upper_ns / dn.first.lower_ns - 1.0 <= 1e-4);
  CHECK_FALSE(dn.stays_reached);
  CHECK(dn.decreasing.empty());
  // Target reached already at the shortest / never reached.
  std::map<double, double> high{{1.0, 0.995}, {2.0, 0.999}};
  CHECK(find_duration_needed(p_of, high, o).status == NeededStatus::ReachedAtShortest);
  std::map<double, double> low{{1.0, 0.1}, {2.0, 0.2}};
  const auto nr = find_duration_needed(p_of, low, o);
  CHECK(nr.status == NeededStatus::NotReached);
  CHECK(nr.first.lower_ns == 2.0);
}

TEST_CASE("an oscillating curve: first crossing and the duration beyond which p stays reached") {
  // p = 1 - 0.05 (1 + cos t) / (1 + t/10): crosses 0.99 several times before
  // staying above it; the crossings are found on a fine scan.
  auto p1 = [](double t) { return 1.0 - 0.05 * (1.0 + std::cos(t)) / (1.0 + t / 10.0); };
  auto p_of = [&](const std::vector<double>& t) {
    std::vector<double> p;
    for (double x : t) p.push_back(p1(x));
    return p;
  };
  std::map<double, double> grid;
  for (double t = 1.0; t <= 60.0; t += 1.0) grid[t] = p1(t);
  DurationNeededOptions o;
  o.relative_width = 1e-6;
  const auto dn = find_duration_needed(p_of, grid, o);
  REQUIRE(dn.status == NeededStatus::Reached);
  CHECK(p1(dn.first.lower_ns) < 0.99);
  CHECK(p1(dn.first.upper_ns) >= 0.99);
  CHECK(dn.first.upper_ns < 5.0);  // first reached near t = pi
  REQUIRE(dn.stays_reached);
  // The last upward crossing: scan finely for the largest t with p < p*.
  double last_below = 0;
  for (double t = 1.0; t <= 60.0; t += 1e-4)
    if (p1(t) < 0.99) last_below = t;
  CHECK(dn.stays_reached->lower_ns <= last_below + 1e-3);
  CHECK(dn.stays_reached->upper_ns >= last_below - 1e-3);
  CHECK_FALSE(dn.decreasing.empty());
  CHECK_FALSE(dn.lost_at_longest);
  // Cut the grid where p is below the target again: lost at the longest.
  std::map<double, double> cut(grid.begin(), grid.find(12.0));
  cut[12.5] = p1(12.5);
  REQUIRE(p1(12.5) < 0.99);
  CHECK(find_duration_needed(p_of, cut, o).lost_at_longest);
}

TEST_CASE("the grid is extended until the TTS optimum is bracketed, and not past the random-guess limit") {
  // p = 1 - exp(-(t/tau)^2): TTS = t ln(1-p*)/ln(1-p) = -ln(1-p*) tau^2 / t falls until p
  // reaches p* at t* = tau sqrt(-ln(1-p*)), where TTS = t_f takes over and rises: the
  // optimum is t* (TTS formula: Ronnow et al., Science 345, 420 (2014)).
  const double tau = 10.0, tstar = tau * std::sqrt(std::log(100.0));  // 21.46 ns
  int calls = 0;
  auto p_of_model = [&](double p0) {
    return [&calls, tau, p0](const std::vector<double>& t) {
      ++calls;
      std::vector<double> p;
      for (double x : t) p.push_back(p0 + (1 - p0) * -std::expm1(-std::pow(x / tau, 2)));
      return p;
    };
  };
  DurationStudyOptions o;
  o.extend_to_bracket = true;
  o.random_guess_probability = 0.0;
  // A grid far below t*: the optimum sits at its long end; extended upwards.
  const GridExtension up = extend_grid_to_bracket(p_of_model(0.0), log_spaced_durations(0.5, 2.0, 4), o);
  CHECK_FALSE(up.optimum.at_range_edge);
  CHECK(up.optimum.lower_ns <= tstar);
  CHECK(up.optimum.upper_ns >= tstar);
  CHECK(up.below == 0);
  CHECK(up.above == 6);  // ratio 4^(1/3) per point: 2 ns -> 32 ns in six points, two per round
  CHECK(up.stop.empty());
  CHECK(up.grid.size() == 10);
  // Every point already reaching p*: TTS = t_f, optimum at the short end; extended downwards.
  const GridExtension down = extend_grid_to_bracket(p_of_model(0.0), log_spaced_durations(40.0, 100.0, 4), o);
  CHECK_FALSE(down.optimum.at_range_edge);
  CHECK(down.optimum.lower_ns <= tstar);
  CHECK(down.optimum.upper_ns >= tstar);
  CHECK(down.below == 4);
  // Bounds are honoured and the reason is given.
  DurationStudyOptions bounded = o;
  bounded.extend_max_ns = 5.0;
  const GridExtension capped = extend_grid_to_bracket(p_of_model(0.0), log_spaced_durations(0.5, 2.0, 4), bounded);
  CHECK(capped.optimum.at_range_edge);
  CHECK(capped.grid.back() <= 5.0);
  CHECK(capped.stop.find("upper bound of 5 ns") != std::string::npos);
  // Without the request, the grid stays as given.
  DurationStudyOptions keep = o;
  keep.extend_to_bracket = false;
  CHECK(extend_grid_to_bracket(p_of_model(0.0), {0.5, 1.0, 2.0}, keep).grid.size() == 3);
  // The random-guess limit (p -> p0 = g/2^n as t_f -> 0, so TTS -> 0; sudden limit, common
  // practice): extending downwards cannot bracket anything, so the grid stays and says why.
  DurationStudyOptions guess = o;
  guess.random_guess_probability = 0.75;
  calls = 0;
  const GridExtension rg = extend_grid_to_bracket(p_of_model(0.75), log_spaced_durations(0.5, 2.0, 4), guess);
  CHECK(rg.optimum.random_guess_limited);
  CHECK(rg.below == 0);
  CHECK(rg.above == 0);
  CHECK(calls == 1);
  CHECK(rg.stop.find("random-guess") != std::string::npos);
}
