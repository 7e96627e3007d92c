#pragma once
// The frame of the K lowest instantaneous eigenstates of H(s) along a stretch
// of s, on an adaptive grid, as the K x K data a propagator in that frame needs.
//
//   TransverseIsingHamiltonian H(problem);
//   SectorHamiltonian sec(H, SpinFlipSector::Full);   // Even/Odd when there are no fields
//   FrameOptions fo;  fo.levels = 6;  fo.ns_per_unit_s = 1000.0;  // 1 us for s: 0 -> 1
//   InstantaneousFrame fr(sec, scales, 0.0, 1.0, fo);
//   fr.points().size();                       // grid points chosen
//   fr.intervals()[j].generator;              // log of the aligned overlap, ~ A(s) ds
//
// At the first grid point the K lowest eigenpairs (and a few guard levels above)
// come from lowest_levels (dense or Lanczos, sector-aware, with its check for
// missed degenerate partners); with FrameOptions::warm_start every later point
// starts from the previous point's vectors (block Krylov Rayleigh-Ritz) and
// falls back to lowest_levels when that does not converge; with
// FrameOptions::seeded_lanczos every later point's Lanczos solve starts from
// the previous point's vectors (the warm start of LevelTracker). The basis V(s) carried along is made continuous:
//  - each eigenvector's sign is chosen so that its overlap with the previous
//    point's vector is positive;
//  - levels closer than group_gap_ghz form a group, and the group's vectors are
//    replaced by the rotation of them closest to the previous point's group
//    (orthogonal Procrustes: SVD of the group's overlap matrix). Inside a group
//    the basis is then no eigenbasis, so each point also keeps the projected
//    Hamiltonian V^T H V (diagonal outside groups).
//  - levels that cross inside the kept set (exactly, or too narrowly for one
//    interval) are followed by continuity: the interval arriving at the point
//    ends in the previous columns' continuation (largest overlap) and the
//    point's rebase (a signed permutation) re-labels them in energy order.
// Between neighbouring points the frame turns by Q = polar factor of
// V_j^T V_{j+1}; its logarithm L (real antisymmetric) is the integrated
// connection A(s) ds with A_mn = <m|d n/ds>. The grid is refined until the
// turn per interval (Frobenius norm of L, levels below a group cut by the top
// of the kept set; with strict_levels, of the strip touching the lowest levels,
// the rest held to a looser bound) stays below max_rotation, and until the leading correction
// of the dynamical phase between levels (Hermite term) is below max_phase_error.
// Knots of a tabulated energy scale are grid points (no interval straddles a kink).
//
// Only the first and last point keep their K eigenvectors (in the 2^n basis);
// everything else is K x K, so memory does not grow with the grid.
#include <vector>

#include <Eigen/Dense>

#include "hamiltonian/spin_flip_sector.hpp"
#include "schedule/energy_scales.hpp"

