#pragma once
// The HDF5 result file of `gapwise gap` (format "gapwise-gap" 1): the minimum
// gap and its definition, the scanned curve (levels, gaps, matrix elements,
// error bounds), the local minima, the levels at the end of the path, and the
// eigenvectors asked for with --vectors-at. Layout in the user guide.
//
//   const MinimumGapReport r = find_minimum_gap(H, sch.scales, opt);
//   write_gap_result("gap.h5", r, vectors, true, opt.s_tolerance, command_line, {problem, schedule});
#include <string>
#include <vector>

#include "spectrum/gap_search.hpp"

namespace gapwise {

/// Writes `path` atomically. `vectors` may be empty; `first_at_s_star` says
/// that vectors[0] was taken at s* (the rest at requested s values).
void write_gap_result(const std::string& path, const MinimumGapReport& r, const std::vector<EigenvectorsAt>& vectors,
                      bool first_at_s_star, double s_tolerance, const std::string& command_line,
                      const std::vector<std::string>& input_files);

}  // namespace gapwise
