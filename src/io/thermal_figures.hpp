#pragma once
// Figures of diagnose --bath's thermal channel (HDF5 group /thermal, written by
// io/thermal_channel_output.hpp), drawn by `gapwise figure`:
//   diagnosis-thermal              gap/theta and the remaining relaxations N(s) of each
//                                  duration on one log axis: both cross the line at 1,
//                                  at the gap = theta points and at the freeze-out;
//   diagnosis-thermal-populations  the ground group's population along s with the bath,
//                                  the gap = theta points dotted, the freeze-out marked.
#include <functional>
#include <string>
#include <utility>
#include <vector>

#include "io/figure_plot.hpp"
#include "io/hdf5_input.hpp"

namespace gapwise {

using FigureEmit = std::function<void(const std::string& kind, const std::function<void(const std::string&)>& draw)>;

/// The two figures (kind, plot) in the order drawn; none when the file has no
/// /thermal group. The notes mention the dashed gap = theta lines only when the
/// gap crosses theta somewhere (a line is drawn).
std::vector<std::pair<std::string, LinePlot>> thermal_channel_plots(const Hdf5Input& in);

/// Nothing when the file has no /thermal group.
void thermal_channel_figures(const Hdf5Input& in, const FigureEmit& emit);

}  // namespace gapwise
