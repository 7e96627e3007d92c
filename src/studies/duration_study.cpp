#include "studies/duration_study.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "io/input_error.hpp"

namespace gapwise {

std::vector<double> normalised_grid(std::vector<double> t) {
  if (t.empty()) throw InputError({"", 0, 0, "durations"}, "no durations to simulate", "give --durations or --range");
  for (double d : t)
    if (!(d > 0.0) || !std::isfinite(d))
      throw InputError({"", 0, 0, "durations"}, fmt::format("duration {} ns is not positive", d), "give durations > 0 ns");
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
  double lo = std::clamp(round2(0.2 * *std::min_element(est.begin(), est.end())), 0.05, 500.0);
  double hi = std::clamp(round2(5.0 * *std::max_element(est.begin(), est.end())), 1.0, 10000.0);
  if (hi < 20.0 * lo) hi = std::min(10000.0, round2(20.0 * lo));
  return log_spaced_durations(lo, hi, 10);
}

DurationStudy run_duration_study(DurationEvaluator& ev, const DurationStudyOptions& o) {
  if (!(o.target > 0.0 && o.target < 1.0))
    throw InputError({"", 0, 0, "--target"}, fmt::format("target {} is not inside (0, 1)", o.target),
                     "give a success probability such as 0.99");
  DurationStudy st;
  st.target = o.target;
  const std::vector<double> grid = normalised_grid(o.durations_ns);
  st.grid = ev.evaluate(grid, o.threads);
  std::vector<double> p;
  for (const auto& pt : st.grid) {
    // A simulated p can exceed 1 by the integration error; TTS clamps within 1e-9.
    p.push_back(std::clamp(pt.ground_probability, 0.0, 1.0));
    st.grid_tts.push_back(time_to_solution(pt.duration_ns, p.back(), o.target));
  }
  st.optimum = best_time_to_solution(grid, p, o.target);
  if (o.search_needed) {
    DurationNeededOptions n = o.needed;
    n.target = o.target;
    st.needed = duration_needed(ev, grid, n, o.threads);
  }
  return st;
}

}  // namespace gapwise
