#pragma once
// The eigenvectors a gap search is asked to keep (`gapwise gap --vectors-at`):
// the lowest levels of H(s) at the minimum-gap location s* and at chosen s
// inside the searched range, in the sector the search ran in.
//
//   const auto v = gap_eigenvectors(H, scales, report, {.at_star = true, .s = {0.5}});
#include <vector>

#include "spectrum/gap_search.hpp"

namespace gapwise {

struct GapEigenvectorRequest {
  bool at_star = false;    ///< at the s* the search found (first in the result)
  std::vector<double> s;   ///< further s, each inside [report.s_first, report.s_last]
  int levels = 0;          ///< lowest levels kept (0: the levels the search followed)
};

/// Eigenvectors at s* (when asked) and then at each requested s, in that order.
/// InputError naming --vectors-at for an s outside the searched range (before
/// any eigenproblem is solved).
std::vector<EigenvectorsAt> gap_eigenvectors(const TransverseIsingHamiltonian& h, const EnergyScales& scales,
                                             const MinimumGapReport& report, const GapEigenvectorRequest& request);

}  // namespace gapwise