namespace gapwise {

class FramePointCache;

struct FrameOptions {
  int levels = 4;                 ///< K, the number of kept levels (capped at the sector dimension)
  double ns_per_unit_s = 1000.0;  ///< |dt/ds| of the stretch (ns): duration per unit of s
  double max_rotation = 0.05;     ///< largest turn of the frame per interval (radians, Frobenius norm of L)
  /// m > 0: max_rotation bounds only the turn among and out of the m lowest
  /// levels (the rows and columns of L that touch them: the populated levels
  /// and every coupling into them); the block among levels m .. K-1 turns by at
  /// most upper_rotation_factor x max_rotation. 0: the whole K x K turn is held
  /// to max_rotation. The upper levels hold only what leaked into them; their
  /// coarser grid is judged by the propagator's grid and K checks. Measured at
  /// 12 qubits with fields (K = 13, m = 2): 1566 -> 512 points, p the same.
  int strict_levels = 0;
  double upper_rotation_factor = 4.0;  ///< loosening of the upper block's bound (>= 1)
  double max_phase_error = 0.2;   ///< largest Hermite correction of a relative dynamical phase per interval (rad)
  double group_gap_ghz = 1e-4;    ///< levels closer than this are aligned as one subspace
  double min_ds = 1e-9;           ///< smallest interval; below it the build throws
  long max_points = 200000;       ///< the build throws beyond this many grid points
  /// Start each point's eigen-solve from the previous point's vectors (block
  /// Krylov Rayleigh-Ritz). Off by default: measured slower than lowest_levels
  /// at dimension 256 (8 qubits, K up to 32: the block QR dominated); kept for
  /// measurement at larger dimensions and for the shared warm-started tracker.
  bool warm_start = false;
  /// Start each point's Lanczos solve (lowest_levels, as LevelTracker does) from
  /// the previous point's vectors instead of a random vector; a cold solve where
  /// that does not converge. Used when warm_start (the block Krylov variant) is off.
  /// On by default: measured 10-20 % cheaper per solve at 10-14 qubits with
  /// fields (bench_frame --solver-breakeven, --build-only; bench-frame-2026-12-05.txt).
  bool seeded_lanczos = true;
  /// Relative residual asked of each Lanczos eigenpair (LevelOptions::tolerance,
  /// 1e-12 there). 1e-10 here: on the 10-qubit benchmark glass with fields
  /// (K = 11, 1 and 10 us) the grid and p to 9 digits were the same as with
  /// 1e-12 and the build about 20 % cheaper (1e-9: a few % more).
  double solve_tolerance = 1e-10;
  /// Residual asked of a warm-started eigenpair, relative to max(1, |E| in GHz).
  double warm_tolerance = 1e-10;
  /// Eigenpairs solved earlier along the same problem and schedule
  /// (frame_point_cache.hpp): points stored there are taken instead of solved,
  /// the walk steps onto a stored point wherever one lies within its step, and
  /// every point solved here is stored. nullptr: solve every point.
  FramePointCache* cache = nullptr;
  /// First trial step in s (0: a sixteenth of the stretch). A propagator cut
  /// into pieces passes the step the previous piece ended with.
  double first_ds = 0.0;
};

struct FramePoint {
  double s = 0.0;
  /// The basis changes at a point only inside near-degenerate groups whose
  /// membership changed: the interval arriving here ends in basis V_in, the one
  /// leaving starts in V_out = V_in rebase^T (both span the same subspace at the
  /// same s, so the change of coordinates c_out = rebase c_in is exact).
  Eigen::MatrixXd rebase;                ///< K x K orthogonal (identity almost everywhere)
  Eigen::MatrixXd h_out, h_in;           ///< K x K, V^T H V (GHz) in either basis
  Eigen::VectorXd dh_out, dh_in;         ///< K, diagonal of V^T (dH/ds) V (GHz per unit s)
  /// K x K pointwise connection <m|d n/ds> = <m|dH/ds|n> / (E_n - E_m) in either
  /// basis; NaN for pairs inside a near-degenerate group (or closer than
  /// 10 x group_gap_ghz), where only the interval's integrated turn is known.
  Eigen::MatrixXd conn_out, conn_in;
  /// K x K: V_out(j-2)^T V_in(j) (zero-size for j < 2); for the coarse-grid check.
  Eigen::MatrixXd overlap_two_back;
};

struct FrameInterval {
  Eigen::MatrixXd generator;  ///< K x K real antisymmetric, log of the polar factor of V_j^T V_{j+1}
  double subspace_loss = 0.0; ///< 1 - smallest singular value of V_j^T V_{j+1} (kept subspace turning out)
};

class InstantaneousFrame {
 public:
  /// s_from > s_to is allowed (a reverse stretch). Throws std::runtime_error when
  /// the grid cannot meet the options (min_ds or max_points reached).
  InstantaneousFrame(const SectorHamiltonian& h, const EnergyScales& scales, double s_from, double s_to,
                     const FrameOptions& options);

  int levels() const { return k_; }
  const std::vector<FramePoint>& points() const { return points_; }
  const std::vector<FrameInterval>& intervals() const { return intervals_; }
  /// Eigen-decompositions done (accepted and rejected trial points; points from the cache not counted).
  long eigen_solves() const { return solves_; }
  /// Accepted points whose arriving interval saw kept levels cross (re-labelled there).
  long level_crossings() const { return crossings_; }
  /// Of eigen_solves(), those done by the warm start from the previous point's vectors.
  long warm_solves() const { return warm_solves_; }
  /// Grid points (accepted or rejected) taken from FrameOptions::cache: not solved, not in eigen_solves().
  long reused_points() const { return reused_; }
  /// H x products spent building the frame (eigen-solves and projections).
  long h_applications() const { return h_applications_; }
  /// The step in s the grid controller would have taken next (for the next piece's first_ds).
  double next_ds() const { return next_ds_; }
  /// Columns: the aligned frame vectors at the first / last point, in the 2^n basis.
  const Eigen::MatrixXd& first_vectors_full() const { return first_full_; }
  const Eigen::MatrixXd& last_vectors_full() const { return last_full_; }

 private:
  int k_ = 0;
  long solves_ = 0;
  long crossings_ = 0;
  long warm_solves_ = 0;
  long reused_ = 0;
  long h_applications_ = 0;
  double next_ds_ = 0.0;
  std::vector<FramePoint> points_;
  std::vector<FrameInterval> intervals_;
  Eigen::MatrixXd first_full_, last_full_;
};

/// The orthogonal matrix closest to m (polar factor, from the SVD m = U S W^T: U W^T).
Eigen::MatrixXd closest_rotation(const Eigen::MatrixXd& m);
/// Real logarithm of an orthogonal matrix close to the identity (antisymmetric).
Eigen::MatrixXd rotation_log(const Eigen::MatrixXd& q);

}  // namespace gapwise
