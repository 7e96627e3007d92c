#include "io/result_figures.hpp"

#include <cctype>
#include <filesystem>
#include <functional>
#include <limits>

#include <fmt/format.h>

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
  if (written.empty())
    throw InputError({result_file, 0, 0, ""}, "this file holds no result that gapwise can draw",
                     "give a file written with --out by anneal or another study subcommand");
  return written;
}

}  // namespace gapwise
