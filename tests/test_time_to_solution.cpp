// Time to solution, TTS(t_f) = t_f ln(1 - p*) / ln(1 - p), TTS = t_f for p >= p*
// (Ronnow et al., Science 345, 420 (2014)), and its edge cases.
#include <cmath>
#include <limits>
#include <stdexcept>

#include <doctest/doctest.h>

#include "studies/time_to_solution.hpp"

using namespace gapwise;

TEST_CASE("two runs of 50 % give 75 %: TTS at p* = 0.75 is two durations") {
  // 1 - (1 - 0.5)^2 = 0.75: exactly two repetitions (elementary probability).
  const auto t = time_to_solution(10.0, 0.5, 0.75);
  CHECK(t.kind == TtsCase::Repeated);
  CHECK(t.repetitions == doctest::Approx(2.0).epsilon(1e-14));
  CHECK(t.tts_ns == doctest::Approx(20.0).epsilon(1e-14));
}

TEST_CASE("the repetitions reach the target: 1 - (1 - p)^R = p*") {
  for (double p : {1e-3, 0.1, 0.37, 0.9, 0.985}) {
    const auto t = time_to_solution(7.0, p, 0.99);
    CHECK(1.0 - std::pow(1.0 - p, t.repetitions) == doctest::Approx(0.99).epsilon(1e-12));
    CHECK(t.tts_ns == doctest::Approx(7.0 * t.repetitions).epsilon(1e-14));
  }
}

TEST_CASE("edge case p = 0: no number of repetitions helps, TTS is infinite") {
  const auto t = time_to_solution(5.0, 0.0);
  CHECK(t.kind == TtsCase::Never);
  CHECK(std::isinf(t.tts_ns));
  CHECK(std::isinf(t.repetitions));
  CHECK(std::string(tts_case_name(t.kind)) == "never");
}

TEST_CASE("edge cases p >= p* and p = 1: one run, TTS = t_f") {
  for (double p : {0.99, 0.995, 1.0, 1.0 + 1e-12}) {
    const auto t = time_to_solution(12.5, p, 0.99);
    CHECK(t.kind == TtsCase::SingleRun);
    CHECK(t.tts_ns == 12.5);
    CHECK(t.repetitions == 1.0);
  }
  // Continuity at the target from below: R -> 1.
  CHECK(time_to_solution(12.5, 0.99 - 1e-12, 0.99).tts_ns == doctest::Approx(12.5).epsilon(1e-8));
}

TEST_CASE("tiny p keeps its accuracy (log1p): R -> -ln(1 - p*) / p") {
  // Series: ln(1 - p) = -p - p^2/2 - ..., so R = ln(1-p*)/ln(1-p) = -ln(1-p*)/p * (1 - p/2 + ...).
  const double p = 1e-12;
  const auto t = time_to_solution(1.0, p, 0.99);
  CHECK(t.repetitions == doctest::Approx(-std::log(0.01) / p).epsilon(1e-10));
}

TEST_CASE("bad inputs are refused") {
  CHECK_THROWS_AS(time_to_solution(1.0, 0.5, 1.0), std::invalid_argument);
  CHECK_THROWS_AS(time_to_solution(1.0, 0.5, 0.0), std::invalid_argument);
  CHECK_THROWS_AS(time_to_solution(0.0, 0.5), std::invalid_argument);
  CHECK_THROWS_AS(time_to_solution(1.0, 1.1), std::invalid_argument);
  CHECK_THROWS_AS(time_to_solution(1.0, -0.1), std::invalid_argument);
  CHECK_THROWS_AS(time_to_solution(1.0, std::nan("")), std::invalid_argument);
}

TEST_CASE("TTS optimum on a sampled curve") {
  // p = 1 - exp(-(t/tau)^2): TTS = t ln(1-p*)/ln(1-p) = -ln(1-p*) tau^2 / t falls
  // until p reaches p*, where TTS = t rises: the optimum is t* = tau sqrt(-ln(1-p*)).
  const double tau = 10.0, tstar = tau * std::sqrt(-std::log(0.01));
  std::vector<double> t, p;
  for (int k = 0; k < 40; ++k) {
    t.push_back(1.0 + k);
    p.push_back(1.0 - std::exp(-std::pow(t.back() / tau, 2)));
  }
  const auto best = best_time_to_solution(t, p);
  CHECK_FALSE(best.at_range_edge);
  CHECK(best.lower_ns <= tstar);
  CHECK(best.upper_ns >= tstar);
  CHECK(std::abs(best.duration_ns - tstar) <= 1.0);
  // Every point already at the target: TTS = t_f, the optimum is the shortest, flagged.
  const auto edge = best_time_to_solution({1, 2, 3}, {0.999, 0.9999, 1.0});
  CHECK(edge.index == 0);
  CHECK(edge.at_range_edge);
  CHECK(edge.tts_ns == 1.0);
  // p = 0 everywhere: no optimum (infinite TTS).
  CHECK(std::isinf(best_time_to_solution({1, 2}, {0.0, 0.0}).tts_ns));
  CHECK_THROWS_AS(best_time_to_solution({2, 1}, {0.5, 0.5}), std::invalid_argument);
  CHECK_THROWS_AS(best_time_to_solution({}, {}), std::invalid_argument);
}
