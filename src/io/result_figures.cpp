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
#include "io/thermal_figures.hpp"
#include "io/hdf5_input.hpp"
#include "io/input_error.hpp"
#include "io/output_paths.hpp"

namespace gapwise {
namespace {

using Emit = std::function<void(const std::string& kind, const std::function<void(const std::string&)>& draw)>;

// Text from a result file in PLplot's escapes: "E_1 - E_0" -> E#d1#u − E#d0#u
// (a real subscript and a minus sign).
std::string plot_text(const std::string& text) {
  std::string out;
  for (std::size_t k = 0; k < text.size(); ++k) {
    if (text[k] == '_' && k > 0 && std::isalpha(static_cast<unsigned char>(text[k - 1])) && k + 1 < text.size() &&
        std::isalnum(static_cast<unsigned char>(text[k + 1]))) {
      std::size_t e = k + 1;
      while (e < text.size() && std::isalnum(static_cast<unsigned char>(text[e]))) ++e;
      out += "#d" + text.substr(k + 1, e - k - 1) + "#u";
      k = e - 1;
    } else if (text.compare(k, 3, " - ") == 0) {
      out += " \u2212 ";
      k += 2;
    } else {
      out += text[k];
    }
  }
  return out;
}

// Values of 1 - p below this are drawn at it: p is computed from a state
// propagated to a relative accuracy far coarser than 1e-10, so a smaller
// miss probability is not resolved (the figure's note says how many points).
constexpr double kMissFloor = 1e-10;

// The log-scale companion of a p figure: 1 - p, with a miss probability below
// kMissFloor clipped to it. Returns the number of clipped points.
std::size_t miss_of(std::vector<double>& v) {
  std::size_t clipped = 0;
  for (double& x : v) {
    if (!std::isfinite(x)) continue;
    x = 1.0 - x;
    if (x < kMissFloor) { x = kMissFloor; ++clipped; }
  }
  return clipped;
}

std::string clip_note(std::size_t clipped) {
  return clipped ? fmt::format("{} point{} with 1 \u2212 p < 10#u-10#d (not resolved) drawn at 10#u-10#d", clipped,
                               clipped == 1 ? "" : "s")
                 : std::string();
}

// A caveat as note lines: "caveat: " and the text, wrapped at spaces onto as
// many lines as it needs to fit under the title (never cut short).
std::string caveat_line(const std::string& text) {
  constexpr std::size_t kWidth = 95;
  std::string out, line = "caveat:";
  std::size_t from = 0;
  while (from < text.size()) {
    std::size_t to = text.find(' ', from);
    if (to == std::string::npos) to = text.size();
    const std::string word = text.substr(from, to - from);
    from = to + 1;
    if (word.empty()) continue;
    if (line.size() + 1 + word.size() > kWidth && !line.empty()) {
      out += (out.empty() ? "" : "\n") + line;
      line = word;
    } else {
      line += (line.empty() ? "" : " ") + word;
    }
  }
  return out + (out.empty() ? "" : "\n") + line;
}

void add_line(std::string& note, const std::string& line) {
  if (line.empty()) return;
  note += (note.empty() ? "" : "\n") + line;
}

// One series per level from a rows x levels matrix (row-major, as written by
// Hdf5Output::write_matrix); NaN entries (not available) become gaps.
void add_level_series(LinePlot& fig, const std::vector<double>& x, const std::vector<double>& matrix, std::size_t levels) {
  const std::size_t n = x.size();
  for (std::size_t l = 0; l < levels; ++l) {
    PlotSeries ser{fmt::format("level {}", l), x, std::vector<double>(n), SeriesStyle::Line, static_cast<int>(l)};
    for (std::size_t r = 0; r < n; ++r) {
      const double v = matrix[r * levels + l];
      ser.y[r] = v < 0 ? std::numeric_limits<double>::quiet_NaN() : v;
    }
    fig.series.push_back(std::move(ser));
  }
}

void anneal_trace(const Hdf5Input& in, const Emit& emit) {
  if (!in.has("/anneal/trace/t")) return;
  const auto t = in.read_finite("/anneal/trace/t"), s = in.read_finite("/anneal/trace/s"), p = in.read_finite("/anneal/trace/ground_probability");
  LinePlot fig;
  fig.title = "Anneal: ground-state probability along the path";
  fig.x_label = "time t (ns)";
  fig.y_label = "probability / schedule parameter s";
  fig.y_range = std::pair{0.0, 1.05};
  fig.note = fmt::format("final ground-state probability {:.6f}", in.attribute_finite("/anneal", "ground_probability"));
  fig.series.push_back({"ground-state probability", t, p, SeriesStyle::LinePoints});
  fig.series.push_back({"schedule parameter s(t)", t, s, SeriesStyle::Dashed});
  emit("anneal-trace", [&](const std::string& path) { render_figure(fig, path); });
}

// `gap` results: the lowest levels along s, and the gaps with the minimum marked.
void spectrum(const Hdf5Input& in, const Emit& emit) {
  const std::string G = "/gap";
  if (!in.has(G + "/curve/energies")) return;
  const auto s = in.read_finite(G + "/curve/s");
  const auto shape = in.shape(G + "/curve/energies");
  const auto e = in.read_finite(G + "/curve/energies");
  const std::size_t n = s.size(), k = shape.size() > 1 ? shape[1] : 1;
  if (e.size() != n * k) return;
  const double s_star = in.attribute_finite(G, "s_star"), gap = in.attribute_finite(G, "gap_ghz");
  const double s_unc = in.attribute_finite(G, "s_star_uncertainty");
  const std::string definition = in.attribute_string(G, "definition"), sector = in.attribute_string(G, "sector");

  LinePlot levels;
  levels.title = "Lowest levels of H(s)";
  levels.note = fmt::format("sector: {}; minimum gap #gD#dmin#u = {:.4g} GHz at s* = {:.4f} (± {:.1g})", sector, gap,
                            s_star, s_unc);
  std::vector<std::string> caveats;
  if (in.has(G + "/notes"))
    for (const auto& c : in.read_strings(G + "/notes"))
      if (c != "none") caveats.push_back(caveat_line(c));
  levels.x_label = "schedule parameter s";
  levels.y_label = "energy (GHz)";
  for (std::size_t j = 0; j < k; ++j) {
    PlotSeries ser{j < 6 ? fmt::format("E#d{}#u", j) : "", s, std::vector<double>(n), SeriesStyle::Line, static_cast<int>(j)};
    for (std::size_t i = 0; i < n; ++i) ser.y[i] = e[i * k + j];
    levels.series.push_back(std::move(ser));
  }
  levels.vertical_lines = {s_star};
  for (const auto& c : caveats) add_line(levels.note, c);
  emit("spectrum", [&](const std::string& path) { render_figure(levels, path); });

  LinePlot gaps;
  gaps.title = "Spectral gap along the anneal";
  const std::string short_definition = definition.substr(0, definition.find(" ("));
  gaps.note = fmt::format("gap = {}; minimum #gD#dmin#u = {:.4g} GHz at s* = {:.4f}", plot_text(short_definition), gap, s_star);
  for (const auto& c : caveats) add_line(gaps.note, c);
  gaps.x_label = "schedule parameter s";
  gaps.y_label = "gap (GHz)";
  gaps.log_y = true;
  auto positive = [](std::vector<double> v) {
    for (double& x : v) if (!(x > 0)) x = std::numeric_limits<double>::quiet_NaN();
    return v;
  };
  gaps.series.push_back({"gap that governs success", s, positive(in.read_finite(G + "/curve/gap")), SeriesStyle::Line, 0});
  if (in.has(G + "/curve/gap_e1_e0"))
    gaps.series.push_back({"E#d1#u − E#d0#u", s, positive(in.read_finite(G + "/curve/gap_e1_e0")), SeriesStyle::Dashed, 1});
  if (gap > 0) gaps.markers.push_back({s_star, gap, fmt::format("#gD#dmin#u = {:.3g} GHz", gap)});
  // Always logarithmic, however few decades the gap spans: the minimum is what
  // the figure is for, and a linear axis squashes it against zero.
  double lo = std::numeric_limits<double>::infinity(), hi = 0;
  for (const auto& ser : gaps.series)
    for (double v : ser.y) if (v > 0 && std::isfinite(v)) { lo = std::min(lo, v); hi = std::max(hi, v); }
  if (hi > 0) gaps.y_range = std::pair{lo / 1.6, hi * 1.6};
  emit("gap", [&](const std::string& path) { render_figure(gaps, path); });
}

// Duration studies: p(t_f) with the predictions beside it, and TTS with its optimum.
void duration_study(const Hdf5Input& in, const Emit& emit) {
  const std::string R = "/durations", P = R + "/points";
  if (!in.has(P + "/duration_ns")) return;
  const auto t = in.read_finite(P + "/duration_ns"), p = in.read_finite(P + "/ground_probability");
  const double target = in.attribute_finite(R, "target_probability");
  auto applicable = [](std::vector<double> v) {  // NaN marks "not applicable" (-1 in files before format 1)
    for (double& x : v) if (x < 0) x = std::numeric_limits<double>::quiet_NaN();
    return v;
  };
  LinePlot fp;
  fp.title = "Ground-state probability against anneal duration";
  fp.x_label = "anneal duration t#df#u (ns)";
  fp.y_label = "ground-state probability p";
  fp.log_x = true;
  fp.y_range = std::pair{0.0, 1.05};
  std::vector<PlotSeries> curves;  // drawn as p here and as 1 - p in the companion figure
  // With a bath (durations --bath): p with the bath beside the closed system's.
  const std::string OS = R + "/open_system";
  const bool bath = in.has(OS + "/duration_ns") && in.has(OS + "/ground_probability");
  std::vector<double> tb, pb;
  std::string bath_label;
  if (bath) {
    tb = in.read_finite(OS + "/duration_ns");
    pb = in.read_finite(OS + "/ground_probability");
    bath_label = fmt::format("with the bath ({:g} mK, #gy = {:g})", in.attribute_finite(OS, "temperature_mk"),
                             in.attribute_finite(OS, "coupling"));
  }
  curves.push_back({bath ? "simulated, closed system" : "simulated", t, p, SeriesStyle::LinePoints, 0});
  if (bath) curves.push_back({bath_label, tb, pb, SeriesStyle::LinePoints, 3});
  if (in.has(P + "/p_landau_zener"))
    curves.push_back({"Landau-Zener at the minimum gap", t, applicable(in.read_finite(P + "/p_landau_zener")), SeriesStyle::Dashed, 1});
  if (in.has(P + "/p_adiabatic"))
    curves.push_back({"adiabatic-condition estimate", t, applicable(in.read_finite(P + "/p_adiabatic")), SeriesStyle::Dashed, 2});
  curves.push_back({fmt::format("target p* = {}", target), {t.front(), t.back()}, {target, target}, SeriesStyle::Line, 6});
  fp.series = curves;
  if (in.has(R + "/predictions")) {
    fp.note = fmt::format("minimum gap #gD#dmin#u = {:.4g} GHz at s* = {:.4f}", in.attribute_finite(R + "/predictions", "gap_ghz"),
                          in.attribute_finite(R + "/predictions", "s_star"));
    if (in.has(R + "/predictions/notes"))
      for (const auto& c : in.read_strings(R + "/predictions/notes")) add_line(fp.note, caveat_line(c));
  }
  // The TTS optimum's caveats, as the terminal prints them.
  std::string tts_caveats;
  if (in.has(R + "/tts_optimum")) {
    const std::string O = R + "/tts_optimum";
    if (in.has_attribute(O, "random_guess_limited") && in.attribute_finite(O, "random_guess_limited") != 0)
      add_line(tts_caveats, caveat_line(fmt::format(
                                "TTS keeps falling toward the shortest t#df#u: p approaches the random-guess value g/2#un#d = {:.4g}, "
                                "so the optimum is only a local one",
                                in.attribute_finite(O, "random_guess_probability"))));
    else if (in.has_attribute(O, "at_range_edge") && in.attribute_finite(O, "at_range_edge") != 0)
      add_line(tts_caveats, caveat_line("the optimum sits at an end of the durations simulated; the true optimum may lie beyond it"));
  }
  emit("probability", [&](const std::string& path) { render_figure(fp, path); });

  // 1 - p on a log axis: where p approaches 1, 99 % and 99.9 % are a decade apart here.
  LinePlot fm;
  fm.title = "Miss probability 1 \u2212 p against anneal duration";
  fm.x_label = fp.x_label;
  fm.y_label = "1 \u2212 p";
  fm.log_x = fm.log_y = true;
  // Only the simulated values are clipped to the floor: the predictions are
  // formulas, and where they fall below the axis the frame cuts them off.
  std::size_t clipped = 0;
  double lo = 1 - target;
  for (auto ser : curves) {
    if (ser.label.rfind("simulated", 0) == 0 || (bath && ser.label == bath_label)) {
      clipped += miss_of(ser.y);
      for (double v : ser.y) if (std::isfinite(v) && v > 0) lo = std::min(lo, v);
    } else {
      for (double& v : ser.y) if (std::isfinite(v)) v = 1 - v;
    }
    if (ser.label.rfind("target", 0) == 0) ser.label = fmt::format("target 1 \u2212 p* = {:.3g}", 1 - target);
    fm.series.push_back(std::move(ser));
  }
  fm.y_range = std::pair{std::pow(10.0, std::floor(std::log10(lo) - 0.3)), 1.5};
  fm.note = fp.note.substr(0, fp.note.find('\n'));
  add_line(fm.note, clip_note(clipped));
  const double tolerance = in.has_attribute(R, "tolerance") ? in.attribute_finite(R, "tolerance") : 0.0;
  if (tolerance > 0 && lo < 10 * tolerance) {
    fm.series.push_back({fmt::format("propagator tolerance {:.0e}", tolerance), {t.front(), t.back()}, {tolerance, tolerance},
                         SeriesStyle::Dashed, 7});
    add_line(fm.note, "caveat: 1 \u2212 p near or below the propagator tolerance is not resolved (rerun with a smaller --tolerance)");
  }
  emit("miss-probability", [&](const std::string& path) { render_figure(fm, path); });

  LinePlot ft;
  ft.title = fmt::format("Time to solution for p* = {}", target);
  ft.x_label = "anneal duration t#df#u (ns)";
  ft.y_label = "TTS (ns)";
  ft.log_x = ft.log_y = true;
  auto tts = in.read_finite(P + "/tts_ns");
  for (double& x : tts) if (!(x > 0) || std::isinf(x)) x = std::numeric_limits<double>::quiet_NaN();  // +inf: p = 0
  ft.series.push_back({bath ? "closed system: TTS(t#df#u) = t#df#u ln(1 − p*) / ln(1 − p)"
                            : "TTS(t#df#u) = t#df#u ln(1 − p*) / ln(1 − p)",
                       t, tts, SeriesStyle::LinePoints, 0});
  if (bath && in.has(OS + "/tts_ns")) {
    auto tts_b = in.read_finite(OS + "/tts_ns");
    for (double& x : tts_b) if (!(x > 0) || std::isinf(x)) x = std::numeric_limits<double>::quiet_NaN();
    ft.series.push_back({bath_label, tb, tts_b, SeriesStyle::LinePoints, 3});
  }
  if (in.has(R + "/tts_optimum")) {
    // tts_ns is +inf when p = 0 at every duration: no optimum to mark.
    const double d = in.attribute_finite(R + "/tts_optimum", "duration_ns"), v = in.attribute_double(R + "/tts_optimum", "tts_ns");
    if (v > 0 && std::isfinite(v)) {
      ft.markers.push_back({d, v, fmt::format("optimum {:.3g} ns at t#df#u = {:.3g} ns", v, d)});
      ft.note = fmt::format("optimal t#df#u = {:.4g} ns, TTS = {:.4g} ns", d, v);
    }
  }
  add_line(ft.note, tts_caveats);
  emit("tts", [&](const std::string& path) { render_figure(ft, path); });
}

// A heat map of ground-state probability over a 2-D grid of shape parameters.
void probability_map(const Hdf5Input& in, const Emit& emit, const std::string& root, const std::string& xname,
                     const std::string& yname, const std::string& kind, const std::string& title,
                     const std::string& x_label, const std::string& y_label, std::string axes_root = {},
                     const std::string& extra_note = {}) {
  if (!in.has(root + "/ground_probability")) return;
  if (axes_root.empty()) axes_root = root;
  HeatMap m;
  m.title = title;
  m.x_label = x_label;
  m.y_label = y_label;
  m.value_label = "ground-state probability p";
  m.x = in.read_finite(axes_root + "/" + xname);
  m.y = in.read_finite(axes_root + "/" + yname);
  m.values = in.read_finite(root + "/ground_probability");
  if (m.values.size() != m.x.size() * m.y.size() || m.x.empty() || m.y.empty()) return;
  // The best cell against the unpaused (or unreversed) reference of the same cost, when the file has one.
  const std::string ref = root + "/reference_ground_probability";
  std::vector<double> reference = in.has(ref) ? in.read_finite(ref) : std::vector<double>{};
  if (reference.size() != m.y.size()) reference.clear();
  std::size_t bi = 0, bj = 0;
  double best = -std::numeric_limits<double>::infinity();
  for (std::size_t i = 0; i < m.x.size(); ++i)
    for (std::size_t j = 0; j < m.y.size(); ++j) {
      const double v = m.values[i * m.y.size() + j] - (reference.empty() ? 0.0 : reference[j]);
      if (v > best) { best = v; bi = i; bj = j; }
    }
  const double pb = m.values[bi * m.y.size() + bj];
  if (!reference.empty()) {
    const std::string cost = in.has_attribute(axes_root, "cost") ? in.attribute_string(axes_root, "cost") : "";
    m.note = fmt::format("best {:.4f} against {:.4f} without a pause at the same cost ({}{})", pb, reference[bj],
                         cost.empty() ? "" : cost + ", ",
                         in.has_attribute(axes_root, "duration_ns") ? fmt::format("T = {:g} ns", in.attribute_finite(axes_root, "duration_ns")) : "");
    m.markers.push_back({m.x[bi], m.y[bj], fmt::format("best p = {:.4f}", pb)});
  } else {
    m.note = fmt::format("best p = {:.4f} at ({:.4g}, {:.4g})", pb, m.x[bi], m.y[bj]);
    m.markers.push_back({m.x[bi], m.y[bj], fmt::format("best p = {:.4f}", pb)});
  }
  add_line(m.note, extra_note);
  emit(kind, [&](const std::string& path) { render_figure(m, path); });
  // Where the best cells come near p = 1 the linear colour scale cannot tell
  // 0.99 from 0.999: a companion map of log10(1 - p).
  if (pb < 0.9) return;
  HeatMap miss = m;
  miss.title = title + ", miss probability";
  miss.value_label = "log#d10#u(1 − p)";
  const std::size_t clipped = miss_of(miss.values);
  for (double& v : miss.values) if (std::isfinite(v)) v = std::log10(v);
  miss.markers = {{m.x[bi], m.y[bj], fmt::format("best 1 − p = {:.3g}", std::max(1 - pb, kMissFloor))}};
  miss.note = m.note;
  add_line(miss.note, clip_note(clipped));
  emit(kind + "-miss", [&](const std::string& path) { render_figure(miss, path); });
}

// compare-paths results: populations of the lowest instantaneous levels along s.
void level_populations(const Hdf5Input& in, const Emit& emit) {
  if (!in.has("/compare")) return;
  for (int i = 0; in.has(fmt::format("/compare/path_{}", i)); ++i) {
    const std::string name = in.attribute_string(fmt::format("/compare/path_{}", i), "name");
    for (int j = 0; in.has(fmt::format("/compare/path_{}/duration_{}/level_population", i, j)); ++j) {
      const std::string g = fmt::format("/compare/path_{}/duration_{}", i, j);
      const auto t = in.read_finite(g + "/t");
      auto pop = in.read_finite(g + "/level_population");
      const std::size_t n = t.size(), k = n ? pop.size() / n : 0;
      if (!n || pop.size() != n * k) continue;
      if (in.has(g + "/level_resolved")) {  // unresolved levels are gaps in the curves
        const auto ok = in.read_finite(g + "/level_resolved");
        for (std::size_t q = 0; q < pop.size() && q < ok.size(); ++q)
          if (ok[q] == 0.0) pop[q] = std::numeric_limits<double>::quiet_NaN();
      }
      LinePlot fig;
      fig.title = fmt::format("Populations of the lowest instantaneous levels: path '{}'", name);
      fig.note = fmt::format("duration {:.4g} ns, final ground-state probability {:.6f}",
                             in.attribute_finite(g, "duration_ns"), in.attribute_finite(g, "ground_probability"));
      fig.x_label = "time t (ns)";
      fig.y_label = "population";
      fig.y_range = std::pair{0.0, 1.05};
      add_level_series(fig, t, pop, k);
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
    fig.raise_top_for_legend = true;  // sizes on x, times or gaps on y: room above is harmless
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
       fmt::format("{}; t#df#u = {:g} to {:g} ns; optimum at a range end: {} of {}; never solved: {}", counts,
                   r.settings.durations_ns.front(), r.settings.durations_ns.back(), edge, instances, never));
  draw("ensemble-gap", [](const SizeSummary& s) -> const SampleSummary& { return s.gap_ghz; },
       "Minimum spectral gap against problem size", "minimum gap (GHz)", "median", counts);
  if (r.settings.bath) {  // ensemble --bath: the same TTS figure with the bath
    std::size_t bath_edge = 0, bath_never = 0;
    for (const auto& s : r.sizes) {
      bath_edge += s.bath_tts_at_range_edge;
      bath_never += s.bath_never_solved;
    }
    draw("ensemble-tts-bath", [](const SizeSummary& s) -> const SampleSummary& { return s.bath_tts_ns; },
         fmt::format("Optimal time to solution with the bath ({:g} mK, eta {:g}; p* = {:g})",
                     r.settings.bath->temperature_mk, r.settings.bath->coupling, r.settings.target_probability),
         "optimal TTS with the bath (ns)", "median",
         fmt::format("{}; t#df#u = {:g} to {:g} ns; optimum at a range end: {} of {}; never solved: {}", counts,
                     r.settings.durations_ns.front(), r.settings.durations_ns.back(), bath_edge, instances, bath_never));
  }
}

// embed-cost results: what the chain strength does to p, to the duration needed and to the gap.
void chain_strength_scan(const Hdf5Input& in, const Emit& emit) {
  const std::string E = "/embedding", S = E + "/scan";
  if (!in.has(S + "/chain_coupling")) return;
  const auto c = in.read_finite(S + "/chain_coupling");
  if (c.empty()) return;
  const double best = in.attribute_finite(E, "best_chain_coupling");
  const double bound = in.attribute_finite(E, "chain_coupling_bound");
  const double t_f = in.attribute_finite(E, "duration_ns"), target = in.attribute_finite(E, "target");
  const std::pair<double, double> c_span{c.front(), c.back()};
  auto constant = [&](double v) { return std::vector<double>{v, v}; };
  const std::vector<double> c_ends{c_span.first, c_span.second};
  const std::string bound_text =
      fmt::format("vertical line: chain coupling {:.3g}; above it every physical ground state has intact chains", bound);

  LinePlot fp;
  fp.title = fmt::format("Chain strength and success at t#df#u = {:.4g} ns", t_f);
  // Short legend labels (a legend this size finds a free corner); what they
  // mean goes into the note.
  fp.note = "p#dlogical#u: logical ground state by majority vote per chain; p#dphysical#u: physical ground states\n"
            "broken-chain share: the expected share of chains that end broken\n" + bound_text;
  fp.x_label = "chain coupling |J#dchain#u| (problem units)";
  fp.y_label = "probability / fraction";
  fp.y_range = std::pair{0.0, 1.05};
  fp.series.push_back({"p#dlogical#u", c, in.read_finite(S + "/p_logical"), SeriesStyle::LinePoints, 0});
  fp.series.push_back({"p#dphysical#u", c, in.read_finite(S + "/p_physical"), SeriesStyle::Dashed, 1});
  fp.series.push_back({"broken-chain share", c, in.read_finite(S + "/broken_chain_share"), SeriesStyle::LinePoints, 2});
  fp.series.push_back({fmt::format("unembedded: p = {:.4f}",
                                   in.attribute_finite(E + "/logical", "ground_probability")),
                       c_ends, constant(in.attribute_finite(E + "/logical", "ground_probability")), SeriesStyle::Dashed, 6});
  if (bound >= c_span.first && bound <= c_span.second) fp.vertical_lines.push_back(bound);
  emit("chain-probability", [&](const std::string& path) { render_figure(fp, path); });

  // The needed duration, split by what the search established (bounds apart).
  const auto needed = in.read_finite(S + "/needed_duration");
  const std::vector<double> kind = in.has(S + "/needed_bound") ? in.read_finite(S + "/needed_bound")
                                                               : std::vector<double>(c.size(), 0.0);
  const double nan = std::numeric_limits<double>::quiet_NaN();
  std::vector<double> bracketed(c.size(), nan), above(c.size(), nan), below(c.size(), nan);
  for (std::size_t k = 0; k < c.size() && k < needed.size() && k < kind.size(); ++k)
    (kind[k] > 0 ? above : kind[k] < 0 ? below : bracketed)[k] = needed[k];
  LinePlot fd;
  fd.title = fmt::format("Anneal duration needed for p#dlogical#u ≥ {}", target);
  fd.note = bound_text;
  fd.x_label = "chain coupling |J#dchain#u| (problem units)";
  fd.y_label = "duration needed (ns)";
  fd.log_y = true;
  fd.series.push_back({"embedded problem", c, bracketed, SeriesStyle::LinePoints, 0});
  fd.series.push_back({"not reached: longer than this", c, above, SeriesStyle::Points, 1});
  fd.series.push_back({"reached at the shortest duration tried", c, below, SeriesStyle::Points, 2});
  const double logical_ns = in.attribute_finite(E + "/logical", "needed_ns");
  if (logical_ns > 0)
    fd.series.push_back({fmt::format("logical problem, unembedded: {}", in.attribute_string(E + "/logical", "needed")),
                         c_ends, constant(logical_ns), SeriesStyle::Dashed, 6});
  for (std::size_t k = 0; k < c.size() && k < needed.size(); ++k)
    if (c[k] == best && needed[k] > 0)
      fd.markers.push_back({c[k], needed[k], fmt::format("best: {:.4g} ns", needed[k])});
  if (bound >= c_span.first && bound <= c_span.second) fd.vertical_lines.push_back(bound);
  emit("chain-duration", [&](const std::string& path) { render_figure(fd, path); });

  LinePlot fg;
  fg.title = "Minimum gap of the embedded problem";
  fg.note = bound_text;
  fg.x_label = "chain coupling |J#dchain#u| (problem units)";
  fg.y_label = "minimum gap (GHz)";
  const auto gaps = in.read_finite(S + "/min_gap");
  const double logical_gap = in.attribute_finite(E + "/logical", "min_gap_ghz");
  double top = logical_gap;
  for (double g : gaps) if (std::isfinite(g)) top = std::max(top, g);
  fg.y_range = std::pair{0.0, 1.1 * top};  // linear from zero: a closing gap reads as one
  fg.series.push_back({"embedded problem", c, gaps, SeriesStyle::LinePoints, 0});
  fg.series.push_back({fmt::format("logical problem, unembedded: {:.4g} GHz", logical_gap), c_ends, constant(logical_gap),
                       SeriesStyle::Dashed, 6});
  if (bound >= c_span.first && bound <= c_span.second) fg.vertical_lines.push_back(bound);
  emit("chain-gap", [&](const std::string& path) { render_figure(fg, path); });
}

// diagnose results: the gap along s with each crossing marked, and how much of
// each instantaneous level lies on the classical ground manifold.
void diagnosis(const Hdf5Input& in, const Emit& emit) {
  const std::string D = "/diagnosis";
  if (!in.has(D + "/spectrum/gap")) return;
  const auto s = in.read_finite(D + "/spectrum/s");
  auto gap = in.read_finite(D + "/spectrum/gap");
  for (double& x : gap) if (!(x > 0)) x = std::numeric_limits<double>::quiet_NaN();
  LinePlot fg;
  fg.title = "Diagnosis: the gap that governs success, crossings marked";
  fg.note = fmt::format("minimum #gD#dmin#u = {:.4g} GHz at s* = {:.4f}", in.attribute_finite(D, "gap_ghz"), in.attribute_finite(D, "s_star"));
  fg.x_label = "schedule parameter s";
  fg.y_label = "gap (GHz)";
  fg.log_y = true;
  fg.series.push_back({plot_text(in.attribute_string(D, "gap_definition").substr(0, in.attribute_string(D, "gap_definition").find(" ("))),
                       s, gap, SeriesStyle::Line, 0});
  if (in.has(D + "/crossings/s_star")) {
    const auto xs = in.read_finite(D + "/crossings/s_star"), xd = in.read_finite(D + "/crossings/delta_min");
    const auto late = in.read_finite(D + "/crossings/perturbative_crossing_index"), end = in.read_finite(D + "/crossings/end_gap");
    for (std::size_t k = 0; k < xs.size() && k < xd.size(); ++k) {
      if (!(xd[k] > 0)) continue;
      const char* what = k < end.size() && end[k] != 0 ? "end gap" : k < late.size() && late[k] >= 0 ? "perturbative crossing" : "crossing";
      fg.markers.push_back({xs[k], xd[k], fmt::format("{} {}: {:.3g} GHz", what, k + 1, xd[k])});
    }
  }
  if (in.has(D + "/overlap/perturbative_crossing_s")) fg.vertical_lines = in.read_finite(D + "/overlap/perturbative_crossing_s");
  if (!fg.vertical_lines.empty()) add_line(fg.note, "dotted: where the ground level switches classical level (perturbative crossing)");
  if (std::any_of(fg.markers.begin(), fg.markers.end(), [](const PlotMarker& mk) { return mk.text.rfind("end gap", 0) == 0; }))
      add_line(fg.note, "caveat: an end gap is the smallest gap at an end of the path, not a crossing passed through "
                        "(no Landau-Zener number)");
  emit("diagnosis-gap", [&](const std::string& path) { render_figure(fg, path); });

  if (!in.has(D + "/overlap/ground_weight")) return;
  const auto os = in.read_finite(D + "/overlap/s");
  const auto w = in.read_finite(D + "/overlap/ground_weight");
  const std::size_t n = os.size(), k = n ? w.size() / n : 0;
  if (!n || !k || w.size() != n * k) return;
  LinePlot fw;
  fw.title = "Diagnosis: weight of each instantaneous level on the classical ground states";
  fw.note = "a level that ends in the ground manifold rises to 1 at s = 1; a perturbative crossing shows as a step";
  fw.x_label = "schedule parameter s";
  fw.y_label = "weight on the ground manifold";
  fw.y_range = std::pair{0.0, 1.05};
  add_level_series(fw, os, w, k);  // -1: level not tracked there
  fw.vertical_lines = fg.vertical_lines;
  emit("diagnosis-ground-weight", [&](const std::string& path) { render_figure(fw, path); });
}

}  // namespace

void check_figure_stems_differ(const std::vector<std::string>& result_files) {
  namespace fs = std::filesystem;
  for (std::size_t i = 0; i < result_files.size(); ++i)
    for (std::size_t j = 0; j < i; ++j)
      if (fs::path(result_files[i]).stem() == fs::path(result_files[j]).stem())
        throw InputError({result_files[i], 0, 0, "results"},
                         fmt::format("'{}' and '{}' have the same name stem '{}', so their figures would be written to "
                                     "the same files, one over the other",
                                     result_files[j], result_files[i], fs::path(result_files[i]).stem().string()),
                         "draw them in two runs with different --out-dir, or rename one of them");
}

std::vector<std::string> draw_result_figures(const std::string& result_file, const std::string& out_dir,
                                             const std::vector<std::string>& formats,
                                             const std::vector<std::string>& other_inputs) {
  namespace fs = std::filesystem;
  // Refused before anything is read or created.
  const auto known = figure_formats();
  if (known.empty())
    throw InputError({result_file, 0, 0, ""}, "this gapwise was built without figures (PLplot was not found or "
                     "GAPWISE_FIGURES was OFF at build time)",
                     "install libplplot-dev and rebuild: cmake -S . -B build -DGAPWISE_FIGURES=ON && cmake --build build");
  for (const auto& f : formats)
    if (std::find(known.begin(), known.end(), f) == known.end())
      throw InputError({"--format", 0, 0, "--format"}, fmt::format("unknown figure format '{}'", f),
                       "use svg (text kept as text), png or pdf, comma-separated: --format svg,pdf");
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
      FilePlan plan;
      plan.input(result_file, "result");
      for (const auto& other : other_inputs) plan.input(other, "result");
      check_file_plan(plan.output(path, "figure"));
      draw(path);
      written.push_back(path);
    }
  };
  anneal_trace(in, emit);
  spectrum(in, emit);
  duration_study(in, emit);
  probability_map(in, emit, "/pause_map", "pause_s", "pause_ns", "pause-map", "Pause map: ground-state probability",
                  "pause location s#dp#u", "pause duration (ns)");
  // pause-map --bath: the thermal map beside the closed one (same axes, own colour scale).
  if (in.has("/pause_map/open_system/ground_probability")) {
    const std::string OS = "/pause_map/open_system";
    probability_map(in, emit, OS, "pause_s", "pause_ns", "pause-map-bath",
                    "Pause map with the bath: ground-state probability", "pause location s#dp#u", "pause duration (ns)",
                    "/pause_map",
                    fmt::format("bath {:g} mK, #gy = {:g}, cutoff {:g} GHz (adiabatic master equation); closed "
                                "system: {}-pause-map",
                                in.attribute_finite(OS, "temperature_mk"), in.attribute_finite(OS, "coupling"),
                                in.attribute_finite(OS, "cutoff_ghz"),
                                std::filesystem::path(result_file).stem().string()));
  }
  probability_map(in, emit, "/reverse_map", "turn_s", "dwell_ns", "reverse-map",
                  "Reverse anneal: ground-state probability", "turn point s#dturn#u", "dwell (ns)");
  level_populations(in, emit);
  ensemble_scaling(in, emit);
  chain_strength_scan(in, emit);
  diagnosis(in, emit);
  thermal_channel_figures(in, emit);
  if (written.empty())
    throw InputError({result_file, 0, 0, ""}, "this file holds no result that gapwise can draw",
                     "give a file written with --out by anneal or another study subcommand");
  return written;
}

}  // namespace gapwise
