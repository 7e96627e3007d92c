#pragma once
// What every propagator offers: advance a state across one smooth interval of
// the drive (one piece of the path) to a stated tolerance. The anneal driver
// (anneal_simulation.hpp) cuts the run into such intervals and calls observers
// in between; propagators know nothing of observers or studies.
//
//   auto prop = make_propagator("odeint", H, {.tolerance = 1e-8});
//   prop->advance(drive, t0, t1, psi, stats);
#include <algorithm>
#include <chrono>
#include <functional>
#include <memory>
#include <string>
#include <vector>

#include "dynamics/anneal_drive.hpp"
#include "dynamics/quantum_state.hpp"
#include "hamiltonian/transverse_ising.hpp"

namespace gapwise {

class FramePointCache;

/// Where a propagation stands, for a progress display. A propagator may pass
/// over the path more than once: the split propagators' trial runs of the step
/// doubling are passes 1, 2, ... and their final run along the chosen grid (the
/// one observers see) is one more; odeint makes one pass.
struct PropagationProgress {
  int pass = 1;
  double fraction = 0.0;  ///< of the path's duration covered in this pass, 0 to 1, non-decreasing within a pass
};

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
  /// Called during long propagations (empty: never). Results are bit for bit
  /// the same with and without it. Each pass that reaches the end of the path
  /// ends with a call at fraction 1.
  std::function<void(const PropagationProgress&)> progress;
  /// Least wall time between two calls inside a pass (0: at every check, which
  /// comes every ProgressTicker::kCheckEvery steps); the calls at fraction 1 are
  /// always made.
  double progress_interval_s = 0.25;
  /// The frame propagator's store of solved eigenpairs (src/frame/frame_point_cache.hpp),
  /// shared by every anneal of one problem and schedule (a duration study's
  /// durations, the accuracy re-run). Empty: each frame propagator keeps its own,
  /// shared by the pieces of its anneal. Other propagators ignore it.
  std::shared_ptr<FramePointCache> frame_cache;
};

/// The throttle every propagator reports through: counts steps and looks at
/// the clock only every kCheckEvery of them, so an empty callback costs one
/// branch per step and a set one a clock read per kCheckEvery steps.
class ProgressTicker {
 public:
  static constexpr int kCheckEvery = 64;
  explicit ProgressTicker(const PropagatorOptions& o) : callback_(o.progress), interval_s_(o.progress_interval_s) {}
  /// One step done in `pass`, reaching t_ns of a path of duration_ns.
  void step(int pass, double t_ns, double duration_ns) {
    if (!callback_ || ++count_ < kCheckEvery) return;
    count_ = 0;
    const auto now = std::chrono::steady_clock::now();
    if (called_ && std::chrono::duration<double>(now - last_).count() < interval_s_) return;
    called_ = true;
    last_ = now;
    callback_({pass, duration_ns > 0 ? std::clamp(t_ns / duration_ns, 0.0, 1.0) : 1.0});
  }
  /// `pass` has reached the end of the path.
  void finish(int pass) {
    if (!callback_) return;
    count_ = 0;
    callback_({pass, 1.0});
  }

 private:
  std::function<void(const PropagationProgress&)> callback_;
  double interval_s_;
  int count_ = 0;
  bool called_ = false;
  std::chrono::steady_clock::time_point last_{};
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
  long frame_warm_solves = 0;        ///< of those, warm started from the previous point's vectors
  long frame_reused_points = 0;      ///< grid points taken from the frame cache (solved by an earlier frame; not in frame_eigen_solves)
  double frame_top_level_population = 0.0;  ///< largest population seen on the highest kept level (leakage indicator)
  double frame_truncation_estimate = 0.0;   ///< sum over pieces of |p(K) - p(K')|, K' < K (change of p with K)
  long frame_pieces = 0;             ///< pieces run in the frame
  long frame_fallback_pieces = 0;    ///< pieces the frame could not hold to the tolerance: run by split4 instead
};

class Propagator {
 public:
  virtual ~Propagator() = default;
  virtual std::string name() const = 0;
  /// The kernels a split propagator runs, e.g. "avx512, table phases (195
  /// levels)": the instruction-set variant chosen at run time (or by
  /// GAPWISE_KERNELS) and how the diagonal's phases are found. Empty for
  /// propagators without these kernels (odeint, frame).
  virtual std::string kernels() const { return {}; }
  /// Advances psi from t0 to t1 (ns); the drive is smooth on [t0, t1].
  virtual void advance(const AnnealDrive& drive, double t0_ns, double t1_ns, QuantumState& psi,
                       PropagationStats& stats) = 0;
};

/// Names of the propagators make_propagator knows.
std::vector<std::string> propagator_names();
/// A propagator's name as a number for numeric records (journals, HDF5 code
/// datasets): its index in propagator_names(); -1 for an empty or unknown name.
double propagator_code(const std::string& name);
/// The inverse; "" for a code that names none.
std::string propagator_name_of_code(double code);
/// "0 split4 1 split2 ...": the codes' meaning, for a dataset attribute.
std::string propagator_code_legend();
/// How many runs each propagator made, in order of first appearance (an empty
/// name counts as "unknown"), and the same as text: "split-auto 38, frame 2".
std::vector<std::pair<std::string, std::size_t>> propagator_counts(const std::vector<std::string>& used);
std::string propagator_tally(const std::vector<std::string>& used);
/// Throws std::invalid_argument for an unknown name.
std::unique_ptr<Propagator> make_propagator(const std::string& name, const TransverseIsingHamiltonian& h,
                                            const PropagatorOptions& options);

}  // namespace gapwise
