#pragma once
// Figures drawn with PLplot: line plots with several series, markers and log
// axes, and heat maps. The format follows the file extension: .svg (PLplot's own
// SVG device, text kept as <text> elements), .png (cairo), .pdf (cairo). Labels
// take PLplot's text escapes: "t#df#u" for a subscript, "#gD" for Delta. Files
// are written atomically (temporary name, then rename). Without PLplot at build
// time (GAPWISE_FIGURES=OFF) render_figure throws, and figures_built() says so.
//
//   LinePlot fig;
//   fig.title = "ground-state probability";
//   fig.x_label = "anneal duration t_f (ns)"; fig.log_x = true;
//   fig.series.push_back({"simulated", t, p, SeriesStyle::LinePoints});
//   render_figure(fig, "p_vs_duration.svg");   // or .png
//
//   // quantiles against size: a shaded band and a median with error bars
//   fig.bands.push_back({"q0.25 to q0.75", n, q25, q75});
//   fig.series.push_back({"median", n, q50, SeriesStyle::LinePoints, 0, ci_low, ci_high});
#include <optional>
#include <string>
#include <utility>
#include <vector>

namespace gapwise {

enum class SeriesStyle { Line, Points, LinePoints, Dashed };

struct PlotSeries {
  std::string label;  ///< empty: not in the legend
  std::vector<double> x, y;
  SeriesStyle style = SeriesStyle::Line;
  int color = -1;  ///< palette index; -1: next in order
  std::vector<double> y_low, y_high;  ///< optional vertical error bars, one per point (NaN: none)
};

/// A shaded region between two curves (e.g. an interquantile range).
struct PlotBand {
  std::string label;  ///< empty: not in the legend
  std::vector<double> x, low, high;
  int color = -1;  ///< palette index of the (light, translucent) fill; -1: next in order
};

struct PlotMarker {
  double x = 0, y = 0;
  std::string text;
};

struct LinePlot {
  std::string title, x_label, y_label;
  bool log_x = false, log_y = false;
  std::vector<PlotSeries> series;
  std::vector<PlotBand> bands;      ///< drawn first, under the series
  std::vector<PlotMarker> markers;  ///< a cross and a text label at (x, y)
  std::vector<double> vertical_lines;
  std::optional<std::pair<double, double>> x_range, y_range;  ///< a given log range keeps the axis logarithmic
  double x_tick = 0;  ///< major tick spacing of a linear x axis; 0: automatic
  std::string note;  ///< small text under the title, one line per '\n'
  /// Auto: the first corner of the frame (top right, top left, bottom right,
  /// bottom left) where the legend covers no data; right of the frame when none is free.
  enum class Legend { Auto, TopRight, BottomRight, TopLeft, BottomLeft, Outside } legend = Legend::Auto;
  /// With an automatic legend and no free corner, the top of the y axis may be
  /// raised to make room above the data (never for probability axes).
  bool raise_top_for_legend = false;
};

struct HeatMap {
  std::string title, x_label, y_label, value_label;
  std::vector<double> x, y;  ///< cell centres, ascending
  std::vector<double> values;  ///< x-major: values[ix * y.size() + iy]
  std::string note;            ///< small text under the title, one line per '\n'
  std::vector<PlotMarker> markers;  ///< a cross and a text label at (x, y)
};

/// Where an automatic legend goes: the first free corner (in the order of
/// LinePlot::Legend), or Outside. `points` are data positions scaled to the frame
/// ([0,1] x [0,1]); `width` and `height` the legend's size in the same units.
LinePlot::Legend free_legend_corner(const std::vector<std::pair<double, double>>& points, double width, double height);

/// The figure formats this build writes ({"svg", "png", "pdf"}; empty without PLplot).
std::vector<std::string> figure_formats();
bool figures_built();

/// Writes the figure; the format follows the extension (.svg, .png or .pdf).
/// Throws std::runtime_error when nothing can be drawn or written.
void render_figure(const LinePlot& plot, const std::string& path);
void render_figure(const HeatMap& map, const std::string& path);

}  // namespace gapwise
