#pragma once
// The adiabatic master equation (Albash, Boixo, Lidar & Zanardi, New J. Phys.
// 14, 123016 (2012)) for the transverse-field Ising Hamiltonian with every
// qubit coupled through sigma^z_i to its own ohmic bath (dynamics/ohmic_bath.hpp):
//
//   d rho/dt = -i 2 pi [H(s), rho]
//              + sum_i sum_omega gamma(omega) (L rho L^+ - 1/2 {L^+ L, rho}),
//   L_{i,omega} = sum over eigenspace pairs (a, b) of H(s) with E_b - E_a = omega
//                 of P_a sigma^z_i P_b     (omega = 2 pi (E_b - E_a), rad/ns).
//
// Levels closer than kLevelTolerance (relative, see below) form one eigenspace
// and Bohr frequencies closer than that are one frequency, so the generator does
// not depend on the basis an eigensolver picks inside a degenerate eigenspace.
// The Lamb shift is neglected. The full density matrix (2^n x 2^n) is
// propagated, with a dense eigen-decomposition of H at every exponential: this
// is the full-space implementation, for up to about 8 qubits; a frame-based
// one keeping the lowest K levels can implement the same DensityPropagator.
//
// Time stepping: the fourth-order commutator-free Magnus scheme (Blanes & Moan,
// Appl. Numer. Math. 56, 1519 (2006)) for the Hamiltonian part. Each of its two
// exponentials is exp(tau (L_H + D_H)) with H a linear combination of H(t) at
// the two Gauss points; since the secular (grouped) dissipator D_H commutes with
// the commutator superoperator of its own H (covariance of the Davies
// generator), that exponential factorizes exactly into phases in H's eigenbasis
// and exp(tau D_H), the latter summed as a Taylor series. The dissipator is
// thereby second order in the step (midpoint-like quadrature), the coherent part
// fourth order. Steps are chosen by step doubling to the tolerance.
//
//   auto prop = make_full_space_master_equation(H, bath, {.tolerance = 1e-6});
//   prop->advance(drive, t0, t1, rho, stats);
#include <functional>
#include <memory>
#include <string>
#include <vector>

#include <Eigen/Dense>

#include "dynamics/anneal_drive.hpp"
#include "dynamics/ohmic_bath.hpp"
#include "dynamics/propagator.hpp"
#include "hamiltonian/transverse_ising.hpp"
#include "problem/classical_spectrum.hpp"

namespace gapwise {

using DensityMatrix = Eigen::MatrixXcd;

/// Two levels of H(s) closer than kLevelTolerance * max(1 GHz, E_max - E_min)
/// are one eigenspace; two Bohr frequencies closer than that are one frequency.
inline constexpr double kLevelTolerance = 1e-9;
/// Largest number of jump-operator terms the full-space generator builds at one
/// s (sum over Bohr frequencies of the squared number of level pairs); spectra
/// with massively degenerate Bohr frequencies beyond it are refused.
inline constexpr double kMaxJumpTerms = 4e7;

/// The generator at one fixed Hamiltonian H = -(a/2) sum sigma^x + (b/2) D, in
/// H's eigenbasis: energies, eigenvectors and the dissipator in coordinate form
/// acting on the column-major vector of rho in that basis.
struct FrozenGenerator {
  Eigen::VectorXd energies;  ///< GHz, ascending
  Eigen::MatrixXd vectors;   ///< columns are the eigenvectors (computational basis)
  std::vector<int> eigenspace;  ///< eigenspace index of each level
  std::vector<int> jump_row, jump_col;
  std::vector<double> jump_value;   ///< sum_i sum_omega gamma L rho L^+ terms
  std::vector<int> k_row, k_col;
  std::vector<double> k_value;      ///< K = sum_i sum_omega gamma L^+ L (Hermitian, block diagonal)
  double norm_bound = 0.0;          ///< bound on the 1-norm of the dissipator, 1/ns

