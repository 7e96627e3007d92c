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

/// Throws InputError when the file holds no result gapwise knows how to draw.
std::vector<std::string> draw_result_figures(const std::string& result_file, const std::string& out_dir,
                                             const std::vector<std::string>& formats);

}  // namespace gapwise
