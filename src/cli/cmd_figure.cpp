// `gapwise figure RESULT.h5`: pictures of what a result file holds.
#include <iostream>
#include <memory>

#include "cli/cli_common.hpp"
#include "io/output_paths.hpp"
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
      "Draw the figures for one or more HDF5 result files (from --out of a study subcommand).\n"
      "Files are named <result-stem>-<kind>.<svg|png|pdf> in the output folder; the kinds are\n"
      "  anneal         anneal-trace (p and s along t)\n"
      "  gap            spectrum (lowest levels, s* marked), gap (log scale, minimum marked)\n"
      "  durations      probability (p(t_f) with Landau-Zener and adiabatic predictions),\n"
      "                 miss-probability (1 - p on a log axis), tts\n"
      "  pause-map      pause-map, reverse-map: heat maps of p, the best cell marked;\n"
      "                 <kind>-miss: log10(1 - p) when the best cell reaches p >= 0.9\n"
      "  reverse-map\n"
      "  compare-paths  populations-<path>-<k>: lowest-level populations along t\n"
      "  embed-cost     chain-probability, chain-duration, chain-gap against chain coupling\n"
      "  diagnose       diagnosis-gap (crossings marked), diagnosis-ground-weight; with --bath\n"
      "                 diagnosis-thermal (gap/theta and relaxations left), diagnosis-thermal-populations\n"
      "  ensemble       ensemble-tts, ensemble-gap: median and quantile band against size\n"
      "                 (with --bath also ensemble-tts-bath: the TTS with the bath)\n"
      "Example: gapwise figure run.h5 --out-dir figs --format png");
  sub->add_option("results", o->files, "HDF5 result files")->required()->check(readable_input_file());
  sub->add_option("--out-dir", o->out_dir, "folder for the figures (created if missing)")->capture_default_str();
  sub->add_option("--format", o->formats, "svg (text kept as text), png, pdf; comma-separated")->capture_default_str()->delimiter(',');
  sub->callback([o] {
    FilePlan plan;
    for (const auto& f : o->files) plan.input(f, "result");
    check_file_plan(plan);
    check_figure_stems_differ(o->files);
    for (const auto& f : o->files)
      for (const auto& w : draw_result_figures(f, o->out_dir, o->formats, o->files)) std::cout << "wrote " << w << "\n";
  });
}

}  // namespace gapwise::cli
