#include "spectrum/level_tracker.hpp"

#include <cmath>

namespace gapwise {

LevelTracker::LevelTracker(const SectorHamiltonian& h, const EnergyScales& scales, LevelOptions options)
    : h_(&h), scales_(&scales), options_(options) {
  options_.vectors = true;
}

const Levels& LevelTracker::at(double s) { return at(s, scales_->a_ghz(s), scales_->b_ghz(s)); }

const Levels& LevelTracker::at(double s, double a_ghz, double b_ghz) {
  LevelOptions lo = options_;
  lo.vectors = true;
  const bool warm = last_s_ && std::abs(s - *last_s_) <= warm_distance_ && last_.vectors.cols() > 0 &&
                    last_.vectors.rows() == static_cast<Eigen::Index>(h_->dim());
  Levels next = lowest_levels(*h_, a_ghz, b_ghz, lo, warm ? &last_.vectors : nullptr);
  ++stats_.solves;
  if (warm) ++stats_.warm_solves;
  stats_.operator_applications += next.operator_applications;
  last_ = std::move(next);
  last_s_ = s;
  return last_;
}

void LevelTracker::seed(double s, const Eigen::MatrixXd& vectors) {
  last_.vectors = vectors;
  last_s_ = s;
}

}  // namespace gapwise
