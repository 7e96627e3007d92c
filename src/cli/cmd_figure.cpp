// `gapwise figure RESULT.h5`: pictures of what a result file holds.
#include <iostream>
#include <memory>

#include "cli/cli_common.hpp"
#include "io/result_figures.hpp"

namespace gapwise::cli {
namespace {
struct FigureOptions {
  std::vector<std::string> files;
  std::string out_dir = "figures";
  std::vector<std::string> formats = {"svg", "png"};
};
}  // namespace

void register_figure(CLI::App& app) {
  auto o = std::make_shared<FigureOptions>();
  CLI::App* sub = app.add_subcommand("figure",
      "Draw the figures for one or more HDF5 result files (from --out of any study\n"
      "subcommand): anneal traces, spectra with the minimum gap marked, probability and\n"
      "time-to-solution against duration, level populations, pause maps, ensemble scaling.\n"
      "Files are named <result-stem>-<kind>.<svg|png> in the output folder.\n"
      "Example: gapwise figure run.h5 --out-dir figs --format png");
  sub->add_option("results", o->files, "HDF5 result files")->required()->check(CLI::ExistingFile);
  sub->add_option("--out-dir", o->out_dir, "folder for the figures (created if missing)")->capture_default_str();
  sub->add_option("--format", o->formats, "svg, png or both")->capture_default_str()->delimiter(',');
  sub->callback([o] {
    for (const auto& f : o->files)
      for (const auto& w : draw_result_figures(f, o->out_dir, o->formats)) std::cout << "wrote " << w << "\n";
  });
}

}  // namespace gapwise::cli
