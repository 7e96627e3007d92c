#pragma once
// What every propagator offers: advance a state across one smooth interval of
// the drive (one piece of the path) to a stated tolerance. The anneal driver
// (anneal_simulation.hpp) cuts the run into such intervals and calls observers
// in between; propagators know nothing of observers or studies.
//
//   auto prop = make_propagator("odeint", H, {.tolerance = 1e-8});
//   prop->advance(drive, t0, t1, psi, stats);
#include <memory>
#include <string>
#include <vector>

#include "dynamics/anneal_drive.hpp"
#include "dynamics/quantum_state.hpp"
#include "hamiltonian/transverse_ising.hpp"

namespace gapwise {

struct PropagatorOptions {
  /// Target accuracy of the run: the error allowed on amplitudes (and so on
  /// probabilities) at the end. Each propagator maps it to its own step control
  /// and the anneal driver checks it by a re-run at tolerance/10.
  double tolerance = 1e-6;
  /// The outcome set whose summed probability the step control holds to
  /// `tolerance` (simulate_anneal passes the ground manifold, so this is p).
  /// Every other outcome probability, and that of any set of outcomes, is held
  /// to `others_factor` x tolerance. Empty: every outcome set to the tolerance.
  /// Propagators without a probability control (odeint) ignore both.
  std::vector<std::size_t> watched_states;
  double others_factor = 100.0;
};

struct PropagationStats {
  long steps = 0;                    ///< accepted steps
  long rejected_steps = 0;           ///< where the propagator can tell
  long hamiltonian_applications = 0; ///< H x products (or equivalent kernel passes)
  double error_estimate = 0.0;       ///< accumulated local error estimate (propagator's own measure)
  // The frame propagator ("frame") only; zero for the others.
  int frame_levels = 0;              ///< largest number K of kept instantaneous levels used
  long frame_grid_points = 0;        ///< grid points in s over all pieces run in the frame
  long frame_eigen_solves = 0;       ///< eigen-decompositions (accepted and rejected grid points, all K tried)
  double frame_top_level_population = 0.0;  ///< largest population seen on the highest kept level (leakage indicator)
  double frame_truncation_estimate = 0.0;   ///< sum over pieces of |p(K) - p(K')|, K' < K (change of p with K)
  long frame_pieces = 0;             ///< pieces run in the frame
  long frame_fallback_pieces = 0;    ///< pieces the frame could not hold to the tolerance: run by split4 instead
};

class Propagator {
 public:
  virtual ~Propagator() = default;
  virtual std::string name() const = 0;
  /// Advances psi from t0 to t1 (ns); the drive is smooth on [t0, t1].
  virtual void advance(const AnnealDrive& drive, double t0_ns, double t1_ns, QuantumState& psi,
                       PropagationStats& stats) = 0;
};

/// Names of the propagators make_propagator knows.
std::vector<std::string> propagator_names();
/// Throws std::invalid_argument for an unknown name.
std::unique_ptr<Propagator> make_propagator(const std::string& name, const TransverseIsingHamiltonian& h,
                                            const PropagatorOptions& options);

}  // namespace gapwise