  int dim() const { return static_cast<int>(energies.size()); }
  /// out = D(rho_e), rho_e in the eigenbasis.
  void apply_dissipator(const DensityMatrix& rho_e, DensityMatrix& out) const;
  /// rho_e <- exp(tau (L_H + D)) rho_e, tau in ns (Taylor series for D in
  /// substeps of norm at most 1/2, then the phases of H; they commute).
  void evolve(DensityMatrix& rho_e, double tau_ns) const;
  /// Eigenbasis <-> computational basis.
  DensityMatrix to_eigenbasis(const DensityMatrix& rho) const;
  DensityMatrix from_eigenbasis(const DensityMatrix& rho_e) const;
};

/// Dense eigen-decomposition of H(a, b) and the dissipator of `bath` there
/// (no dissipator when the coupling is 0). std::runtime_error when the jump
/// terms exceed kMaxJumpTerms.
FrozenGenerator build_frozen_generator(const TransverseIsingHamiltonian& h, double a_ghz, double b_ghz,
                                       const OhmicBath& bath);

/// The same from given levels: energies (GHz, ascending within kLevelTolerance
/// grouping) and s[i] = <m|sigma^z_i|n> between them (n matrices, dim x dim);
/// s empty or a zero coupling: no dissipator. `vectors` is left empty. a_ghz and
/// b_ghz only name the point in errors. Used by the truncated master equation
/// with the lowest K levels.
FrozenGenerator build_frozen_generator(const Eigen::VectorXd& energies, const std::vector<Eigen::MatrixXd>& s,
                                       const OhmicBath& bath, double a_ghz, double b_ghz);

/// The Gibbs state exp(-H/theta)/Z of H(a, b) in the computational basis (theta > 0).
DensityMatrix gibbs_state(const TransverseIsingHamiltonian& h, double a_ghz, double b_ghz, double theta_ghz);

struct OpenPropagationStats {
  long steps = 0;             ///< accepted steps
  long rejected_steps = 0;
  long eigen_solves = 0;      ///< dense eigen-decompositions of H
  double error_estimate = 0;  ///< sum of the step-doubling estimates (sum over levels of |delta population|)
  double max_trace_deviation = 0;  ///< largest |Tr rho - 1| seen after any step
  double min_eigenvalue = 0;       ///< smallest eigenvalue of rho seen at the piece ends (positivity)
  long max_jump_terms = 0;         ///< largest dissipator size built (terms)
};

struct OpenPropagatorOptions {
  /// Allowed error on the level populations at the end of the run: the step
  /// control holds the step-doubling estimate of sum over instantaneous levels
  /// of |delta population| to it, split over the run in proportion to time.
  double tolerance = 1e-6;
  std::function<void(const PropagationProgress&)> progress;
  double progress_interval_s = 0.25;
  /// "auto" (ame-full up to kAutoFullSpaceQubits qubits, ame-truncated beyond),
  /// "ame-full" or "ame-truncated".
  std::string method = "auto";
  /// ame-truncated: the number K of kept levels (0: chosen by the error control,
  /// from start_levels in steps of level_step up to max_levels).
  int levels = 0;
  /// With levels > 0: also run K - 2 and report |p(K) - p(K-2)| as the
  /// truncation estimate (true), or run K alone and report the estimate as NaN,
  /// the K "fixed, not checked" (false; the command line's --bath-levels).
  bool check_levels = true;
  int start_levels = 6;
  int level_step = 4;
  int max_levels = 40;
  /// ame-truncated: largest turn of the eigenbasis per interval (rad).
  double max_rotation = 0.02;
  /// ame-truncated: largest interval in s.
  double max_ds = 0.02;
};

/// What every open-system propagator offers: advance rho (computational basis)
/// across one smooth interval of the drive.
class DensityPropagator {
 public:
  virtual ~DensityPropagator() = default;
  virtual std::string name() const = 0;
  virtual void advance(const AnnealDrive& drive, double t0_ns, double t1_ns, DensityMatrix& rho,
                       OpenPropagationStats& stats) = 0;
};

/// The full-space adiabatic master equation ("ame-full").
std::unique_ptr<DensityPropagator> make_full_space_master_equation(const TransverseIsingHamiltonian& h,
                                                                   const OhmicBath& bath,
                                                                   const OpenPropagatorOptions& options);

struct OpenAnnealResult {
  double duration_ns = 0;
  double ground_probability = 0;  ///< sum of rho_bb over the ground manifold
  double trace_deviation = 0;     ///< |Tr rho - 1| at the end
  double min_eigenvalue = 0;      ///< smallest eigenvalue of rho at the end
  OpenPropagationStats stats;
  std::vector<double> populations;  ///< rho_bb, computational basis, at the end
  double wall_seconds = 0;
  std::string propagator;
  // ame-truncated only (0 / false for ame-full):
  int levels = 0;                     ///< K kept
  double top_level_population = 0;    ///< largest population of the highest kept level along the run
  double lost_population = 0;         ///< population moved out of the kept levels (1 - Tr rho_K)
  double truncation_estimate = 0;     ///< |p(K) - p(K')| of the error control (NaN when not run)
  bool level_cap_hit = false;         ///< the error control reached max_levels without meeting the tolerance
  bool levels_fixed = false;          ///< K given (levels > 0, check_levels false): not checked, estimate NaN
};

/// rho0 = |psi0><psi0| (psi0 from initial_state), propagated piece by piece
/// by the propagator options.method selects (see kAutoFullSpaceQubits).
OpenAnnealResult simulate_open_anneal(const TransverseIsingHamiltonian& h, const GroundManifold& ground,
                                      const EnergyScales& scales, const AnnealPath& path, const QuantumState& psi0,
                                      const OhmicBath& bath, const OpenPropagatorOptions& options);

/// The largest number of qubits the full-space master equation (ame-full) accepts:
/// it holds 2^n x 2^n complex matrices and decomposes H densely at every step.
/// The truncated master equation (ame-truncated) has no fixed limit: it holds K
/// vectors of length 2^n and is bounded by memory (truncated_working_vectors).
inline constexpr int kMaxFullSpaceOpenQubits = 9;
/// method "auto": ame-full up to this many qubits, ame-truncated beyond.
inline constexpr int kAutoFullSpaceQubits = 6;
/// "ame-full" or "ame-truncated" for an "auto" request (other names pass through).
std::string resolve_open_method(const std::string& method, int qubits);

}  // namespace gapwise
