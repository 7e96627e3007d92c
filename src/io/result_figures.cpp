#include "io/result_figures.hpp"

#include <filesystem>
#include <functional>

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
  fig.note = fmt::format("final ground-state probability {:.6f}", in.attribute_double("/anneal", "ground_probability"));
  fig.series.push_back({"ground-state probability", t, p, SeriesStyle::LinePoints});
  fig.series.push_back({"anneal fraction s(t)", t, s, SeriesStyle::Dashed});
  emit("anneal-trace", [&](const std::string& path) { render_figure(fig, path); });
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
  if (written.empty())
    throw InputError({result_file, 0, 0, ""}, "this file holds no result that gapwise can draw",
                     "give a file written with --out by anneal or another study subcommand");
  return written;
}

}  // namespace gapwise
