#pragma once
// Propagation in the frame of the K lowest instantaneous eigenstates ("frame"). The state is written psi(t) = sum_n c_n(t) |n(s(t))> over the kept
// levels of H(s) (InstantaneousFrame, src/frame/), and the K amplitudes obey
//
//   i dc/dt = H_frame c,   H_frame = 2 pi V^T H V - i (ds/dt) A(s),  A = V^T dV/ds
//
// (V^T H V = diag(E) outside near-degenerate groups). Over each grid interval
// H_frame is replaced by its average - energies by the cubic Hermite rule from
// E and dE/ds = <n|dH/ds|n> at both ends, A ds by the logarithm of the aligned
// overlap - and the K x K exponential is taken exactly (eigen-decomposition), a
// second-order Magnus step. The dynamical phases 2 pi E dt sit inside that exact
// exponential, so the grid is set by how fast the frame turns and by the
// curvature of the energies, not by energy x duration: the cost of a piece is
// that of the eigen-decompositions on the grid, nearly flat in the duration.
//
// Error control per piece, on the watched outcome set (p) as in split4:
//   grid: the same frame run on every other grid point, |p_fine - p_coarse|;
//   K:    the run with K' = K - max(1, K/4) levels, |p_K - p_K'|;
//   start: the population of psi outside the kept span at the start (dropped).
// Their sum must be <= tolerance/2 per piece (not shared among pieces: a run
// cut into many pieces by observations can sum to more, as error_estimate shows) (and the TV sums <= others_factor x
// tolerance/2). If not, the grid is refined or K doubled (up to 32 levels);
// when neither helps (fast, non-adiabatic pieces, quenches, a start outside the
// K lowest levels), the piece is run by split4 and counted in
// PropagationStats::frame_fallback_pieces. The frame never returns an
// unchecked state.
//
// Pieces at constant s (pauses) are exact in the frame: c_n gets exp(-i 2 pi E_n dt).
// A classical start at s = 1 with A(1) = 0 is accepted when it lies in the span
// of the K lowest levels there (within tolerance/10), else that piece falls back.
//
//   auto prop = make_propagator("frame", H, {.tolerance = 1e-6});
//   prop->advance(drive, 0.0, 20000.0, psi, stats);   // stats.frame_levels, frame_grid_points, ...
#include <memory>

#include <Eigen/Dense>

#include "dynamics/propagator.hpp"
#include "hamiltonian/spin_flip_sector.hpp"

namespace gapwise {

class InstantaneousFrame;
class FramePointCache;

/// The K amplitudes at the end of a frame (not a pause) from c0 at its start:
/// the interval steps alone, no error control (for convergence studies).
/// every_other_point: the same on the grid with every second point dropped.
Eigen::VectorXcd propagate_through_frame(const InstantaneousFrame& frame, const Eigen::VectorXcd& c0,
                                         double ns_per_unit_s, bool every_other_point = false);

class FramePropagator final : public Propagator {
 public:
  FramePropagator(const TransverseIsingHamiltonian& h, PropagatorOptions options);
  std::string name() const override { return "frame"; }
  void advance(const AnnealDrive& drive, double t0_ns, double t1_ns, QuantumState& psi,
               PropagationStats& stats) override;

  /// Largest number of kept levels tried before falling back.
  static constexpr int kMaxLevels = 32;

 private:
  /// Returns false (psi untouched) when the frame cannot meet the tolerance.
  bool advance_in_frame(const AnnealDrive& drive, double t0, double t1, QuantumState& psi, PropagationStats& stats);
  const SectorHamiltonian& sector_of(const QuantumState& psi) const;

  const TransverseIsingHamiltonian* h_;
  PropagatorOptions opt_;
  std::shared_ptr<FramePointCache> cache_;  ///< opt_.frame_cache, or one of its own
  double next_ds_ = 0.0;                     ///< where the last piece's grid controller stood (0: none yet)
  std::unique_ptr<SectorHamiltonian> full_, even_, odd_;
};

}  // namespace gapwise
