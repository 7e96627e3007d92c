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

#include "io/hdf5_input.hpp"

namespace gapwise {

using FigureEmit = std::function<void(const std::string& kind, const std::function<void(const std::string&)>& draw)>;

/// Nothing when the file has no /thermal group.
void thermal_channel_figures(const Hdf5Input& in, const FigureEmit& emit);

}  // namespace gapwise
