#pragma once
// Quick, gap-based predictions of p(t_f), to set beside the simulated truth:
//
// Landau-Zener at the minimum gap (Landau 1932; Zener, Proc. R. Soc. A 137, 696
// (1932)). Near s* the two levels that matter (E_0 and E_g, g the ground
// degeneracy in the sector) are fitted with the local two-level model
//     E_g - E_0 = sqrt(Delta^2 + alpha^2 (s - s*)^2),
// Delta = Delta_min from the gap search (spectrum/gap_search.hpp), alpha the
// difference of the asymptotic slopes of the two levels (GHz per unit s),
// fitted by least squares on spectrum points at |s - s*| = 1, 2, 4, 8 Delta/alpha.
// The path crosses s* at ds/dt = r / t_f (r: slope of the path shape per unit
// fraction of the duration), so the sweep rate is v = alpha r / t_f (GHz/ns) and
//     p_LZ(t_f) = 1 - exp(-pi^2 Delta^2 t_f / (alpha r)),
//     t_LZ(p*)  = -ln(1 - p*) alpha r / (pi^2 Delta^2).
// It holds for one isolated avoided crossing passed at constant speed, with the
// rest of the path adiabatic; it fails for short anneals (sudden limit: p is the
// overlap of the start state with the final ground state, not 0), for several
// small gaps, and at long t_f where the end-point (power-law) corrections and
// their oscillations dominate the tiny exponential.
//
// Adiabatic condition (common textbook form, e.g. Messiah, Quantum Mechanics
// vol. 2 (1962), ch. XVII; Albash and Lidar, Rev. Mod. Phys. 90, 015002 (2018)):
//     t_f >> t_ad = max_s r(s) |<g|dH/ds|0>| / (2 pi Delta(s)^2)
// in ns (H in GHz; the 2 pi makes it angular frequency). As a prediction we use
// the leading-order estimate of the excitation probability, (t_ad / t_f)^2:
//     p_ad(t_f) = 1 - min(1, (t_ad / t_f)^2),   t_ad(p*) = t_ad / sqrt(1 - p*).
// A rule of thumb: the prefactor is not fixed by the theory, and it ignores
// interference, so it is an order-of-magnitude guide, not a number to trust.
//
//   AnnealPredictions pr = predict_anneal(setup, {});
//   if (pr.lz.applicable) pr.lz.p_at(50.0);
//   pr.adiabatic.duration_for(0.99);
#include <functional>
#include <limits>
#include <string>
#include <vector>

#include "spectrum/gap_search.hpp"
#include "studies/duration_sweep.hpp"

