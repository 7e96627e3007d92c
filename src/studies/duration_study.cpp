#include "studies/duration_study.hpp"

#include <algorithm>
#include <cmath>
#include <functional>

#include <fmt/format.h>

#include "dynamics/anneal_observer.hpp"
#include "io/input_error.hpp"

namespace gapwise {

std::vector<double> normalised_grid(std::vector<double> t) {
  if (t.empty()) throw InputError({"--durations", 0, 0, "--durations"}, "no durations to simulate", "give --durations");
  for (double d : t)
    if (!(d > 0.0) || !std::isfinite(d))
      throw InputError({"--durations", 0, 0, "--durations"}, fmt::format("duration {} ns is not positive", d), "give durations > 0 ns");
  std::sort(t.begin(), t.end());
  t.erase(std::unique(t.begin(), t.end()), t.end());
  return t;
}

std::vector<double> default_duration_grid(const AnnealPredictions* pr, double target) {
  std::vector<double> est;
  if (pr && pr->lz.applicable) est.push_back(pr->lz.duration_for(target));
  if (pr && pr->adiabatic.applicable) est.push_back(pr->adiabatic.duration_for(target));
  std::erase_if(est, [](double x) { return !(x > 0.0) || !std::isfinite(x); });
  if (est.empty()) return log_spaced_durations(1.0, 300.0, 10);
  auto round2 = [](double x) {
    const double e = std::pow(10.0, std::floor(std::log10(x)) - 1.0);
    return std::round(x / e) * e;
  };
  double lo = std::clamp(round2(0.2 * *std::min_element(est.begin(), est.end())), kGridMinNs, 500.0);
  double hi = std::clamp(round2(5.0 * *std::max_element(est.begin(), est.end())), 1.0, kGridMaxNs);
  if (hi < 20.0 * lo) hi = std::min(kGridMaxNs, round2(20.0 * lo));
  return log_spaced_durations(lo, hi, 10);
}

double simulated_duration_needed(const DurationStudy& st) {
  if (!st.needed || st.needed->status != NeededStatus::Reached) return std::nan("");
  return st.needed->first.upper_ns;
}

PredictionVerdicts judge_predictions(const AnnealPredictions& pr, const std::map<double, DurationPoint>& known,
                                     const DurationStudy& st, double factor, double floor) {
  std::vector<double> t, p, lz, ad;
  for (const auto& [d, pt] : known) {
    t.push_back(d);
    p.push_back(std::clamp(pt.ground_probability, 0.0, 1.0));
    lz.push_back(pr.lz.applicable ? pr.lz.p_at(d) : std::nan(""));
    ad.push_back(pr.adiabatic.applicable ? pr.adiabatic.p_at(d) : std::nan(""));
  }
  const double sim = simulated_duration_needed(st);
  PredictionVerdicts v;
  if (pr.lz.applicable) v.lz = judge_prediction(t, p, lz, pr.lz.duration_for(st.target), sim, factor, floor);
  if (pr.adiabatic.applicable)
    v.adiabatic = judge_prediction(t, p, ad, pr.adiabatic.duration_for(st.target), sim, factor, floor);
  return v;
}

double sudden_limit_probability(const AnnealSetup& setup) { return ground_probability(setup.start, setup.ground); }

GridExtension extend_grid_to_bracket(const std::function<std::vector<double>(const std::vector<double>&)>& p_of,
                                    std::vector<double> grid, const DurationStudyOptions& o) {
  GridExtension x;
  x.grid = normalised_grid(std::move(grid));
  auto optimum = [&] {
    std::vector<double> p = p_of(x.grid);
    // A simulated p can exceed 1 by the integration error; TTS clamps within 1e-9.
    for (double& v : p) v = std::clamp(v, 0.0, 1.0);
    x.optimum = best_time_to_solution(x.grid, p, o.target, o.random_guess_probability);
  };
  optimum();
  // Extend at the end where the optimum sits, at the grid's own log spacing.
  const auto& g0 = x.grid;
  const double step = g0.size() > 1 ? std::pow(g0.back() / g0.front(), 1.0 / double(g0.size() - 1)) : 2.0;
  while (o.extend_to_bracket && x.optimum.at_range_edge && std::isfinite(x.optimum.tts_ns)) {
    const bool below = x.optimum.index == 0;
    if (below && x.optimum.random_guess_limited) {
      x.stop = "random-guess limit at the short end";
      break;
    }
    if (x.below + x.above >= o.extend_max_points) {
      x.stop = fmt::format("{} points added, the most allowed", o.extend_max_points);
      break;
    }
    std::vector<double> more;
    for (int k = 1; k <= 2; ++k) {
      const double t = below ? x.grid.front() / std::pow(step, k) : x.grid.back() * std::pow(step, k);
      if (below ? t >= o.extend_min_ns * (1 - 1e-12) : t <= o.extend_max_ns * (1 + 1e-12)) more.push_back(t);
    }
    if (more.empty()) {
      x.stop = fmt::format("reached the {} bound of {} ns", below ? "lower" : "upper",
                           below ? o.extend_min_ns : o.extend_max_ns);
      break;
    }
    (below ? x.below : x.above) += static_cast<int>(more.size());
    x.grid.insert(x.grid.end(), more.begin(), more.end());
    x.grid = normalised_grid(x.grid);
    optimum();
  }
  // The loop also ends without a stated reason: say it, so no report prints an
  // empty bracket ("could not be extended further ()").
  if (x.stop.empty() && x.optimum.at_range_edge) {
    if (!o.extend_to_bracket)
      x.stop = "extension switched off";
    else if (!std::isfinite(x.optimum.tts_ns))
      x.stop = "the time-to-solution is infinite at every duration, so there is no optimum to bracket";
  }
  return x;
}

DurationStudy run_duration_study(DurationEvaluator& ev, const DurationStudyOptions& o) {
  if (!(o.target > 0.0 && o.target < 1.0))
    throw InputError({"", 0, 0, "--target"}, fmt::format("target {} is not inside (0, 1)", o.target),
                     "give a success probability such as 0.99");
  DurationStudy st;
  st.target = o.target;
  const GridExtension x = extend_grid_to_bracket(
      [&](const std::vector<double>& t) {
        std::vector<double> p;
        for (const auto& pt : ev.evaluate(t, o.threads)) p.push_back(pt.ground_probability);
        return p;
      },
      o.durations_ns, o);
  const std::vector<double>& grid = x.grid;
  st.grid = ev.evaluate(grid, o.threads);  // all known by now
  st.optimum = x.optimum;
  st.extended_below = x.below;
  st.extended_above = x.above;
  st.extension_stop = x.stop;
  for (const auto& pt : st.grid)
    st.grid_tts.push_back(time_to_solution(pt.duration_ns, std::clamp(pt.ground_probability, 0.0, 1.0), o.target));
  if (o.search_needed) {
    DurationNeededOptions n = o.needed;
    n.target = o.target;
    st.needed = duration_needed(ev, grid, n, o.threads);
  }
  return st;
}

}  // namespace gapwise
