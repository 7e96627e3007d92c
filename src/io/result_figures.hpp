#pragma once
// Figures from gapwise result files: each kind of result that a file holds
// (an anneal trace, a spectrum, a duration sweep, ...) becomes one or more
// figures, named <stem>-<kind>.<format>.
//
//   auto written = draw_result_figures("run.h5", "figs", {"svg", "png"});
//   // written: {"figs/run-anneal-trace.svg", "figs/run-anneal-trace.png"}
#include <string>
#include <vector>

namespace gapwise {

/// Throws InputError when the file holds no result gapwise knows how to draw,
/// or when a figure's file would be `result_file` or one of `other_inputs`
/// (through a link), or a special file (see io/output_paths.hpp).
std::vector<std::string> draw_result_figures(const std::string& result_file, const std::string& out_dir,
                                             const std::vector<std::string>& formats,
                                             const std::vector<std::string>& other_inputs = {});

/// Refuses (InputError) two result files whose figures would share names
/// (<stem>-<kind>.<format>: the same stem, e.g. a/run.h5 and b/run.h5).
void check_figure_stems_differ(const std::vector<std::string>& result_files);

}  // namespace gapwise