namespace gapwise {

/// A pause this many crossing widths (Delta_min/alpha in s) or closer to s* voids
/// the Landau-Zener model: at p ~ 1/2 the transition is spread over |eps| of a few
/// sqrt(v) ~ 4 Delta, i.e. about 4 widths, and a pause there is no finite sweep rate.
inline constexpr double kPauseWidthsVoidingLz = 4.0;

struct LandauZenerModel {
  bool applicable = false;
  std::string why_not;                   ///< when not applicable
  double s_star = 0.0;
  double gap_ghz = 0.0;                  ///< Delta_min
  double slope_difference_ghz = 0.0;     ///< alpha, GHz per unit s
  /// Hellmann-Feynman slopes dE/ds (GHz per unit s) of the lower (E_0) and upper
  /// (E_g) level at the outermost fit points left and right of s*.
  double lower_slope_left = 0, lower_slope_right = 0, upper_slope_left = 0, upper_slope_right = 0;
  double fit_half_width_s = 0.0;         ///< largest |s - s*| used in the fit
  double fit_deviation = 0.0;            ///< largest relative misfit of the gap to the hyperbola
  double path_rate = 0.0;                ///< r = ds/d(t/t_f) where the path passes s*
  /// The path's pause nearest to s* (NaN: none), and its distance from s* in
  /// crossing widths Delta_min/alpha; within kPauseWidthsVoidingLz the model is refused.
  double pause_s = std::numeric_limits<double>::quiet_NaN();
  double pause_distance_widths = std::numeric_limits<double>::quiet_NaN();
  double p_at(double duration_ns) const;
  double duration_for(double target) const;
};

struct AdiabaticEstimate {
  bool applicable = false;
  std::string why_not;
  double time_ns = 0.0;      ///< t_ad
  double s_at_max = 0.0;     ///< where the maximum of r |M| / (2 pi Delta^2) sits
  double p_at(double duration_ns) const;
  double duration_for(double target) const;
};

struct AnnealPredictions {
  double s_star = 0.0, s_star_uncertainty = 0.0;
  double gap_ghz = 0.0, gap_uncertainty_ghz = 0.0;
  std::string gap_definition;
  std::string sector;
  bool gap_at_end_point = false;
  int ground_degeneracy = 1;                   ///< in the sector used
  LandauZenerModel lz;
  AdiabaticEstimate adiabatic;
  std::vector<double> curve_s, curve_gap_ghz, curve_matrix_element_ghz;  ///< gap search curve
  std::vector<double> minima_s, minima_gap_ghz;                          ///< local minima of the gap
  std::vector<std::string> notes;              ///< flags of the gap search and of the fit
};

struct PredictionOptions {
  double s_tolerance = 1e-7;   ///< precision of s* asked from the gap search
  int coarse_points = 101;
  /// Called after each point of the gap search (empty: never); results do not depend on it.
  std::function<void(const GapSearchProgress&)> progress;
};

/// Refuses (InputError at the schedule's path key) a path that stays at one s, where
/// a gap search over the s range the path covers has no range; `fix` says what to do.
void require_path_moves_in_s(const Schedule& schedule, const AnnealPath& shape, const std::string& purpose,
                             const std::string& fix);

/// Runs the gap search over the s range the path covers and fits the models.
/// Throws InputError when the problem is too large for the spectrum tools.
AnnealPredictions predict_anneal(const AnnealSetup& setup, const PredictionOptions& options = {});

/// Where a prediction agrees with the simulation, judged on the failure
/// probability 1 - p (the quantity that sets the number of repetitions, and the
/// one the predictions are formulas for), and on p itself:
///     disagreement = max(q_sim/q_pred, q_pred/q_sim, p_sim/p_pred, p_pred/p_sim) <= factor,
/// every probability first raised to `floor`, the accuracy of the simulated p (below
/// it a value is not known, so two values under the floor count as equal). 1 - p
/// decides near p = 1, p near p = 0 (where 1 - p ~ 1 for both would make any two
/// small p agree). Judging |p_sim - p_pred| instead would call 1 - p = 4e-5 and
/// 1.5e-2 (a 400-fold difference in repetitions) agreement.
inline constexpr double kDefaultAgreementFactor = 2.0;

/// max(q_sim/q_pred, q_pred/q_sim) for q = max(1 - p, floor) (>= 1; NaN when either p is NaN).
double failure_ratio(double p_sim, double p_pred, double floor);
/// The larger of failure_ratio and the same ratio of the probabilities themselves.
double disagreement_factor(double p_sim, double p_pred, double floor);

struct AgreementRange {
  double from_ns = 0, to_ns = 0;
};
/// The sampled durations where disagreement_factor <= factor, as contiguous ranges of the grid.
std::vector<AgreementRange> agreement_ranges(const std::vector<double>& durations_ns, const std::vector<double>& p_sim,
                                             const std::vector<double>& p_pred, double factor, double floor);

/// A prediction judged twice: on 1 - p at the sampled durations, and on the
/// duration it predicts for the target against the simulated one.
struct PredictionVerdict {
  std::vector<AgreementRange> ranges;
  double predicted_ns = 0;   ///< the prediction's duration for p*
  double simulated_ns = 0;   ///< the simulated duration needed (NaN when only bounded)
  double duration_ratio = 0; ///< predicted / simulated (NaN when either is unknown)
  bool duration_agrees = false;  ///< ratio within [1/factor, factor]
};
PredictionVerdict judge_prediction(const std::vector<double>& durations_ns, const std::vector<double>& p_sim,
                                   const std::vector<double>& p_pred, double predicted_ns, double simulated_ns,
                                   double factor, double floor);

}  // namespace gapwise
