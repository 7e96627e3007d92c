#pragma once
// The fast propagator: split-operator steps for
//
//   d psi/dt = -i 2 pi H(t) psi,   H(t) = -(a(t)/2) sum_i sigma^x_i + (b(t)/2) D
//
// (t in ns, a and b in GHz). One second-order (Strang) stage of length h with
// the coefficients frozen at its midpoint t_m is
//
//   S(h) = exp(-i pi h b(t_m) D / 2) exp(+i pi h a(t_m) sum sigma^x) exp(-i pi h b(t_m) D / 2),
//
// every factor exact (SplitExponentials: per-qubit rotations and diagonal
// phases). S is symmetric (S(-h) S(h) = 1), so symmetric compositions raise the
// order: fourth order by the triple jump (Yoshida, Phys. Lett. A 150, 262
// (1990)) or by Suzuki's five-stage fractal composition (Suzuki, Phys. Lett. A
// 146, 319 (1990); journal references from memory). Neighbouring half phases are
// merged, also across consecutive steps inside a piece, so a step of S stages
// costs S rotation sweeps, each fused with one phase (one more per piece).
//
// Error control by refining the whole run (global Richardson), on
// the quantity users read: outcome probabilities. Splitting has a sharp
// accuracy threshold (the phase pi h b dE of a single spin flip must stay well
// below pi per step), after which the error of probabilities falls much faster
// than the error of the amplitudes' phases, which no measurement at the end
// sees. A local amplitude-error control would therefore take several times the
// steps the probabilities need. Instead, at the first call the propagator
// runs the rest of the path twice, with N and 4N/5 uniform steps per piece
// (pieces: the path's linear pieces cut at the energy-scale table's knots, so
// no step straddles a kink of A or B), from one start, and estimates the
// error of the finer run from two differences of the finals,
//
//   d_p = | p_fine(W) - p_coarse(W) |   (W: PropagatorOptions::watched_states,
//                                        the ground manifold in simulate_anneal)
//   TV  = (1/2) sum_b | p_fine(b) - p_coarse(b) |
//
// (TV bounds the difference of the probability of any set of outcomes). The
// first pair's d of the controlled quantity is read as err = 20 d (just past
// the splitting threshold the error can stall in N, see prepare); every later
// pair, N and q N steps, as err = d / (q^k - 1), k the method's order or less
// when successive differences fall more slowly than that order predicts.
// Accepted when err_p <= tolerance/2 and err_TV <= others_factor x tolerance/2
// (nothing watched: err_TV <= tolerance/2); else the next grid is q times
// finer, q (1.4 to 4) predicted from the Richardson reading to land at 0.4 x
// the limit (the old fine run becomes the coarse one). The first grid scales
// with the tolerance: coarser when it is looser (down to just past the
// composition's threshold), finer when it is tighter. The
// run the caller sees then replays the
// accepted fine run on the same grid (bit for bit, so the estimate is its
// own); states at the path's waypoints are kept from the pilot, so a run
// without interior observations costs the pilot only, and an observation off
// the grid is a side branch that does not perturb the main trajectory.
// PropagationStats::error_estimate receives err_p (err_TV when nothing is watched).
//
//   auto prop = make_propagator("split4", H, {.tolerance = 1e-6});
//   prop->advance(drive, 0.0, 100.0, psi, stats);   // stats.error_estimate <= 5e-7
#include <string>
#include <vector>

#include "dynamics/propagator.hpp"
#include "dynamics/split_exponentials.hpp"

namespace gapwise {

enum class SplitComposition {
  Strang2,   ///< second order, one stage
  Yoshida4,  ///< fourth order, triple jump (3 stages)
  Suzuki4,   ///< fourth order, Suzuki's fractal (5 stages, smaller error constant)
  /// fourth order, the optimized 6-stage method S6 of Blanes and Moan (J. Comput.
  /// Appl. Math. 142, 313 (2002), coefficients from memory, order checked by
  /// tests): phases and rotations alternate with their own coefficients
  /// (phase, rotation, ..., phase: 7 phases, 6 rotations), not a composition of
  /// Strang stages; time advances with the phases, each of which integrates
  /// b(t) over its substep (2-point Gauss-Legendre), the rotations take a(t) at
  /// their instant.
  BlanesMoan4,
  /// "split-auto": Strang (one stage per step) while the splitting threshold,
  /// not the tolerance, sets the step; when the first pair of runs predicts that
  /// second order would need more than kSwitchSteps times the steps, the run
  /// continues with BlanesMoan4 (smallest error per stage). See prepare().
  Auto,
};

class SplitOperatorPropagator final : public Propagator {
 public:
  SplitOperatorPropagator(const TransverseIsingHamiltonian& h, PropagatorOptions options, SplitComposition composition);
  std::string name() const override;
  std::string kernels() const override;
  /// Auto: Blanes-Moan is taken (from the start, or after any pair of Strang runs)
  /// when Strang's predicted remaining work exceeds this fraction of a
  /// Blanes-Moan first pair (work in exponential stages; see prepare()).
  static constexpr double kSwitchBias = 0.65;
  /// The composition in use (Auto: Strang2 until it switches to BlanesMoan4).
  SplitComposition composition() const { return composition_; }
  void advance(const AnnealDrive& drive, double t0_ns, double t1_ns, QuantumState& psi,
               PropagationStats& stats) override;

