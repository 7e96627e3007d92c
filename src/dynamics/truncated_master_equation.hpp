#pragma once
// The adiabatic master equation (Albash, Boixo, Lidar & Zanardi, New J. Phys.
// 14, 123016 (2012)) truncated to the lowest K instantaneous levels of H(s)
// ("ame-truncated"). The density matrix is K x K in the instantaneous
// eigenbasis V(s) (2^n x K, from dense diagonalization or warm-started Lanczos
// along s, spectrum/level_tracker.hpp); the full space is never formed.
//
// One interval [s_j, s_j+1] of duration tau (a Strang splitting):
//   1. exp(tau/2 (L_H + D)) at s_j: exact phases e^{-i 2 pi (E_m - E_n) tau/2}
//      and the grouped dissipator of the K levels (dynamics/master_equation.hpp,
//      sigma^z_i elements between kept eigenvectors) - they commute;
//   2. the frame turn: Q = V_j^T V_j+1 (columns matched by largest overlap,
//      signs aligned, exactly degenerate eigenspaces aligned by orthogonal
//      Procrustes), L = log of its polar factor = integral of <m|d n/ds> ds, and
//      in the interaction picture the unitary exp(Omega), Omega_mn = -L_mn f_mn
//      with f_mn = int_0^1 exp(i (d_mn(x) - d_mn(1/2))) dx the Filon weight of
//      the relative dynamical phase d_mn (linear energies on the interval;
//      frame/oscillatory_quadrature.hpp). Fast phases thus average the coupling
//      exactly instead of being resolved by the step;
//   3. exp(tau/2 (L_H + D)) at s_j+1.
// The grid in s is refined until the frame turns by at most max_rotation per
// interval (Frobenius norm of L without the top kept level, which may mix with
// the first dropped one); the step therefore follows how fast H(s) changes, not
// the energy scale times the duration. A pause (ds/dt = 0) is one exact
// exponential. Population that the frame turn moves out of the kept subspace is
// lost from the trace and reported (lost_population), as is the largest
// population seen on the highest kept level.
//
//   TruncatedMasterEquation me(H, bath, {.levels = 8});
//   me.start(drive, t0, psi0);
//   me.advance(drive, t0, t1);            // piece by piece
//   double p = me.probability_of(ground.states);
#include <functional>
#include <vector>

#include <Eigen/Dense>

#include "dynamics/anneal_drive.hpp"
#include "dynamics/master_equation.hpp"
#include "hamiltonian/spin_flip_sector.hpp"
#include "spectrum/level_tracker.hpp"

namespace gapwise {

struct TruncatedOptions {
  int levels = 8;               ///< K
  double max_rotation = 0.02;   ///< largest frame turn per interval (rad, Frobenius norm)
  double max_ds = 0.02;         ///< largest interval in s
  double min_ds = 1e-9;         ///< below it the run throws
};

struct TruncatedStats {
  int levels = 0;
  long grid_points = 0;          ///< accepted intervals
  long rejected = 0;             ///< refined intervals
  long eigen_solves = 0;
  long unresolved_crossings = 0;   ///< intervals at min_ds where the frame still turned more than max_rotation
  double top_level_population = 0;  ///< largest population of the highest kept level seen
  double lost_population = 0;       ///< 1 - Tr rho_K at the end (moved out of the kept levels)
  double min_eigenvalue = 0;        ///< smallest eigenvalue of rho_K at the end
};

class TruncatedMasterEquation {
 public:
  /// `h` must outlive this object.
  TruncatedMasterEquation(const TransverseIsingHamiltonian& h, const OhmicBath& bath, const TruncatedOptions& options);
  /// rho_K = |c><c| with c = V(s(t0))^T psi0 (psi0 in the computational basis).
  void start(const AnnealDrive& drive, double t0_ns, const Eigen::VectorXcd& psi0);
  /// The same from a density matrix in the computational basis.
  void start(const AnnealDrive& drive, double t0_ns, const DensityMatrix& rho);
  /// From t0 to t1, one smooth piece of the drive.
  void advance(const AnnealDrive& drive, double t0_ns, double t1_ns);
  /// Sum over the given basis states of <b|V rho_K V^T|b>.
  double probability_of(const std::vector<BasisIndex>& states) const;
  /// Diagonal of V rho_K V^T (2^n values).
  std::vector<double> populations() const;
  /// V rho_K V^T (2^n x 2^n; small systems only).
  DensityMatrix full_density() const;
  const DensityMatrix& reduced() const { return rho_; }
  const Eigen::VectorXd& energies() const { return here_.energies; }
  TruncatedStats stats() const;
  int levels() const { return k_; }
  /// Called after every accepted interval with the time reached (ns): progress
  /// inside a long piece of the path.
  std::function<void(double t_ns)> on_interval;

 private:
  struct Point {
    double s = 0, t = 0, a = 0, b = 0;
    Eigen::VectorXd energies;
    Eigen::MatrixXd vectors;
    FrozenGenerator generator;
  };
  Point solve(const AnnealDrive& drive, double t);
  void build_generator(Point& p) const;
  void start_point(const AnnealDrive& drive, double t0_ns);
  void note_top();

  const TransverseIsingHamiltonian& h_;
  SectorHamiltonian full_;
  OhmicBath bath_;
  TruncatedOptions options_;
  int k_;
  EnergyScales unit_scales_ = EnergyScales::linear(1.0, 1.0);  // the tracker is always called with explicit A, B
  LevelTracker tracker_;
  Point here_;
  DensityMatrix rho_;
  double ds_guess_ = 0;
  TruncatedStats stats_;
};

/// Real vectors of length 2^n the truncated master equation holds at once with
/// K levels: the eigenvectors at the two ends of an interval and their aligned
/// copy, the sigma^z products, the tracker's warm start and its Lanczos basis
/// (up to 2 (2K + 2) vectors after a failed restart), the final populations; with
/// a margin. Every memory check of a run with a bath multiplies it by 2^n.
int truncated_working_vectors(int levels);

/// The open anneal by the truncated master equation, K chosen by the error
/// control (options.levels == 0: K = start_levels, then K + level_step, ... until
/// |p(K) - p(K + level_step)| <= tolerance or K reaches max_levels, which is
/// then reported as cap_hit) or forced (options.levels > 0: that K, with the
/// change of p from K - 2 reported as the truncation estimate).
OpenAnnealResult simulate_truncated_open_anneal(const TransverseIsingHamiltonian& h, const GroundManifold& ground,
                                                const EnergyScales& scales, const AnnealPath& path,
                                                const QuantumState& psi0, const OhmicBath& bath,
                                                const OpenPropagatorOptions& options);

}  // namespace gapwise
