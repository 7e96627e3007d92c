#include "io/result_figures.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <filesystem>
#include <functional>
#include <limits>

#include <fmt/format.h>

#include "io/ensemble_result_file.hpp"
#include "io/figure_plot.hpp"
#include "io/hdf5_input.hpp"
#include "io/input_error.hpp"

namespace gapwise {
namespace {

using Emit = std::function<void(const std::string& kind, const std::function<void(const std::string&)>& draw)>;

void anneal_trace(const Hdf5Input& in, const Emit& emit) {
  if (!in.has("/anneal/trace/t")) return;
  const auto t = in.read("/anneal/trace/t"), s = in.read("/anneal/trace/s"), p = in.read("/anneal/trace/ground_probability");
  LinePlot fig;
  fig.title = "Anneal: ground-state probability along the path";
  fig.x_label = "time t (ns)";
  fig.y_label = "probability / anneal fraction";
  fig.y_range = std::pair{0.0, 1.05};
  fig.legend = LinePlot::Legend::TopLeft;
  fig.note = fmt::format("final ground-state probability {:.6f}", in.attribute_double("/anneal", "ground_probability"));
  fig.series.push_back({"ground-state probability", t, p, SeriesStyle::LinePoints});
  fig.series.push_back({"anneal fraction s(t)", t, s, SeriesStyle::Dashed});
  emit("anneal-trace", [&](const std::string& path) { render_figure(fig, path); });
}

// `gap` results: the lowest levels along s, and the gaps with the minimum marked.
void spectrum(const Hdf5Input& in, const Emit& emit) {
  const std::string G = "/gap";
  if (!in.has(G + "/curve/energies")) return;
  const auto s = in.read(G + "/curve/s");
  const auto shape = in.shape(G + "/curve/energies");
  const auto e = in.read(G + "/curve/energies");
  const std::size_t n = s.size(), k = shape.size() > 1 ? shape[1] : 1;
  if (e.size() != n * k) return;
  const double s_star = in.attribute_double(G, "s_star"), gap = in.attribute_double(G, "gap_ghz");
  const double s_unc = in.attribute_double(G, "s_star_uncertainty");
  const std::string definition = in.attribute_string(G, "definition"), sector = in.attribute_string(G, "sector");

  LinePlot levels;
  levels.title = "Lowest levels of H(s)";
  levels.note = fmt::format("sector: {}; minimum gap {:.4g} GHz at s* = {:.4f} (+- {:.1g})", sector, gap, s_star, s_unc);
  levels.x_label = "anneal fraction s";
  levels.y_label = "energy (GHz)";
  for (std::size_t j = 0; j < k; ++j) {
    PlotSeries ser{j < 6 ? fmt::format("E{}", j) : "", s, std::vector<double>(n), SeriesStyle::Line, static_cast<int>(j)};
    for (std::size_t i = 0; i < n; ++i) ser.y[i] = e[i * k + j];
    levels.series.push_back(std::move(ser));
  }
  levels.vertical_lines = {s_star};
  emit("spectrum", [&](const std::string& path) { render_figure(levels, path); });

  LinePlot gaps;
  gaps.title = "Spectral gap along the anneal";
  const std::string short_definition = definition.substr(0, definition.find(" ("));
  gaps.note = fmt::format("gap = {}; minimum {:.4g} GHz at s* = {:.4f}", short_definition, gap, s_star);
  gaps.x_label = "anneal fraction s";
  gaps.y_label = "gap (GHz)";
  gaps.log_y = true;
  gaps.legend = LinePlot::Legend::BottomLeft;
  auto positive = [](std::vector<double> v) {
    for (double& x : v) if (!(x > 0)) x = std::numeric_limits<double>::quiet_NaN();
    return v;
  };
  gaps.series.push_back({"gap that governs success", s, positive(in.read(G + "/curve/gap")), SeriesStyle::Line, 0});
  if (in.has(G + "/curve/gap_e1_e0"))
    gaps.series.push_back({"E1 - E0", s, positive(in.read(G + "/curve/gap_e1_e0")), SeriesStyle::Dashed, 1});
  if (gap > 0) gaps.markers.push_back({s_star, gap, fmt::format("min {:.3g} GHz", gap)});
  emit("gap", [&](const std::string& path) { render_figure(gaps, path); });
}

// Duration studies: p(t_f) with the predictions beside it, and TTS with its optimum.
void duration_study(const Hdf5Input& in, const Emit& emit) {
  const std::string R = "/durations", P = R + "/points";
  if (!in.has(P + "/duration_ns")) return;
  const auto t = in.read(P + "/duration_ns"), p = in.read(P + "/ground_probability");
  const double target = in.attribute_double(R, "target_probability");
  auto applicable = [](std::vector<double> v) {  // -1 marks "not applicable"
    for (double& x : v) if (x < 0) x = std::numeric_limits<double>::quiet_NaN();
    return v;
  };
  LinePlot fp;
  fp.title = "Ground-state probability against anneal duration";
  fp.x_label = "anneal duration t_f (ns)";
  fp.y_label = "ground-state probability p";
  fp.log_x = true;
  fp.y_range = std::pair{0.0, 1.05};
  fp.legend = LinePlot::Legend::BottomRight;
  fp.series.push_back({"simulated", t, p, SeriesStyle::LinePoints, 0});
  if (in.has(P + "/p_landau_zener"))
    fp.series.push_back({"Landau-Zener at the minimum gap", t, applicable(in.read(P + "/p_landau_zener")), SeriesStyle::Dashed, 1});
  if (in.has(P + "/p_adiabatic"))
    fp.series.push_back({"adiabatic-condition estimate", t, applicable(in.read(P + "/p_adiabatic")), SeriesStyle::Dashed, 2});
  fp.series.push_back({fmt::format("target p* = {}", target), {t.front(), t.back()}, {target, target}, SeriesStyle::Line, 6});
  if (in.has(R + "/predictions"))
    fp.note = fmt::format("minimum gap {:.4g} GHz at s* = {:.4f}", in.attribute_double(R + "/predictions", "gap_ghz"),
                          in.attribute_double(R + "/predictions", "s_star"));
  emit("probability", [&](const std::string& path) { render_figure(fp, path); });

  LinePlot ft;
  ft.title = fmt::format("Time to solution for p* = {}", target);
  ft.x_label = "anneal duration t_f (ns)";
  ft.y_label = "TTS (ns)";
  ft.log_x = ft.log_y = true;
  auto tts = in.read(P + "/tts_ns");
  for (double& x : tts) if (!(x > 0)) x = std::numeric_limits<double>::quiet_NaN();
  ft.series.push_back({"TTS(t_f) = t_f ln(1-p*)/ln(1-p)", t, tts, SeriesStyle::LinePoints, 0});
  if (in.has(R + "/tts_optimum")) {
    const double d = in.attribute_double(R + "/tts_optimum", "duration_ns"), v = in.attribute_double(R + "/tts_optimum", "tts_ns");
    if (v > 0) {
      ft.markers.push_back({d, v, fmt::format("optimum {:.3g} ns at t_f = {:.3g} ns", v, d)});
      ft.note = fmt::format("optimal t_f = {:.4g} ns, TTS = {:.4g} ns", d, v);
    }
  }
  emit("tts", [&](const std::string& path) { render_figure(ft, path); });
}

// A heat map of ground-state probability over a 2-D grid of shape parameters.
void probability_map(const Hdf5Input& in, const Emit& emit, const std::string& root, const std::string& xname,
                     const std::string& yname, const std::string& kind, const std::string& title,
                     const std::string& x_label, const std::string& y_label) {
  if (!in.has(root + "/ground_probability")) return;
  HeatMap m;
  m.title = title;
  m.x_label = x_label;
  m.y_label = y_label;
  m.value_label = "ground-state probability p";
  m.x = in.read(root + "/" + xname);
  m.y = in.read(root + "/" + yname);
  m.values = in.read(root + "/ground_probability");
  if (m.values.size() != m.x.size() * m.y.size() || m.x.empty() || m.y.empty()) return;
  emit(kind, [&](const std::string& path) { render_figure(m, path); });
}

// compare-paths results: populations of the lowest instantaneous levels along s.
void level_populations(const Hdf5Input& in, const Emit& emit) {
  if (!in.has("/compare")) return;
  for (int i = 0; in.has(fmt::format("/compare/path_{}", i)); ++i) {
    const std::string name = in.attribute_string(fmt::format("/compare/path_{}", i), "name");
    for (int j = 0; in.has(fmt::format("/compare/path_{}/duration_{}/level_population", i, j)); ++j) {
      const std::string g = fmt::format("/compare/path_{}/duration_{}", i, j);
      const auto t = in.read(g + "/t");
      auto pop = in.read(g + "/level_population");
      const std::size_t n = t.size(), k = n ? pop.size() / n : 0;
      if (!n || pop.size() != n * k) continue;
      if (in.has(g + "/level_resolved")) {  // unresolved levels are gaps in the curves
        const auto ok = in.read(g + "/level_resolved");
        for (std::size_t q = 0; q < pop.size() && q < ok.size(); ++q)
          if (ok[q] == 0.0) pop[q] = std::numeric_limits<double>::quiet_NaN();
      }
      LinePlot fig;
      fig.title = fmt::format("Populations of the lowest instantaneous levels: path '{}'", name);
      fig.note = fmt::format("duration {:.4g} ns, final ground-state probability {:.6f}",
                             in.attribute_double(g, "duration_ns"), in.attribute_double(g, "ground_probability"));
      fig.x_label = "time t (ns)";
      fig.y_label = "population";
      fig.y_range = std::pair{0.0, 1.05};
      fig.legend = LinePlot::Legend::BottomLeft;
      for (std::size_t l = 0; l < k; ++l) {
        PlotSeries ser{fmt::format("level {}", l), t, std::vector<double>(n), SeriesStyle::Line, static_cast<int>(l)};
        for (std::size_t r = 0; r < n; ++r) ser.y[r] = pop[r * k + l];
        fig.series.push_back(std::move(ser));
      }
      std::string safe;
      for (char c : name) safe += std::isalnum(static_cast<unsigned char>(c)) ? c : '-';
      emit(fmt::format("populations-{}-{}", safe, j), [&](const std::string& path) { render_figure(fig, path); });
    }
  }
}

// Ensemble studies: the optimal TTS and the minimum gap against size, as the
// median with its bootstrap interval (error bars) over the band between the
// lowest and highest quantile levels of the study.
void ensemble_scaling(const Hdf5Input& in, const Emit& emit) {
  if (!in.has("/ensemble/by_size/qubits")) return;
  const EnsembleResult r = read_ensemble_result(in.path());
  const auto& levels = r.settings.quantile_levels;
  if (r.sizes.empty() || levels.empty()) return;
  std::size_t mid = 0, lo_q = 0, hi_q = 0;  // the level nearest 0.5, the lowest and the highest
  for (std::size_t k = 0; k < levels.size(); ++k) {
    if (std::abs(levels[k] - 0.5) < std::abs(levels[mid] - 0.5)) mid = k;
    if (levels[k] < levels[lo_q]) lo_q = k;
    if (levels[k] > levels[hi_q]) hi_q = k;
  }
  std::size_t instances = 0, edge = 0, never = 0;
  for (const auto& s : r.sizes) {
    instances += s.tts_ns.count;
    edge += s.tts_at_range_edge;
    never += s.never_solved;
  }
  auto finite = [](double v) { return std::isfinite(v) && v > 0 ? v : std::numeric_limits<double>::quiet_NaN(); };
  auto draw = [&](const std::string& kind, auto pick, const std::string& title, const std::string& y_label,
                  const std::string& what, const std::string& note) {
    std::vector<double> n, q_lo, q_mid, q_hi, ci_lo, ci_hi;
    for (const auto& s : r.sizes) {
      const SampleSummary& sample = pick(s);
      n.push_back(s.qubits);
      q_lo.push_back(finite(sample.quantiles[lo_q].value));
      q_hi.push_back(finite(sample.quantiles[hi_q].value));
      q_mid.push_back(finite(sample.quantiles[mid].value));
      ci_lo.push_back(finite(sample.quantiles[mid].interval.low));
      ci_hi.push_back(finite(sample.quantiles[mid].interval.high));
    }
    LinePlot fig;
    fig.title = title;
    fig.note = note;
    fig.x_label = "problem size n (qubits)";
    fig.y_label = y_label;
    fig.log_y = true;
    double step = 0;  // label every size when there are not too many
    for (std::size_t k = 1; k < n.size(); ++k) step = step > 0 ? std::min(step, n[k] - n[k - 1]) : n[k] - n[k - 1];
    fig.x_tick = n.size() == 1 ? 1 : (n.back() - n.front()) / step <= 12 ? step : 0;
    fig.x_range = std::pair{n.front() - 1.0, n.back() + 1.0};
    // An explicit range keeps the axis logarithmic however few decades the data span:
    // the nearest 1-2-5 values outside the data.
    double lo = std::numeric_limits<double>::infinity(), hi = -lo;
    for (const auto* v : {&q_lo, &q_hi, &q_mid, &ci_lo, &ci_hi})
      for (double x : *v) if (std::isfinite(x)) { lo = std::min(lo, x); hi = std::max(hi, x); }
    if (!std::isfinite(lo)) return;
    auto step_125 = [](double v, bool up) {
      const double e = std::pow(10.0, std::floor(std::log10(v)));
      const double steps[] = {1, 2, 5, 10};
      if (up) { for (double m : steps) if (m * e >= v * (1 - 1e-12)) return m * e; return 10 * e; }
      for (int k = 3; k >= 0; --k) if (steps[k] * e <= v * (1 + 1e-12)) return steps[k] * e;
      return e;
    };
    fig.y_range = std::pair{step_125(lo / 1.05, false), step_125(hi * 1.05, true)};
    // The legend goes where the curve is not: top left when it rises with n, bottom left when it falls.
    const bool rising = !(std::isfinite(q_mid.front()) && std::isfinite(q_mid.back())) || q_mid.back() >= q_mid.front();
    fig.legend = rising ? LinePlot::Legend::TopLeft : LinePlot::Legend::BottomLeft;
    const std::string range_label = fmt::format("quantiles q{:g} to q{:g} over instances", levels[lo_q], levels[hi_q]);
    if (n.size() > 1) {
      fig.bands.push_back({range_label, n, q_lo, q_hi, 0});
    } else {  // one size: no band to shade, the two quantiles as points
      fig.series.push_back({range_label, n, q_lo, SeriesStyle::Points, 1});
      fig.series.push_back({"", n, q_hi, SeriesStyle::Points, 1});
    }
    PlotSeries median{fmt::format("{} q{:g}; bars: {:g} % bootstrap CI", what, levels[mid], 100 * r.settings.confidence_level),
                      n, q_mid, SeriesStyle::LinePoints, 0};
    median.y_low = ci_lo;
    median.y_high = ci_hi;
    fig.series.push_back(std::move(median));
    emit(kind, [&](const std::string& path) { render_figure(fig, path); });
  };
  const std::string counts = fmt::format("{} instances in {} size{}", instances, r.sizes.size(), r.sizes.size() == 1 ? "" : "s");
  draw("ensemble-tts", [](const SizeSummary& s) -> const SampleSummary& { return s.tts_ns; },
       fmt::format("Optimal time to solution against problem size (p* = {:g})", r.settings.target_probability),
       "optimal TTS (ns)", "median",
       fmt::format("{}; t_f = {:g} to {:g} ns; optimum at a range end: {} of {}; never solved: {}", counts,
                   r.settings.durations_ns.front(), r.settings.durations_ns.back(), edge, instances, never));
  draw("ensemble-gap", [](const SizeSummary& s) -> const SampleSummary& { return s.gap_ghz; },
       "Minimum spectral gap against problem size", "minimum gap (GHz)", "median", counts);
}

}  // namespace

std::vector<std::string> draw_result_figures(const std::string& result_file, const std::string& out_dir,
                                             const std::vector<std::string>& formats) {
  namespace fs = std::filesystem;
  const Hdf5Input in(result_file);
  std::error_code ec;
  fs::create_directories(out_dir, ec);
  if (!fs::is_directory(out_dir))
    throw InputError({out_dir, 0, 0, "--out-dir"}, "cannot create the output folder", "choose a writable folder");
  const std::string stem = fs::path(result_file).stem().string();
  std::vector<std::string> written;
  const Emit emit = [&](const std::string& kind, const std::function<void(const std::string&)>& draw) {
    for (const auto& f : formats) {
      const std::string path = (fs::path(out_dir) / fmt::format("{}-{}.{}", stem, kind, f)).string();
      draw(path);
      written.push_back(path);
    }
  };
  for (const auto& f : formats)
    if (f != "svg" && f != "png")
      throw InputError({"--format", 0, 0, "--format"}, fmt::format("unknown figure format '{}'", f), "use svg and/or png");
  anneal_trace(in, emit);
  spectrum(in, emit);
  duration_study(in, emit);
  probability_map(in, emit, "/pause_map", "pause_s", "pause_ns", "pause-map", "Pause map: ground-state probability",
                  "pause location s_p", "pause duration (ns)");
  probability_map(in, emit, "/reverse_map", "turn_s", "dwell_ns", "reverse-map",
                  "Reverse anneal: ground-state probability", "turn point s_turn", "dwell (ns)");
  level_populations(in, emit);
  ensemble_scaling(in, emit);
  if (written.empty())
    throw InputError({result_file, 0, 0, ""}, "this file holds no result that gapwise can draw",
                     "give a file written with --out by anneal or another study subcommand");
  return written;
}

}  // namespace gapwise