  int order() const { return composition_ == SplitComposition::Strang2 ? 2 : 4; }
  /// Steps of the first fine run per unit of T x rate (rate: the largest
  /// single-flip phase rate plus twice A's), at loose tolerances: just past the
  /// composition's splitting threshold (measured, see prepare()).
  static double floor_steps(SplitComposition c);
  /// The same at tolerance 1e-6; scaled by (1e-6 / tolerance)^(1/order) at others.
  static double start_steps(SplitComposition c);
  /// The first fine run's steps per unit of T x rate: the larger of the two.
  static double fine_steps(SplitComposition c, double tolerance);
  /// Work (exponential stages per unit of T x rate) of the first pair of runs.
  static double first_pair_work(SplitComposition c, double tolerance);
  /// One composed step of length h_ns from t_ns, no error control (used by the
  /// step-doubling controller, and by tests of the order of convergence).
  void fixed_step(const AnnealDrive& drive, double t_ns, double h_ns, SplitState& x) const;
  /// fixed_step without its last half phase: the phase angle owed is added to
  /// pending_phi (which enters merged with the step's first half phase), so
  /// consecutive steps share one phase pass; settle with exponentials().phase().
  void open_step(const AnnealDrive& drive, double t_ns, double h_ns, SplitState& x, double& pending_phi) const;
  /// Exponential stages per step (each one rotation sweep and one phase).
  int stages() const { return static_cast<int>(aba_rot_.empty() ? weights_.size() : aba_rot_.size()); }
  const SplitExponentials& exponentials() const { return ex_; }
  /// Bytes held besides the caller's state (work states, kept waypoint states,
  /// the level index); valid after the first advance().
  std::size_t memory_bytes() const;
  /// Largest change of D under one spin flip (sets the first step guess).
  double flip_energy_max() const { return flip_max_; }
  /// Uniform steps per ns of the accepted grid (0 before the first advance()).
  double accepted_steps_per_ns() const;
  /// Error estimate of the last accepted grid for any set of outcomes (from
  /// TV); the watched set's estimate goes to PropagationStats::error_estimate.
  double others_error_estimate() const { return others_error_; }

 private:
  struct Piece {
    double t0, t1;
    long steps;
    double h() const { return (t1 - t0) / static_cast<double>(steps); }
    double at(long j) const { return j == steps ? t1 : t0 + static_cast<double>(j) * h(); }
  };
  void switch_to_blanes_moan();
  void open_step_aba(const AnnealDrive& drive, double t_ns, double h_ns, SplitState& x, double& pending_phi) const;
  void prepare(const AnnealDrive& drive, double t_start, const QuantumState& psi, PropagationStats& stats);
  /// Runs x through the pieces with `factor` times the grid's steps; keeps the
  /// states at the piece ends in kept_ when `keep`.
  long run_pieces(const AnnealDrive& drive, SplitState& x, long factor_num, long factor_den, bool keep);

  SplitExponentials ex_;
  PropagatorOptions opt_;
  SplitComposition composition_;
  bool adaptive_ = false;  ///< constructed as Auto
  std::vector<double> weights_;       ///< Strang-stage weights (compositions of Strang stages)
  std::vector<double> aba_phase_, aba_rot_;  ///< phase and rotation coefficients (BlanesMoan4)
  double flip_max_ = 0.0;
  double others_error_ = 0.0;
  // The accepted grid and the main trajectory on it.
  bool ready_ = false;
  std::vector<Piece> pieces_;
  std::vector<SplitState> kept_;  ///< fine-run state at each piece end (empty when too large to keep)
  SplitState x_, coarse_, branch_;
  std::size_t piece_ = 0;
  long step_ = 0;
  double pending_phi_ = 0.0;  ///< phase x_ still owes (inside a piece)
  QuantumState last_out_;
  double t_out_ = 0.0;
  // Progress: trial runs are passes 1, 2, ... of prepare(); the run along the
  // accepted grid in advance() is pass replay_pass_.
  ProgressTicker ticker_{opt_};
  int pass_ = 0;
  int replay_pass_ = 1;
};

}  // namespace gapwise
