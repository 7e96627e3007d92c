#include "spectrum/gap_eigenvectors.hpp"

#include <fmt/format.h>

#include "io/input_error.hpp"

namespace gapwise {

std::vector<EigenvectorsAt> gap_eigenvectors(const TransverseIsingHamiltonian& h, const EnergyScales& scales,
                                             const MinimumGapReport& r, const GapEigenvectorRequest& request) {
  std::vector<double> at;
  if (request.at_star) at.push_back(r.s_star);
  for (double s : request.s) {
    if (s < r.s_first - 1e-12 || s > r.s_last + 1e-12)
      throw InputError({"--vectors-at", 0, 0, "--vectors-at"},
                       fmt::format("s = {} is outside the searched range {} to {}", s, r.s_first, r.s_last),
                       fmt::format("give s values between {} and {}", r.s_first, r.s_last));
    at.push_back(s);
  }
  const int levels = request.levels > 0 ? request.levels : r.levels;
  std::vector<EigenvectorsAt> vectors;
  for (double s : at) vectors.push_back(eigenvectors_at(h, scales, s, levels, r.sector, r.method));
  return vectors;
}

}  // namespace gapwise
