#include "io/figure_plot.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <filesystem>
#include <limits>
#include <stdexcept>

#include <fmt/format.h>

#include "io/atomic_file.hpp"

#ifdef GAPWISE_HAVE_PLPLOT
#include <plstream.h>

namespace gapwise {
namespace {

// A palette that stays distinguishable in print (colour-blind-safe order).
constexpr int kPalette[][3] = {{0, 114, 178}, {213, 94, 0}, {0, 158, 115}, {204, 121, 167},
                               {230, 159, 0}, {86, 180, 233}, {120, 120, 120}, {0, 0, 0}};
constexpr int kPaletteSize = 8;
constexpr int kGridColour = 12;

// PLplot's own "svg" device keeps text as <text> elements (searchable, editable
// in a drawing program); its cairo SVG device would outline every glyph.
std::string device_for(const std::string& path) {
  const std::string ext = std::filesystem::path(path).extension().string();
  if (ext == ".svg") return "svg";
  if (ext == ".png") return "pngcairo";
  if (ext == ".pdf") return "pdfcairo";
  throw std::runtime_error(fmt::format("unknown figure format '{}' (use .svg, .png or .pdf)", ext));
}

std::vector<std::string> split_lines(const std::string& text) {
  std::vector<std::string> lines;
  std::size_t from = 0;
  while (from <= text.size() && !text.empty()) {
    const std::size_t to = text.find('\n', from);
    lines.push_back(text.substr(from, to == std::string::npos ? std::string::npos : to - from));
    if (to == std::string::npos) break;
    from = to + 1;
  }
  return lines;
}

// The top of the frame (page fraction) leaves room for the title and its note lines.
double frame_top(const std::string& note, double top) {
  const auto n = split_lines(note).size();
  return n > 0 ? top - 0.01 - 0.04 * static_cast<double>(n - 1) : top;
}

struct Stream {
  plstream pls;
  std::string temp, final_path;
  explicit Stream(const std::string& path) : temp(temporary_path_for(path)), final_path(path) {
    pls.sdev(device_for(path).c_str());
    pls.sfnam(temp.c_str());
    pls.spage(0, 0, 1000, 700, 0, 0);
    pls.scolbg(255, 255, 255);
    pls.scmap0n(16);
    pls.scol0(0, 255, 255, 255);  // background
    pls.scol0(1, 0, 0, 0);        // axes and text
    for (int k = 0; k < kPaletteSize; ++k) pls.scol0(2 + k, kPalette[k][0], kPalette[k][1], kPalette[k][2]);
    pls.scol0(kGridColour, 215, 215, 215);
    pls.init();
    pls.schr(0, 0.95);
  }
};

// The title above the frame, with lines of small text (one per '\n' of `note`) under it.
void draw_title(plstream& p, const std::string& title, const std::string& note) {
  const auto lines = split_lines(note);
  constexpr double kNoteScale = 0.75, kTitleScale = 0.95, kLineStep = 1.7;  // room for sub- and superscripts
  // mtex displacements count heights of the current characters.
  constexpr double kFirstLine = 1.4;  // a subscript on the lowest line stays clear of the frame
  const double note_top = lines.empty() ? 0.0 : kFirstLine + kLineStep * static_cast<double>(lines.size() - 1);
  p.mtex("t", lines.empty() ? 1.2 : note_top * kNoteScale / kTitleScale + 1.5, 0.5, 0.5, title.c_str());
  p.schr(0, kNoteScale);
  for (std::size_t k = 0; k < lines.size(); ++k)
    p.mtex("t", kFirstLine + kLineStep * static_cast<double>(lines.size() - 1 - k), 0.5, 0.5, lines[k].c_str());
  p.schr(0, kTitleScale);
}

std::vector<double> transformed(const std::vector<double>& v, bool log) {
  std::vector<double> out;
  out.reserve(v.size());
  for (double x : v) out.push_back(log ? (x > 0 ? std::log10(x) : std::numeric_limits<double>::quiet_NaN()) : x);
  return out;
}

// The finite data range of one axis (log10 when log), series, error bars and bands included.
std::pair<double, double> range_of(const LinePlot& plot, bool y, bool log) {
  double lo = std::numeric_limits<double>::infinity(), hi = -lo;
  auto take = [&](const std::vector<double>& v) {
    for (double t : transformed(v, log))
      if (std::isfinite(t)) { lo = std::min(lo, t); hi = std::max(hi, t); }
  };
  for (const auto& s : plot.series) {
    take(y ? s.y : s.x);
    if (y) { take(s.y_low); take(s.y_high); }
  }
  for (const auto& b : plot.bands) {
    if (y) { take(b.low); take(b.high); } else take(b.x);
  }
  if (!std::isfinite(lo)) throw std::runtime_error("nothing to plot: no finite data");
  if (hi - lo < 1e-12 * std::max(1.0, std::abs(hi))) { lo -= 0.5; hi += 0.5; }
  const double pad = 0.04 * (hi - lo);
  return {lo - pad, hi + pad};
}

// A log axis spanning few decades gets labels and grid lines at 2 and 5 times
// each power of ten too (PLplot labels the powers only).
constexpr double kFewDecades = 2.5;

std::string plain_number(double v) { return fmt::format("{:g}", v); }

void label_log_axis_125(plstream& p, bool y_axis, double lo, double hi) {
  for (int k = static_cast<int>(std::floor(lo)) - 1; k <= static_cast<int>(std::ceil(hi)); ++k)
    for (double m : {2.0, 5.0}) {
      const double v = k + std::log10(m);
      if (v < lo || v > hi) continue;
      const double pos = (v - lo) / (hi - lo);
      const std::string text = plain_number(m * std::pow(10.0, k));
      if (y_axis) p.mtex("lv", 0.5, pos, 1.0, text.c_str());
      else p.mtex("b", 1.5, pos, 0.5, text.c_str());
    }
}

void grid_log_axis_125(plstream& p, bool y_axis, double lo, double hi, double other_lo, double other_hi) {
  for (int k = static_cast<int>(std::floor(lo)) - 1; k <= static_cast<int>(std::ceil(hi)); ++k)
    for (double m : {2.0, 5.0}) {
      const double v = k + std::log10(m);
      if (v < lo || v > hi) continue;
      const PLFLT a[2] = {v, v}, b[2] = {other_lo, other_hi};
      if (y_axis) p.line(2, b, a);
      else p.line(2, a, b);
    }
}

// Splits a series at non-finite points so gaps stay gaps.
template <class F>
void for_finite_runs(const std::vector<double>& x, const std::vector<double>& y, F f) {
  std::vector<double> rx, ry;
  for (std::size_t k = 0; k < std::min(x.size(), y.size()); ++k) {
    if (std::isfinite(x[k]) && std::isfinite(y[k])) { rx.push_back(x[k]); ry.push_back(y[k]); continue; }
    if (!rx.empty()) f(rx, ry);
    rx.clear(); ry.clear();
  }
  if (!rx.empty()) f(rx, ry);
}

// PLplot's cairo drivers do not report failed writes (a full disk, a file-size
// limit): the file they leave can be cut off or empty. So the finished
// temporary file is checked for the end every complete image has (PNG: the
// IEND chunk; SVG: the closing </svg> tag; PDF: the %%EOF marker) before it is renamed over `path`;
// a cut-off image is removed and reported, and a previous file is kept.
void commit_figure(const std::string& path) {
  const std::string temp = temporary_path_for(path);
  std::string tail;
  std::uintmax_t size = 0;
  if (std::FILE* f = std::fopen(temp.c_str(), "rb")) {
    std::fseek(f, 0, SEEK_END);
    size = static_cast<std::uintmax_t>(std::max(0L, std::ftell(f)));
    const long n = static_cast<long>(std::min<std::uintmax_t>(size, 64));
    std::fseek(f, -n, SEEK_END);
    tail.resize(static_cast<std::size_t>(n));
    tail.resize(std::fread(tail.data(), 1, tail.size(), f));
    std::fclose(f);
  }
  const std::string ext = std::filesystem::path(path).extension().string();
  const bool png = ext == ".png";
  static const std::string png_end("\0\0\0\0IEND\xae\x42\x60\x82", 12);
  while (!png && !tail.empty() && std::isspace(static_cast<unsigned char>(tail.back()))) tail.pop_back();
  const std::string end = png ? png_end : ext == ".pdf" ? std::string("%%EOF") : std::string("</svg>");
  if (tail.size() < end.size() || tail.compare(tail.size() - end.size(), end.size(), end) != 0) {
    std::remove(temp.c_str());
    throw std::runtime_error(fmt::format(
        "cannot write '{}': the image came out incomplete ({} bytes, no {} end); the disk may be full or a "
        "file-size limit reached. Nothing was written under that name (an earlier file of that name is kept)",
        path, size, png ? "PNG" : ext == ".pdf" ? "PDF" : "SVG"));
  }
  commit_temporary(temp, path);
}

// Draws with `draw` into the temporary file of `path` and commits it; the
// temporary file never outlives a failure.
template <class Draw>
void draw_figure_file(const std::string& path, Draw draw) {
  try {
    {
      Stream s(path);
      draw(s.pls);
    }  // plstream destructor closes the file
    commit_figure(path);
  } catch (...) {
    std::remove(temporary_path_for(path).c_str());
    throw;
  }
}

// Characters a label shows: PLplot escapes (#d, #u, #g<letter>) and UTF-8
// continuation bytes do not widen it.
std::size_t visible_length(const std::string& text) {
  std::size_t n = 0;
  for (std::size_t k = 0; k < text.size(); ++k) {
    const unsigned char c = static_cast<unsigned char>(text[k]);
    if ((c & 0xC0) == 0x80) continue;
    if (c == '#' && k + 1 < text.size() && (text[k + 1] == 'd' || text[k + 1] == 'u')) { ++k; continue; }
    if (c == '#' && k + 1 < text.size() && text[k + 1] == 'g') { ++k; continue; }  // the letter after counts
    ++n;
  }
  return n;
}

// Legend size in frame units, measured on rendered figures of 1000 x 700 pixels
// (frame 850 x 520): a 24-character label gives a box 0.40 wide, 39 characters
// 0.59; each entry adds 0.073 of the height.
constexpr double kLegendBase = 0.095, kLegendPerChar = 0.0127, kLegendPerEntry = 0.073;

// Positions the frame shows data at, in frame units: points, line segments
// (sampled), band edges and interiors, markers with their text, vertical lines.
// With `references` false, reference lines (two-point series at one value, e.g.
// a target, and the dotted vertical lines) are left out: a legend over part of
// one hides nothing, the rest of the line stays in view.
std::vector<std::pair<double, double>> occupied_points(const LinePlot& plot, double x0, double x1, double y0, double y1,
                                                       bool references = true) {
  std::vector<std::pair<double, double>> pts;
  auto to_frame = [&](double x, double y) { return std::pair{(x - x0) / (x1 - x0), (y - y0) / (y1 - y0)}; };
  auto add_curve = [&](const std::vector<double>& xs, const std::vector<double>& ys, bool joined) {
    for_finite_runs(xs, ys, [&](const std::vector<double>& rx, const std::vector<double>& ry) {
      for (std::size_t k = 0; k < rx.size(); ++k) {
        pts.push_back(to_frame(rx[k], ry[k]));
        if (!joined || k + 1 == rx.size()) continue;
        for (int j = 1; j < 24; ++j) {
          const double f = j / 24.0;
          pts.push_back(to_frame(rx[k] + f * (rx[k + 1] - rx[k]), ry[k] + f * (ry[k + 1] - ry[k])));
        }
      }
    });
  };
  for (const auto& ser : plot.series) {
    if (!references && ser.x.size() == 2 && ser.y.size() == 2 && ser.y[0] == ser.y[1]) continue;
    const auto xs = transformed(ser.x, plot.log_x), ys = transformed(ser.y, plot.log_y);
    add_curve(xs, ys, ser.style != SeriesStyle::Points);
    if (ser.y_low.size() == ser.y.size() && ser.y_high.size() == ser.y.size()) {
      add_curve(xs, transformed(ser.y_low, plot.log_y), false);
      add_curve(xs, transformed(ser.y_high, plot.log_y), false);
    }
  }
  for (const auto& b : plot.bands) {
    const auto xs = transformed(b.x, plot.log_x), lo = transformed(b.low, plot.log_y), hi = transformed(b.high, plot.log_y);
    for (double f : {0.0, 0.25, 0.5, 0.75, 1.0}) {
      std::vector<double> mid(std::min(lo.size(), hi.size()));
      for (std::size_t k = 0; k < mid.size(); ++k) mid[k] = lo[k] + f * (hi[k] - lo[k]);
      add_curve(xs, mid, true);
    }
  }
  for (const auto& m : plot.markers) {
    const double mx = plot.log_x ? std::log10(m.x) : m.x, my = plot.log_y ? std::log10(m.y) : m.y;
    if (!std::isfinite(mx) || !std::isfinite(my)) continue;
    const auto [fx, fy] = to_frame(mx, my);
    const double w = kLegendPerChar * static_cast<double>(visible_length(m.text));
    const bool right_half = mx > x0 + 0.6 * (x1 - x0);
    for (int j = 0; j <= 12; ++j) {
      const double tx = right_half ? fx - w * j / 12.0 : fx + w * j / 12.0;
      pts.push_back({tx, fy});
      pts.push_back({tx, fy + 0.06});
    }
  }
  for (double v : plot.vertical_lines) {
    if (!references) break;
    const double xv = plot.log_x ? std::log10(v) : v;
    for (int j = 0; j <= 40; ++j) pts.push_back({(xv - x0) / (x1 - x0), j / 40.0});
  }
  return pts;
}

}  // namespace

LinePlot::Legend free_legend_corner(const std::vector<std::pair<double, double>>& points, double width, double height) {
  constexpr double kOffset = 0.02, kMargin = 0.015;
  using L = LinePlot::Legend;
  for (L corner : {L::TopRight, L::TopLeft, L::BottomRight, L::BottomLeft}) {
    const bool right = corner == L::TopRight || corner == L::BottomRight, top = corner == L::TopRight || corner == L::TopLeft;
    const double bx0 = right ? 1 - kOffset - width - kMargin : kOffset - kMargin, bx1 = bx0 + width + 2 * kMargin;
    const double by0 = top ? 1 - kOffset - height - kMargin : kOffset - kMargin, by1 = by0 + height + 2 * kMargin;
    const bool covered = std::any_of(points.begin(), points.end(), [&](const auto& q) {
      return q.first >= bx0 && q.first <= bx1 && q.second >= by0 && q.second <= by1;
    });
    if (!covered && width < 1 - 2 * kOffset && height < 1 - 2 * kOffset) return corner;
  }
  return L::Outside;
}

void render_figure(const LinePlot& requested, const std::string& path) {
  check_output_path(path, "figure");
  // A log axis over less than a decade and a half shows one or two labels at
  // most; such data read better on a linear axis.
  LinePlot plot = requested;
  for (bool y : {false, true}) {
    bool& log = y ? plot.log_y : plot.log_x;
    if (log && !(y ? plot.y_range : plot.x_range)) {
      auto [lo, hi] = range_of(plot, y, true);
      if (hi - lo < 1.5) log = false;
    }
  }
  // Plain variables, not structured bindings: clang 14 (the fuzz build) cannot
  // capture a structured binding in the drawing lambda below.
  const auto [x0_, x1_] = plot.x_range ? std::pair{plot.log_x ? std::log10(plot.x_range->first) : plot.x_range->first,
                                           plot.log_x ? std::log10(plot.x_range->second) : plot.x_range->second}
                               : range_of(plot, false, plot.log_x);
  const auto [y0_, y1_] = plot.y_range ? std::pair{plot.log_y ? std::log10(plot.y_range->first) : plot.y_range->first,
                                           plot.log_y ? std::log10(plot.y_range->second) : plot.y_range->second}
                               : range_of(plot, true, plot.log_y);
  const double x0 = x0_, x1 = x1_, y0 = y0_;
  double y1 = y1_;
  std::size_t entries = 0, longest = 0;
  for (const auto& b : plot.bands)
    if (!b.label.empty()) { ++entries; longest = std::max(longest, visible_length(b.label)); }
  for (const auto& ser : plot.series) {  // a series with no point to draw has no legend entry either
    bool any = false;
    for (std::size_t k = 0; k < std::min(ser.x.size(), ser.y.size()); ++k)
      any = any || (std::isfinite(ser.x[k]) && std::isfinite(ser.y[k]) && (!plot.log_y || ser.y[k] > 0));
    if (any && !ser.label.empty()) { ++entries; longest = std::max(longest, visible_length(ser.label)); }
  }
  const double legend_w = kLegendBase + kLegendPerChar * static_cast<double>(longest);
  if (plot.legend == LinePlot::Legend::Auto) {
    const double legend_h = kLegendPerEntry * static_cast<double>(entries) + 0.01;
    plot.legend = entries == 0 ? LinePlot::Legend::TopRight
                               : free_legend_corner(occupied_points(plot, x0, x1, y0, y1), legend_w, legend_h);
    if (plot.legend == LinePlot::Legend::Outside)  // no corner free of everything: one free of data
      plot.legend = free_legend_corner(occupied_points(plot, x0, x1, y0, y1, false), legend_w, legend_h);
    if (plot.legend == LinePlot::Legend::Outside && plot.raise_top_for_legend) {
      // Still no free corner: raise the top of the y axis by the legend's height
      // (data keep their place, the frame keeps its width) and try the top corners.
      const double room = legend_h + 0.06;
      const double raised = y1 + (y1 - y0) * room / (1 - room);
      const LinePlot::Legend corner = free_legend_corner(occupied_points(plot, x0, x1, y0, raised), legend_w, legend_h);
      if (corner == LinePlot::Legend::TopRight || corner == LinePlot::Legend::TopLeft) {
        plot.legend = corner;
        y1 = raised;
      }
    }
  }
  // Outside: the frame gives up the width of the legend on the right.
  const double frame_right = plot.legend == LinePlot::Legend::Outside ? std::max(0.45, 0.93 - 0.85 * legend_w) : 0.95;
  draw_figure_file(path, [&](plstream& p) {
    p.adv(0);
    p.vpor(0.1, frame_right, 0.12, frame_top(plot.note, 0.86));
    p.wind(x0, x1, y0, y1);
    p.width(1.0);
    const bool few_x = plot.log_x && x1 - x0 <= kFewDecades, few_y = plot.log_y && y1 - y0 <= kFewDecades;
    const double xtick = plot.log_x ? 0 : plot.x_tick;
    p.col0(kGridColour);  // light grid first, then bands, axes over them
    p.box(plot.log_x ? "gl" : "g", xtick, 0, plot.log_y ? "gl" : "g", 0, 0);
    if (few_x) grid_log_axis_125(p, false, x0, x1, y0, y1);
    if (few_y) grid_log_axis_125(p, true, y0, y1, x0, x1);

    std::vector<PLINT> opt, lcol, lsty, scol, snum, bcol, bpat;
    std::vector<PLFLT> lwid, sscale, bsc, blw;
    std::vector<const char*> texts, syms;
    int next = 0;
    constexpr int kFirstBandColour = 13, kBandColours = 3;
    for (std::size_t b = 0; b < plot.bands.size() && b < kBandColours; ++b) {
      const auto& band = plot.bands[b];
      const int pal = (band.color >= 0 ? band.color : next++) % kPaletteSize;
      const int col = kFirstBandColour + static_cast<int>(b);
      p.scol0a(col, kPalette[pal][0], kPalette[pal][1], kPalette[pal][2], 0.22);
      const auto xs = transformed(band.x, plot.log_x), lo = transformed(band.low, plot.log_y),
                 hi = transformed(band.high, plot.log_y);
      std::vector<double> rx, rlo, rhi;
      auto flush = [&] {
        if (rx.size() >= 2) {
          std::vector<PLFLT> px(rx), py(rlo);
          for (std::size_t k = rx.size(); k-- > 0;) { px.push_back(rx[k]); py.push_back(rhi[k]); }
          p.col0(col);
          p.fill(static_cast<PLINT>(px.size()), px.data(), py.data());
        }
        rx.clear(); rlo.clear(); rhi.clear();
      };
      for (std::size_t k = 0; k < std::min({xs.size(), lo.size(), hi.size()}); ++k) {
        if (std::isfinite(xs[k]) && std::isfinite(lo[k]) && std::isfinite(hi[k])) {
          rx.push_back(xs[k]); rlo.push_back(lo[k]); rhi.push_back(hi[k]);
        } else flush();
      }
      flush();
      if (!band.label.empty()) {
        opt.push_back(PL_LEGEND_COLOR_BOX);
        lcol.push_back(col); lsty.push_back(1); lwid.push_back(1.0);
        scol.push_back(col); sscale.push_back(1.0); snum.push_back(0);
        bcol.push_back(col); bpat.push_back(0); bsc.push_back(1.0); blw.push_back(1.0);
        texts.push_back(band.label.c_str()); syms.push_back("");
      }
    }

    p.col0(1);
    const std::string xopt = std::string(plot.log_x ? "bcstl" : "bcst") + (few_x ? "f" : "") + "n";
    const std::string yopt = std::string(plot.log_y ? "bcstvl" : "bcstv") + (few_y ? "f" : "") + "n";
    p.box(xopt.c_str(), xtick, 0, yopt.c_str(), 0, 0);
    if (few_x) label_log_axis_125(p, false, x0, x1);
    if (few_y) label_log_axis_125(p, true, y0, y1);
    p.lab(plot.x_label.c_str(), plot.y_label.c_str(), "");
    if (frame_right < 0.95) {  // a narrowed frame: the title and its notes still centred on the page
      p.vpor(0.1, 0.95, 0.12, frame_top(plot.note, 0.86));
      draw_title(p, plot.title, plot.note);
      p.vpor(0.1, frame_right, 0.12, frame_top(plot.note, 0.86));
      p.wind(x0, x1, y0, y1);
    } else {
      draw_title(p, plot.title, plot.note);
    }

    for (const auto& ser : plot.series) {
      bool any = false;  // a series with no finite point is left out, legend included
      for (std::size_t k = 0; k < std::min(ser.x.size(), ser.y.size()); ++k)
        any = any || (std::isfinite(ser.x[k]) && std::isfinite(ser.y[k]) && (!plot.log_y || ser.y[k] > 0));
      if (!any) continue;
      const int col = 2 + ((ser.color >= 0 ? ser.color : next++) % kPaletteSize);
      const auto xs = transformed(ser.x, plot.log_x), ys = transformed(ser.y, plot.log_y);
      p.col0(col);
      p.width(2.0);
      const bool line = ser.style != SeriesStyle::Points, points = ser.style == SeriesStyle::Points || ser.style == SeriesStyle::LinePoints;
      p.lsty(ser.style == SeriesStyle::Dashed ? 2 : 1);
      for_finite_runs(xs, ys, [&](const std::vector<double>& rx, const std::vector<double>& ry) {
        if (line) p.line(static_cast<PLINT>(rx.size()), rx.data(), ry.data());
        if (points) p.string(static_cast<PLINT>(rx.size()), rx.data(), ry.data(), "#(840)");
      });
      p.lsty(1);
      if (!ser.y_low.empty() && ser.y_low.size() == ser.y.size() && ser.y_high.size() == ser.y.size()) {
        const auto lo = transformed(ser.y_low, plot.log_y), hi = transformed(ser.y_high, plot.log_y);
        std::vector<PLFLT> bx, blo, bhi;
        for (std::size_t k = 0; k < std::min(xs.size(), lo.size()); ++k)
          if (std::isfinite(xs[k]) && std::isfinite(lo[k]) && std::isfinite(hi[k])) {
            bx.push_back(xs[k]); blo.push_back(lo[k]); bhi.push_back(hi[k]);
          }
        p.width(1.5);
        if (!bx.empty()) p.erry(static_cast<PLINT>(bx.size()), bx.data(), blo.data(), bhi.data());
        p.width(2.0);
      }
      if (!ser.label.empty()) {
        opt.push_back((line ? PL_LEGEND_LINE : 0) | (points ? PL_LEGEND_SYMBOL : 0));
        lcol.push_back(col); lsty.push_back(ser.style == SeriesStyle::Dashed ? 2 : 1); lwid.push_back(2.0);
        scol.push_back(col); sscale.push_back(1.0); snum.push_back(points ? 1 : 0);
        bcol.push_back(0); bpat.push_back(0); bsc.push_back(0); blw.push_back(0);
        texts.push_back(ser.label.c_str()); syms.push_back("#(840)");
      }
    }
    p.col0(1);
    p.width(1.0);
    for (double v : plot.vertical_lines) {
      const double xv = plot.log_x ? std::log10(v) : v;
      const PLFLT xx[2] = {xv, xv}, yy[2] = {y0, y1};
      p.lsty(3);
      p.line(2, xx, yy);
      p.lsty(1);
    }
    for (const auto& m : plot.markers) {
      const PLFLT mx = plot.log_x ? std::log10(m.x) : m.x, my = plot.log_y ? std::log10(m.y) : m.y;
      p.col0(1);
      p.string(1, &mx, &my, "#(841)");
      p.schr(0, 0.8);
      const bool right_half = mx > x0 + 0.6 * (x1 - x0);  // text to the left there, so it stays inside the frame
      p.ptex(mx + (right_half ? -0.01 : 0.01) * (x1 - x0), my + 0.03 * (y1 - y0), 1, 0, right_half ? 1.0 : 0.0,
             m.text.c_str());
      p.schr(0, 0.95);
    }
    if (!texts.empty()) {
      PLFLT lw, lh;
      std::vector<PLINT> tcol(texts.size(), 1);
      PLINT where = plot.legend == LinePlot::Legend::Outside ? PL_POSITION_OUTSIDE : PL_POSITION_INSIDE;
      switch (plot.legend) {
        case LinePlot::Legend::Auto: where |= PL_POSITION_TOP | PL_POSITION_RIGHT; break;
        case LinePlot::Legend::Outside: where |= PL_POSITION_RIGHT; break;  // beside the frame, centred
        case LinePlot::Legend::TopRight: where |= PL_POSITION_TOP | PL_POSITION_RIGHT; break;
        case LinePlot::Legend::BottomRight: where |= PL_POSITION_BOTTOM | PL_POSITION_RIGHT; break;
        case LinePlot::Legend::TopLeft: where |= PL_POSITION_TOP | PL_POSITION_LEFT; break;
        case LinePlot::Legend::BottomLeft: where |= PL_POSITION_BOTTOM | PL_POSITION_LEFT; break;
      }
      const bool outside = plot.legend == LinePlot::Legend::Outside;
      p.legend(&lw, &lh, PL_LEGEND_BACKGROUND | PL_LEGEND_BOUNDING_BOX, where,
               0.02, outside ? 0.0 : 0.02, 0.08, 0, 1, 1, 0, 0, static_cast<PLINT>(texts.size()), opt.data(), 1.0, 0.8, 2.0, 0.0,
               tcol.data(), texts.data(), bcol.data(), bpat.data(), bsc.data(), blw.data(), lcol.data(), lsty.data(),
               lwid.data(), scol.data(), sscale.data(), snum.data(), syms.data());
    }
  });
}

void render_figure(const HeatMap& map, const std::string& path) {
  check_output_path(path, "figure");
  const std::size_t nx = map.x.size(), ny = map.y.size();
  if (nx == 0 || ny == 0 || map.values.size() != nx * ny) throw std::runtime_error("heat map: inconsistent sizes");
  double zmin = std::numeric_limits<double>::infinity(), zmax = -zmin;
  for (double v : map.values) if (std::isfinite(v)) { zmin = std::min(zmin, v); zmax = std::max(zmax, v); }
  if (!std::isfinite(zmin)) throw std::runtime_error("heat map: no finite values");
  if (zmax - zmin < 1e-14) zmax = zmin + 1e-14;
  // Cell edges halfway between centres, so non-uniform grids are drawn where they are.
  auto edges = [](const std::vector<double>& c) {
    std::vector<double> e(c.size() + 1);
    for (std::size_t k = 1; k < c.size(); ++k) e[k] = 0.5 * (c[k - 1] + c[k]);
    const double h0 = c.size() > 1 ? c[1] - c[0] : 1.0, h1 = c.size() > 1 ? c.back() - c[c.size() - 2] : 1.0;
    e.front() = c.front() - 0.5 * h0;
    e.back() = c.back() + 0.5 * h1;
    // Durations and values of the schedule parameter s are never negative: a first cell centred
    // on 0 is drawn as its upper half instead of reaching below the axis.
    if (c.front() >= 0.0 && e.front() < 0.0) e.front() = 0.0;
    return e;
  };
  const auto ex = edges(map.x), ey = edges(map.y);
  const double x0 = ex.front(), x1 = ex.back(), y0 = ey.front(), y1 = ey.back();
  draw_figure_file(path, [&](plstream& p) {
    // A sequential colour map: dark blue -> yellow.
    const PLFLT pos[3] = {0.0, 0.5, 1.0}, r[3] = {0.1, 0.2, 1.0}, g[3] = {0.1, 0.6, 0.9}, b[3] = {0.4, 0.6, 0.2};
    p.scmap1n(256);
    p.scmap1l(true, 3, pos, r, g, b, nullptr);
    p.adv(0);
    const double top = frame_top(map.note, 0.88);
    p.vpor(0.1, 0.82, 0.12, top);
    p.wind(x0, x1, y0, y1);
    for (std::size_t i = 0; i < nx; ++i)
      for (std::size_t j = 0; j < ny; ++j) {
        const double v = map.values[i * ny + j];
        if (!std::isfinite(v)) continue;
        p.col1((v - zmin) / (zmax - zmin));
        const PLFLT cx[4] = {ex[i], ex[i + 1], ex[i + 1], ex[i]}, cy[4] = {ey[j], ey[j], ey[j + 1], ey[j + 1]};
        p.fill(4, cx, cy);
      }
    p.col0(1);
    p.box("bcnst", 0, 0, "bcnstv", 0, 0);
    p.lab(map.x_label.c_str(), map.y_label.c_str(), "");
    draw_title(p, map.title, map.note);
    for (const auto& m : map.markers) {  // white under black, readable on dark and light cells
      const PLFLT mx = m.x, my = m.y;
      p.col0(0);
      p.width(4.0);
      p.string(1, &mx, &my, "#(841)");
      p.width(1.0);
      p.col0(1);
      p.string(1, &mx, &my, "#(841)");
      p.schr(0, 0.8);
      const bool right_half = mx > 0.5 * (x0 + x1);
      p.ptex(mx + (right_half ? -0.02 : 0.02) * (x1 - x0), my + 0.03 * (y1 - y0), 1, 0, right_half ? 1.0 : 0.0,
             m.text.c_str());
      p.schr(0, 0.95);
    }
    // Colour bar as a narrow second image with its own axis.
    p.vpor(0.86, 0.89, 0.12, top);
    p.wind(0, 1, zmin, zmax);
    std::vector<PLFLT> bar(64);
    for (int k = 0; k < 64; ++k) bar[static_cast<std::size_t>(k)] = zmin + (zmax - zmin) * k / 63.0;
    const PLFLT* bp[2] = {bar.data(), bar.data()};
    p.image(bp, 2, 64, 0, 1, zmin, zmax, zmin, zmax, 0, 1, zmin, zmax);
    p.box("bc", 0, 0, "bcmstv", 0, 0);
    p.mtex("r", 5.0, 0.5, 0.5, map.value_label.c_str());
  });
}

}  // namespace gapwise

namespace gapwise {
std::vector<std::string> figure_formats() { return {"svg", "png", "pdf"}; }
bool figures_built() { return true; }
}  // namespace gapwise

#else  // built without PLplot (GAPWISE_FIGURES=OFF): every figure request is refused

namespace gapwise {
std::vector<std::string> figure_formats() { return {}; }
bool figures_built() { return false; }
namespace {
[[noreturn]] void refuse(const std::string& path) {
  throw std::runtime_error(fmt::format("cannot draw '{}': this gapwise was built without figures (no PLplot). "
                                       "Install libplplot-dev and rebuild with cmake -DGAPWISE_FIGURES=ON",
                                       path));
}
}  // namespace
void render_figure(const LinePlot&, const std::string& path) { refuse(path); }
void render_figure(const HeatMap&, const std::string& path) { refuse(path); }
}  // namespace gapwise

#endif
