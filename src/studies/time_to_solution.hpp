#pragma once
// Time to solution: the expected annealing time needed to see a ground state at
// least once with confidence p_target, when one run of duration t_f succeeds
// with probability p (Ronnow et al., Science 345, 420 (2014)):
//
//   R(t_f)   = ln(1 - p_target) / ln(1 - p)     repetitions (real, not rounded up)
//   TTS(t_f) = t_f * R(t_f)                     and TTS = t_f when p >= p_target
//
// Edge cases, defined once here and used by every study:
//   p == 0            no number of repetitions helps: R = TTS = +infinity (TtsCase::Never)
//   0 < p < p_target  the formula above (TtsCase::Repeated); ln(1 - p) is taken with
//                     log1p so tiny p keep their accuracy (R ~ -ln(1 - p_target)/p)
//   p >= p_target     one run suffices: R = 1, TTS = t_f (TtsCase::SingleRun); this
//                     includes p == 1, where the formula would give 0
// p may exceed 1 or fall below 0 by rounding of a simulated probability; values
// within 1e-9 of [0, 1] are clamped, others throw std::invalid_argument.
//
//   TimeToSolution t = time_to_solution(20.0, 0.6);   // 20 ns runs, 60 % success
//   t.tts_ns;        // 20 * ln(0.01)/ln(0.4) = 100.5 ns
//   t.repetitions;   // 5.03
//   TtsOptimum best = best_time_to_solution({10, 20, 40}, {0.2, 0.6, 0.95});
//   best.duration_ns; best.at_range_edge;
//   best.near_from_ns; best.near_to_ns;      // durations within 5 % of the best TTS
//   // with the random-guess (sudden-limit) probability g/2^n of the start state:
//   TtsOptimum b2 = best_time_to_solution(t, p, 0.99, 6.0 / 8.0);
//   if (b2.random_guess_limited) ... b2.local ...   // TTS -> 0 as t_f -> 0
#include <cstddef>
#include <limits>
#include <optional>
#include <vector>

namespace gapwise {

/// Default target success probability of the time-to-solution figure (common practice).
inline constexpr double kDefaultTargetProbability = 0.99;

/// Sampled durations whose TTS is at most (1 + this) times the best count as
/// "as good as the optimum" (our choice: 5 %, about the accuracy to which TTS
/// curves are usually read off a log plot).
inline constexpr double kTtsNearBestFraction = 0.05;

/// The optimum at the shortest duration is blamed on the random-guess limit when
/// the repetitions there are at least 1/this of the random-guess repetitions
/// ln(1-p*)/ln(1-p_guess): a run that short is then at most twice as good as guessing.
inline constexpr double kRandomGuessRepetitionFactor = 2.0;

/// Why TTS keeps falling toward the shortest durations; printed by the studies
/// that report a TTS optimum (`durations`, `ensemble --help`).
extern const char* const kRandomGuessLimitText;

enum class TtsCase { Never, Repeated, SingleRun };

struct TimeToSolution {
  double tts_ns = 0;       ///< +infinity for TtsCase::Never
  double repetitions = 0;  ///< ln(1-p*)/ln(1-p); 1 for SingleRun, +infinity for Never
  TtsCase kind = TtsCase::Repeated;
};

/// Throws std::invalid_argument unless 0 < target < 1 and duration_ns > 0.
TimeToSolution time_to_solution(double duration_ns, double p, double target = kDefaultTargetProbability);

/// "never" / "repeated" / "single run".
const char* tts_case_name(TtsCase c);

/// The duration with the smallest TTS among sampled points (durations ascending).
struct TtsOptimum {
  std::size_t index = 0;         ///< into the sampled durations
  double duration_ns = 0;
  double tts_ns = 0;             ///< +infinity when p == 0 everywhere
  /// True when the minimum sits at the first or last sampled duration: the true
  /// optimum may lie outside the range (at the short end this is the rule when
  /// every point already reaches the target, since TTS = t_f is then increasing).
  bool at_range_edge = false;
  /// Neighbouring sampled durations that bracket the optimum (equal to
  /// duration_ns on the side of a range edge).
  double lower_ns = 0, upper_ns = 0;

  /// Flat TTS: the shortest and longest sampled durations whose TTS is at most
  /// (1 + near_fraction) times the best; near_count of them qualify, and
  /// near_contiguous is false when a worse duration lies between them.
  double near_fraction = kTtsNearBestFraction;
  double near_from_ns = 0, near_to_ns = 0;
  std::size_t near_count = 0;
  bool near_contiguous = true;

  /// The sudden-limit (random-guess) probability given, NaN when not.
  double random_guess_probability = 0;
  /// Optimum at the shortest duration while p there is still close to the random-guess
  /// value (kRandomGuessRepetitionFactor): TTS -> 0 as t_f -> 0 (kRandomGuessLimitText),
  /// so no grid below can bracket it; the shortest duration acts as a minimum anneal time.
  bool random_guess_limited = false;

  /// When the optimum sits at a range edge: the best interior local minimum of the
  /// sampled TTS (index into the durations, its TTS and neighbours), if there is one.
  struct Local {
    std::size_t index = 0;
    double duration_ns = 0, tts_ns = 0, lower_ns = 0, upper_ns = 0;
  };
  std::optional<Local> local;
};

/// Throws std::invalid_argument for empty or mismatched inputs. `random_guess_probability`
/// (g/2^n for the forward start |+>^n; in general the overlap of the start state with the
/// ground manifold) enables random_guess_limited; NaN leaves it false.
TtsOptimum best_time_to_solution(const std::vector<double>& durations_ns, const std::vector<double>& probabilities,
                                 double target = kDefaultTargetProbability,
                                 double random_guess_probability = std::numeric_limits<double>::quiet_NaN());

}  // namespace gapwise
