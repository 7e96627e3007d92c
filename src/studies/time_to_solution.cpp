#include "studies/time_to_solution.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

#include <fmt/format.h>

namespace gapwise {

TimeToSolution time_to_solution(double duration_ns, double p, double target) {
  if (!(target > 0.0 && target < 1.0))
    throw std::invalid_argument(fmt::format("target success probability {} is not inside (0, 1)", target));
  if (!(duration_ns > 0.0) || !std::isfinite(duration_ns))
    throw std::invalid_argument(fmt::format("duration {} ns is not positive", duration_ns));
  constexpr double kSlack = 1e-9;
  if (!(p >= -kSlack && p <= 1.0 + kSlack))
    throw std::invalid_argument(fmt::format("success probability {} is not inside [0, 1]", p));
  p = std::clamp(p, 0.0, 1.0);
  const double inf = std::numeric_limits<double>::infinity();
  if (p >= target) return {duration_ns, 1.0, TtsCase::SingleRun};
  if (p == 0.0) return {inf, inf, TtsCase::Never};
  const double r = std::log1p(-target) / std::log1p(-p);
  return {duration_ns * r, r, TtsCase::Repeated};
}

const char* tts_case_name(TtsCase c) {
  switch (c) {
    case TtsCase::Never: return "never";
    case TtsCase::Repeated: return "repeated";
    case TtsCase::SingleRun: return "single run";
  }
  return "?";
}

const char* const kRandomGuessLimitText =
    "As t_f -> 0 the state has no time to change, so p tends to the random-guess value g/2^n "
    "(g ground states, n qubits: the overlap of the start state |+>^n with the ground manifold) "
    "and TTS = t_f ln(1-p*)/ln(1-p) tends to 0. The optimum is then only a local one, and the "
    "shortest duration acts as the minimum anneal time.";

TtsOptimum best_time_to_solution(const std::vector<double>& t, const std::vector<double>& p, double target,
                                 double guess) {
  if (t.empty() || t.size() != p.size())
    throw std::invalid_argument("best_time_to_solution needs as many probabilities as durations (at least one)");
  TtsOptimum best;
  best.tts_ns = std::numeric_limits<double>::infinity();
  for (std::size_t k = 0; k < t.size(); ++k) {
    if (k && !(t[k] > t[k - 1])) throw std::invalid_argument("durations must be strictly increasing");
    const double v = time_to_solution(t[k], p[k], target).tts_ns;
    if (v < best.tts_ns) { best.tts_ns = v; best.index = k; }
  }
  best.duration_ns = t[best.index];
  best.at_range_edge = best.index == 0 || best.index + 1 == t.size();
  best.lower_ns = t[best.index == 0 ? 0 : best.index - 1];
  best.upper_ns = t[best.index + 1 == t.size() ? best.index : best.index + 1];

  std::vector<double> tts(t.size());
  for (std::size_t k = 0; k < t.size(); ++k) tts[k] = time_to_solution(t[k], p[k], target).tts_ns;
  if (std::isfinite(best.tts_ns)) {
    const double limit = (1.0 + best.near_fraction) * best.tts_ns;
    bool gap = false, started = false;
    for (std::size_t k = 0; k < t.size(); ++k) {
      if (tts[k] <= limit) {
        if (!started) best.near_from_ns = t[k];
        else if (gap) best.near_contiguous = false;
        started = true;
        best.near_to_ns = t[k];
        ++best.near_count;
      } else if (started) {
        gap = true;
      }
    }
  } else {
    best.near_from_ns = t.front();
    best.near_to_ns = t.back();
    best.near_count = t.size();
  }

  best.random_guess_probability = guess;
  if (best.index == 0 && t.size() > 1 && std::isfinite(best.tts_ns) && guess > 0.0 && guess <= 1.0) {
    const double r_guess = time_to_solution(t[0], guess, target).repetitions;
    const double r_first = time_to_solution(t[0], p[0], target).repetitions;
    best.random_guess_limited = r_first * kRandomGuessRepetitionFactor >= r_guess;
  }
  if (best.at_range_edge) {
    for (std::size_t k = 1; k + 1 < t.size(); ++k) {
      if (!(tts[k] < tts[k - 1] && tts[k] <= tts[k + 1])) continue;
      if (best.local && !(tts[k] < best.local->tts_ns)) continue;
      best.local = TtsOptimum::Local{k, t[k], tts[k], t[k - 1], t[k + 1]};
    }
  }
  return best;
}

}  // namespace gapwise
