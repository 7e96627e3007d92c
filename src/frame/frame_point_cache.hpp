#pragma once
// Eigenpairs of H(s) already solved along one problem and schedule, kept so
// that frames built later (another duration of a duration study, another piece
// of the same anneal, the accuracy re-run) take them instead of solving again.
//
// The instantaneous eigenpairs depend on s alone: a path s(t) = shape(t / T)
// only stretches with the duration T, so the points solved for one duration are
// valid for every other. What depends on T is how fine the grid must be (the
// phase criterion of InstantaneousFrame grows with T); a frame built from the
// cache walks its own adaptive grid, takes a stored point wherever one lies
// within the step it would take, and solves (and stores) new points only where
// the stored ones are too far apart for its duration: the cached grid is refined
// where a duration needs it, never trusted beyond its own checks.
//
//   auto cache = std::make_shared<FramePointCache>();
//   PropagatorOptions po;  po.frame_cache = cache;     // shared by every anneal of a study
//   ... anneals ...
//   cache->stats().reused;  cache->stats().solved;     // points taken / solved
//
// Thread-safe (durations run on OpenMP threads); points are immutable once
// stored. Memory: each point holds dim x (K + 1) doubles; beyond the byte budget
// new points are used but not stored (counted in stats().not_stored).
#include <cstddef>
#include <map>
#include <memory>
#include <mutex>
#include <optional>
#include <tuple>
#include <vector>

#include <Eigen/Dense>

#include "hamiltonian/spin_flip_sector.hpp"
#include "schedule/energy_scales.hpp"

namespace gapwise {

/// The lowest levels of H(s) in one sector with their vectors (sector basis,
/// columns in energy order, normalised), as lowest_levels returned them.
struct SolvedPoint {
  double s = 0.0;
  std::vector<double> energies_ghz;
  Eigen::MatrixXd vectors;
  long h_applications = 0;  ///< what solving it cost (H x products)
};

struct FrameCacheStats {
  long reused = 0;       ///< points taken from the cache instead of solved
  long solved = 0;       ///< points solved and offered to the cache
  long not_stored = 0;   ///< of those, left out because of the byte budget
  double bytes = 0.0;    ///< held now
};

class FramePointCache {
 public:
  /// budget_bytes <= 0: a quarter of the memory available now, at most 4 GiB.
  explicit FramePointCache(double budget_bytes = 0.0);

  /// The stored point at exactly s (within 1e-14) with at least `levels` columns.
  std::shared_ptr<const SolvedPoint> find(const SectorHamiltonian& h, const EnergyScales& scales, double s,
                                          int levels) const;
  /// The stored s (with at least `levels` columns) farthest from `from` towards
  /// `to` (excluded: from; included: to), if any lies strictly between them or at `to`.
  std::optional<double> farthest_towards(const SectorHamiltonian& h, const EnergyScales& scales, double from,
                                         double to, int levels) const;
  /// Stores p (replacing a point at the same s with fewer columns).
  void store(const SectorHamiltonian& h, const EnergyScales& scales, SolvedPoint p);
  /// Counts a point taken from the cache.
  void count_reuse();

  FrameCacheStats stats() const;
  double budget_bytes() const { return budget_; }

 private:
  using Key = std::tuple<const TransverseIsingHamiltonian*, const EnergyScales*, int>;
  static Key key_of(const SectorHamiltonian& h, const EnergyScales& scales);
  mutable std::mutex mutex_;
  double budget_;
  std::map<Key, std::map<double, std::shared_ptr<const SolvedPoint>>> points_;
  FrameCacheStats stats_;
};

}  // namespace gapwise
