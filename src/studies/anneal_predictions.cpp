#include "studies/anneal_predictions.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>
#include <optional>

#include <fmt/format.h>

#include "spectrum/gap_search.hpp"

namespace gapwise {
namespace {

constexpr double kPi = std::numbers::pi;

/// The path shape on unit duration; empty when s decreases anywhere (not a forward anneal).
std::optional<AnnealPath> forward_shape(const Schedule& schedule) {
  if (schedule.start.kind != StartKind::Ground) return std::nullopt;
  AnnealPath unit = schedule.path_for(1.0);
  const auto& pts = unit.points();
  for (std::size_t k = 1; k < pts.size(); ++k)
    if (pts[k].s < pts[k - 1].s) return std::nullopt;
  return unit;
}

/// The pause (piece of constant s) nearest to s_star, if the path has one.
std::optional<double> nearest_pause(const AnnealPath& unit, double s_star) {
  std::optional<double> best;
  const auto& pts = unit.points();
  for (std::size_t k = 0; k + 1 < pts.size(); ++k)
    if (pts[k].s == pts[k + 1].s && (!best || std::abs(pts[k].s - s_star) < std::abs(*best - s_star))) best = pts[k].s;
  return best;
}

/// ds/d(t/t_f) where the unit path passes s: 0 on a pause at s; the slower piece at a kink.
double rate_at(const AnnealPath& unit, double s) {
  double rate = std::numeric_limits<double>::infinity();
  const auto& pts = unit.points();
  for (std::size_t k = 0; k + 1 < pts.size(); ++k) {
    const double lo = pts[k].s, hi = pts[k + 1].s;
    if (s < lo || s > hi) continue;
    rate = std::min(rate, (hi - lo) / (pts[k + 1].t_ns - pts[k].t_ns));
  }
  return std::isinf(rate) ? 0.0 : rate;
}

}  // namespace

double LandauZenerModel::p_at(double t) const {
  if (!applicable) return std::nan("");
  return -std::expm1(-kPi * kPi * gap_ghz * gap_ghz * t / (slope_difference_ghz * path_rate));
}

double LandauZenerModel::duration_for(double target) const {
  if (!applicable) return std::nan("");
  return -std::log1p(-target) * slope_difference_ghz * path_rate / (kPi * kPi * gap_ghz * gap_ghz);
}

double AdiabaticEstimate::p_at(double t) const {
  if (!applicable) return std::nan("");
  const double r = time_ns / t;
  return 1.0 - std::min(1.0, r * r);
}

double AdiabaticEstimate::duration_for(double target) const {
  if (!applicable) return std::nan("");
  return time_ns / std::sqrt(1.0 - target);
}

void require_path_moves_in_s(const Schedule& schedule, const AnnealPath& shape, const std::string& purpose,
                             const std::string& fix) {
  if (shape.s_min() < shape.s_max()) return;
  throw InputError(schedule.path_file_place(),
                   fmt::format("the path stays at s = {} from start to end, so there is no range of s for {}",
                               shape.s_min(), purpose),
                   fix);
}

AnnealPredictions predict_anneal(const AnnealSetup& setup, const PredictionOptions& po) {
  AnnealPredictions pr;
  const auto unit = forward_shape(setup.schedule);
  const AnnealPath shape = setup.schedule.path_for(1.0);
  require_path_moves_in_s(setup.schedule, shape, "the gap search behind the predictions",
                          "let the path move in s (e.g. points from s = 0 to s = 1), or add --no-predictions to "
                          "simulate this path without the gap search");
  GapSearchOptions go;
  go.s_tolerance = po.s_tolerance;
  go.coarse_points = po.coarse_points;
  go.progress = po.progress;
  go.s_first = shape.s_min();
  go.s_last = shape.s_max();
  check_gap_search_size(setup.problem.qubits, default_sector(setup.problem), go.levels, go.method,
                        "the gap search for the predictions (skip it with --no-predictions)");
  const MinimumGapReport rep = find_minimum_gap(setup.hamiltonian, setup.schedule.scales, go);
  pr.s_star = rep.s_star;
  pr.s_star_uncertainty = rep.s_star_uncertainty;
  pr.gap_ghz = rep.gap_ghz;
  pr.gap_uncertainty_ghz = rep.gap_uncertainty_ghz;
  pr.gap_definition = rep.definition;
  pr.sector = describe_sector(rep.sector);
  pr.gap_at_end_point = rep.at_end_point;
  pr.ground_degeneracy = rep.ground_degeneracy;
  for (const auto& p : rep.curve) {
    pr.curve_s.push_back(p.s);
    pr.curve_gap_ghz.push_back(p.gap_ghz);
    pr.curve_matrix_element_ghz.push_back(p.matrix_element_ghz);
  }
  for (const auto& m : rep.minima) {
    pr.minima_s.push_back(m.s);
    pr.minima_gap_ghz.push_back(m.gap_ghz);
  }
  pr.notes = rep.flags;

  if (!unit) {
    const std::string why =
        "the path is not a forward anneal from the ground state of H(s0) (s decreases somewhere, or the start is "
        "classical): both models assume one monotone pass";
    pr.lz.why_not = pr.adiabatic.why_not = why;
    return pr;
  }

  // Adiabatic condition along the path: max_s r(s) |<g|dH/ds|0>| / (2 pi Delta(s)^2).
  double best = 0, best_s = 0;
  for (const auto& p : rep.curve) {
    if (!(p.gap_ghz > 0.0)) continue;
    const double v = rate_at(*unit, p.s) * p.matrix_element_ghz / (2.0 * kPi * p.gap_ghz * p.gap_ghz);
    if (v > best) { best = v; best_s = p.s; }
  }
  if (best > 0.0) {
    pr.adiabatic.applicable = true;
    pr.adiabatic.time_ns = best;
    pr.adiabatic.s_at_max = best_s;
  } else {
    pr.adiabatic.why_not = "the matrix element |<g|dH/ds|0>| vanishes along the whole path";
  }

  // Landau-Zener at the minimum gap.
  LandauZenerModel& lz = pr.lz;
  lz.s_star = rep.s_star;
  lz.gap_ghz = rep.gap_ghz;
  if (rep.at_end_point) {
    lz.why_not = "the smallest gap sits at an end of the path's s range, not at an avoided crossing inside it";
    return pr;
  }
  if (!(rep.gap_ghz > 0.0)) {
    lz.why_not = "the minimum gap is zero (a true level crossing inside the sector)";
    return pr;
  }
  if (rep.reopening < kSweptCrossingReopening) {
    lz.why_not = fmt::format(
        "the gap does not reopen before the path's s range ends: from Delta_min = {:.6g} GHz at s* = {:.6g} it rises "
        "only to {:.4g} x Delta_min on one side (the path stops inside the crossing, so it is not swept through as "
        "Landau-Zener assumes; that needs at least {:.3g} x, one crossing width)",
        rep.gap_ghz, rep.s_star, rep.reopening, kSweptCrossingReopening);
    return pr;
  }
  double curvature = 0;
  for (const auto& m : rep.minima)
    if (std::abs(m.s - rep.s_star) <= std::max(1e-9, 10 * rep.s_star_uncertainty)) curvature = m.curvature_ghz;
  // Hyperbola: gap'' = alpha^2 / Delta at s*, a first guess of the width Delta / alpha.
  double alpha0 = curvature > 0 ? std::sqrt(curvature * rep.gap_ghz) : 0.0;
  if (!(alpha0 > 0.0)) alpha0 = rep.gap_ghz / std::max(1e-6, rep.s_last - rep.s_first);
  const double width0 = rep.gap_ghz / alpha0;
  const SectorHamiltonian sh(setup.hamiltonian, rep.sector);
  const int g = rep.ground_degeneracy;
  struct FitPoint { double x, gap, lower_slope, upper_slope; };
  std::vector<FitPoint> fit;
  for (double c : {-8.0, -4.0, -2.0, -1.0, -0.5, 0.5, 1.0, 2.0, 4.0, 8.0}) {
    const double s = rep.s_star + c * width0;
    if (s < rep.s_first || s > rep.s_last) continue;
    const SpectrumPoint sp = spectrum_at(sh, setup.schedule.scales, s, rep.levels, g, LevelOptions{});
    fit.push_back({s - rep.s_star, sp.gap_ghz, sp.slopes_ghz.at(0), sp.slopes_ghz.at(static_cast<std::size_t>(g))});
  }
  if (fit.size() < 3) {
    lz.why_not = "too few points of the s range around s* for the two-level fit";
    return pr;
  }
  double num = 0, den = 0;
  for (const auto& f : fit) {
    num += (f.gap * f.gap - rep.gap_ghz * rep.gap_ghz) * f.x * f.x;
    den += f.x * f.x * f.x * f.x;
  }
  if (!(num > 0.0 && den > 0.0)) {
    lz.why_not = "the gap does not open away from s* (no avoided-crossing shape to fit)";
    return pr;
  }
  lz.slope_difference_ghz = std::sqrt(num / den);
  for (const auto& f : fit) {
    const double model = std::sqrt(rep.gap_ghz * rep.gap_ghz + lz.slope_difference_ghz * lz.slope_difference_ghz * f.x * f.x);
    lz.fit_deviation = std::max(lz.fit_deviation, std::abs(f.gap - model) / f.gap);
    lz.fit_half_width_s = std::max(lz.fit_half_width_s, std::abs(f.x));
  }
  const auto& left = fit.front();
  const auto& right = fit.back();
  lz.lower_slope_left = left.lower_slope;
  lz.upper_slope_left = left.upper_slope;
  lz.lower_slope_right = right.lower_slope;
  lz.upper_slope_right = right.upper_slope;
  // The sweep rate through the crossing region. At p ~ 1/2 the transition is
  // spread over |eps| <~ a few sqrt(v) ~ 4 Delta (v = pi^2 Delta^2 / ln 2), i.e.
  // a few Delta/alpha in s: a pause within 4 widths voids the model, a change of
  // speed within 10 widths is noted.
  const double width = std::max(rep.gap_ghz / lz.slope_difference_ghz, rep.s_star_uncertainty);
  if (const auto pause = nearest_pause(*unit, rep.s_star)) {
    lz.pause_s = *pause;
    lz.pause_distance_widths = std::abs(*pause - rep.s_star) / width;
    if (lz.pause_distance_widths <= kPauseWidthsVoidingLz) {
      lz.why_not = fmt::format(
          "the path pauses at s = {:.4g}, {:.2g} crossing widths from s* = {:.6g} (one width Delta_min/alpha = {:.3g} "
          "in s; the fitted hyperbola puts the gap at the pause at {:.3g} GHz, {:.2g} x Delta_min): a pause within "
          "{:g} widths means the crossing is not swept at one finite rate",
          *pause, lz.pause_distance_widths, rep.s_star, width,
          rep.gap_ghz * std::sqrt(1.0 + lz.pause_distance_widths * lz.pause_distance_widths),
          std::sqrt(1.0 + lz.pause_distance_widths * lz.pause_distance_widths), kPauseWidthsVoidingLz);
      return pr;
    }
  }
  lz.path_rate = rate_at(*unit, rep.s_star);
  const double s_lo = std::max(unit->s_min(), rep.s_star - 10 * width);
  const double s_hi = std::min(unit->s_max(), rep.s_star + 10 * width);
  if (std::abs(rate_at(*unit, s_lo) - lz.path_rate) > 1e-9 * lz.path_rate ||
      std::abs(rate_at(*unit, s_hi) - lz.path_rate) > 1e-9 * lz.path_rate)
    pr.notes.push_back("the path changes speed inside the crossing region: Landau-Zener uses the speed at s*");
  lz.applicable = true;
  if (lz.fit_deviation > 0.5)
    pr.notes.push_back(fmt::format("the gap near s* is not a two-level hyperbola (misfit up to {:.0f} %): the "
                                   "Landau-Zener numbers are shown for comparison only",
                                   100 * lz.fit_deviation));
  else if (lz.fit_deviation > 0.1)
    pr.notes.push_back(fmt::format("the gap near s* departs from the two-level hyperbola by up to {:.0f} %: "
                                   "Landau-Zener is a rough guide for this problem",
                                   100 * lz.fit_deviation));
  int others = 0;
  for (const auto& m : rep.minima)
    if (std::abs(m.s - rep.s_star) > 1e-6 && m.gap_ghz < 2.0 * rep.gap_ghz && !m.at_end_point) ++others;
  if (others > 0)
    pr.notes.push_back(fmt::format("{} other local minimum/minima of the gap below 2 Delta_min: more than one "
                                   "crossing matters, a single Landau-Zener factor overestimates p",
                                   others));
  return pr;
}

double failure_ratio(double p_sim, double p_pred, double floor) {
  if (!std::isfinite(p_sim) || !std::isfinite(p_pred)) return std::nan("");
  const double qs = std::max(1.0 - p_sim, floor), qp = std::max(1.0 - p_pred, floor);
  return std::max(qs / qp, qp / qs);
}

double disagreement_factor(double p_sim, double p_pred, double floor) {
  const double q = failure_ratio(p_sim, p_pred, floor);
  if (std::isnan(q)) return q;
  const double a = std::max(p_sim, floor), b = std::max(p_pred, floor);
  return std::max(q, std::max(a / b, b / a));
}

std::vector<AgreementRange> agreement_ranges(const std::vector<double>& t, const std::vector<double>& ps,
                                             const std::vector<double>& pp, double factor, double floor) {
  std::vector<AgreementRange> out;
  bool open = false;
  for (std::size_t k = 0; k < t.size() && k < ps.size() && k < pp.size(); ++k) {
    const double r = disagreement_factor(ps[k], pp[k], floor);
    const bool ok = std::isfinite(r) && r <= factor;
    if (ok && open) out.back().to_ns = t[k];
    else if (ok) out.push_back({t[k], t[k]});
    open = ok;
  }
  return out;
}

PredictionVerdict judge_prediction(const std::vector<double>& t, const std::vector<double>& ps,
                                   const std::vector<double>& pp, double predicted_ns, double simulated_ns,
                                   double factor, double floor) {
  PredictionVerdict v;
  v.ranges = agreement_ranges(t, ps, pp, factor, floor);
  v.predicted_ns = predicted_ns;
  v.simulated_ns = simulated_ns;
  v.duration_ratio = predicted_ns > 0 && simulated_ns > 0 && std::isfinite(predicted_ns) && std::isfinite(simulated_ns)
                         ? predicted_ns / simulated_ns
                         : std::nan("");
  v.duration_agrees = std::isfinite(v.duration_ratio) && v.duration_ratio <= factor && v.duration_ratio >= 1.0 / factor;
  return v;
}

}  // namespace gapwise
