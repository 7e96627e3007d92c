#include "io/thermal_figures.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include <fmt/format.h>

#include "io/figure_plot.hpp"

namespace gapwise {

std::vector<std::pair<std::string, LinePlot>> thermal_channel_plots(const Hdf5Input& in) {
  const std::string T = "/thermal";
  if (!in.has(T + "/grid_s") || !in.has(T + "/durations")) return {};
  constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
  const double theta = in.attribute_finite(T, "theta_ghz");
  const auto gs = in.read(T + "/grid_s"), gg = in.read(T + "/grid_gap");
  const auto dur = in.read(T + "/durations"), fs = in.read(T + "/freeze_out_s");
  const auto cross = in.read(T + "/gap_theta_crossings_s");
  const std::string bath = fmt::format("{:.4g} mK (k#dB#uT/h = {:.4g} GHz), #gy = {:.3g}", in.attribute_finite(T, "temperature_mk"),
                                       theta, in.attribute_finite(T, "coupling"));
  // The gap = theta lines are explained only where there are some to see.
  const bool lines = std::any_of(cross.begin(), cross.end(), [](double s) { return std::isfinite(s); });
  LinePlot f;
  f.title = "Thermal channel: gap against k#dB#uT/h and the relaxations left";
  f.note = "bath " + bath + "\nN(s): relaxations left, the integral of #gG dt from t(s) to t#df#u; squares where it falls to 1 (freeze-out)" +
           std::string(lines ? "\ndashed vertical lines: gap = k#dB#uT/h" : "");
  f.x_label = "schedule parameter s";
  f.y_label = "gap / (k#dB#uT/h)   and   N(s)";
  f.log_y = true;
  std::vector<double> ratio;
  double hi = 1, lo = 1;
  for (double g : gg) {
    const double r = theta > 0 && g > 0 ? g / theta : kNaN;
    ratio.push_back(r);
    if (std::isfinite(r)) hi = std::max(hi, r), lo = std::min(lo, r);
  }
  f.series.push_back({"gap / (k#dB#uT/h)", gs, ratio, SeriesStyle::Line, 0, {}, {}});
  for (std::size_t k = 0; k < dur.size(); ++k) {
    const std::string g = fmt::format("{}/duration_{}", T, k);
    if (!in.has(g + "/remaining_relaxations")) continue;
    const auto s = in.read(g + "/s");
    auto n = in.read(g + "/remaining_relaxations");
    for (double& x : n) {
      if (x > 0) hi = std::max(hi, x);
      if (!(x >= 1e-3)) x = kNaN;  // the log axis ends at 1e-3 of a relaxation
    }
    f.series.push_back({fmt::format("N(s), t#df#u = {:.4g} ns", dur[k]), s, n, SeriesStyle::Dashed, static_cast<int>(k) + 1, {}, {}});
    if (k < fs.size() && std::isfinite(fs[k])) f.markers.push_back({fs[k], 1.0, ""});  // unlabelled: close freeze-out points would print over each other
  }
  f.series.push_back({"", {gs.front(), gs.back()}, {1.0, 1.0}, SeriesStyle::Line, 7, {}, {}});
  f.y_range = std::pair{std::max(1e-3, std::min(lo / 2, 0.1)), hi * 2};
  f.vertical_lines = cross;

  LinePlot p;
  p.title = "Thermal channel: population of the levels that end in the ground manifold";
  const bool freeze = std::any_of(fs.begin(), fs.end(), [](double s) { return std::isfinite(s); });
  p.note = "with the bath " + bath;
  if (lines || freeze)
    p.note += "\n" + std::string(lines ? "dashed vertical lines: gap = k#dB#uT/h" : "") + (lines && freeze ? "; " : "") +
              (freeze ? "squares: freeze-out" : "");
  p.x_label = "schedule parameter s";
  p.y_label = "population of the lowest g levels";
  p.y_range = std::pair{0.0, 1.05};
  for (std::size_t k = 0; k < dur.size(); ++k) {
    const std::string g = fmt::format("{}/duration_{}", T, k);
    if (!in.has(g + "/ground_group_population")) continue;
    const auto s = in.read(g + "/s"), pop = in.read(g + "/ground_group_population");
    p.series.push_back({fmt::format("t#df#u = {:.4g} ns", dur[k]), s, pop, SeriesStyle::Line, static_cast<int>(k), {}, {}});
    if (k < fs.size() && std::isfinite(fs[k])) {
      // the population at the freeze-out point, interpolated between observations
      double y = pop.back();
      for (std::size_t q = 0; q + 1 < s.size(); ++q)
        if (s[q] <= fs[k] && fs[k] <= s[q + 1] && s[q + 1] > s[q]) {
          y = pop[q] + (pop[q + 1] - pop[q]) * (fs[k] - s[q]) / (s[q + 1] - s[q]);
          break;
        }
      p.markers.push_back({fs[k], y, fmt::format("freeze-out, {:.4g} ns", dur[k])});
    }
  }
  p.vertical_lines = cross;
  return {{"diagnosis-thermal", std::move(f)}, {"diagnosis-thermal-populations", std::move(p)}};
}

void thermal_channel_figures(const Hdf5Input& in, const FigureEmit& emit) {
  // No structured binding here: clang 14 (the fuzz build) cannot capture one in a lambda.
  for (const auto& entry : thermal_channel_plots(in)) {
    const auto& plot = entry.second;
    emit(entry.first, [&plot](const std::string& path) { render_figure(plot, path); });
  }
}

}  // namespace gapwise
