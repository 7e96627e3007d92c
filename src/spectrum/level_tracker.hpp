#pragma once
// The lowest K eigenpairs of H(s) followed along s, each solve warm-started
// from the previous one's eigenvectors.
//
// Neighbouring points of a scan have nearly the same eigenvectors, so the
// previous point's subspace (all K vectors, degenerate partners included) is a
// far better Lanczos start than a random vector: the tracker seeds Spectra's
// restarted Lanczos with the sum of the previous vectors (plus a 0.1 % random
// part, so no direction is missing entirely) and falls back to a cold start
// when that does not converge. With `quadratic_bounds` on (the default here)
// the Lanczos tolerance is relaxed as long as the Kato-Temple bounds of the
// first `bounded_levels` levels stay within the wanted accuracy
// (lowest_levels.hpp), so the reported error bounds are unchanged.
//
// A start from vectors computed far away costs more than a cold start (they
// point the wrong way); `warm_distance` bounds |s - s_previous| for a warm start.
// The deflation check for missed degenerate partners (lowest_levels.hpp) runs
// as in a cold solve unless the options switch it off.
//
//   SectorHamiltonian even(H, SpinFlipSector::Even);
//   LevelOptions lo;  lo.levels = 4;  lo.vectors = true;
//   LevelTracker tr(even, scales, lo);
//   for (double s : grid) {
//     const Levels& lv = tr.at(s);       // warm from the previous s
//     use(lv.energies_ghz, lv.vectors, lv.error_bounds_ghz);
//   }
//   tr.stats().operator_applications;    // H x products spent so far
//   tr.forget();                         // next call starts cold
//
// Not thread-safe: one tracker per thread.
#include <cstddef>
#include <optional>

#include <Eigen/Dense>

#include "hamiltonian/spin_flip_sector.hpp"
#include "schedule/energy_scales.hpp"
#include "spectrum/lowest_levels.hpp"

namespace gapwise {

struct LevelTrackerStats {
  std::size_t solves = 0;          ///< points solved
  std::size_t warm_solves = 0;     ///< of those, warm-started
  long operator_applications = 0;  ///< H x products (Lanczos, deflation check, residuals)
};

class LevelTracker {
 public:
  /// `h` and `scales` must outlive the tracker. options.vectors is forced on (the
  /// vectors are the warm start); options.quadratic_bounds defaults to on here.
  LevelTracker(const SectorHamiltonian& h, const EnergyScales& scales, LevelOptions options);

  /// The lowest levels at s (scales' A(s), B(s)), warm-started when the previous
  /// solve was within warm_distance in s. The reference stays valid until the next call.
  const Levels& at(double s);
  /// The same at explicit energy scales (GHz); `s` only decides warm or cold.
  const Levels& at(double s, double a_ghz, double b_ghz);
  /// Seed the next solve with these vectors (columns), as if computed at s.
  void seed(double s, const Eigen::MatrixXd& vectors);
  /// Next solve starts cold.
  void forget() { last_s_.reset(); }

  /// Largest |s - s_previous| for which a warm start is used (default 0.05).
  void set_warm_distance(double ds) { warm_distance_ = ds; }
  /// Per-call changes (e.g. switching the deflation check off) without a new tracker.
  LevelOptions& options() { return options_; }
  const LevelTrackerStats& stats() const { return stats_; }
  const SectorHamiltonian& hamiltonian() const { return *h_; }

 private:
  const SectorHamiltonian* h_;
  const EnergyScales* scales_;
  LevelOptions options_;
  double warm_distance_ = 0.05;
  std::optional<double> last_s_;
  Levels last_;
  LevelTrackerStats stats_;
};

}  // namespace gapwise
