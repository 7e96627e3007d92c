#pragma once
// compare-paths with a bath: every compared path once more coupled to the bath
// (adiabatic master equation, dynamics/master_equation.hpp), p and the time to
// solution closed and open side by side, and the best path at each duration
// with and without the bath (the highest p there; at equal duration also the
// shortest time to solution).
//
//   ShapeComparison closed = compare_shapes(problem, cands, co);
//   OpenPathComparison r = compare_paths_open(problem, cands, closed, bath, {.tolerance = 1e-6});
//   r.at(1, 0).open.ground_probability;  r.best_open[0];  // index of the best path with the bath
#include <functional>
#include <vector>

#include "dynamics/master_equation.hpp"
#include "studies/shape_comparison.hpp"

namespace gapwise {

struct OpenPathRun {
  double duration_ns = 0;
  double closed_probability = 0;
  OpenAnnealResult open;
  TimeToSolution closed_tts, open_tts;
};

struct OpenPathComparison {
  std::vector<std::string> names;
  std::vector<double> durations_ns;
  std::vector<OpenPathRun> runs;            ///< shape-major, as ShapeComparison
  std::vector<std::size_t> best_closed, best_open;  ///< per duration: index of the path with the highest p
  /// Over every path and duration: the smallest time to solution (index into runs; runs.size() when all are infinite).
  std::size_t best_tts_closed = 0, best_tts_open = 0;
  const OpenPathRun& at(std::size_t shape, std::size_t duration) const { return runs[shape * durations_ns.size() + duration]; }
};

struct OpenPathOptions {
  double tolerance = 1e-6;
  double target_probability = kDefaultTargetProbability;
  std::string method = "auto";   ///< as OpenPropagatorOptions::method
  /// Before each run (done runs so far, total) and during it (the master equation's progress).
  std::function<void(std::size_t done, std::size_t total, const PropagationProgress&)> progress;
};

/// The open runs of the candidates of `closed` (same order). The candidates'
/// start states and paths are the closed comparison's (initial_state of the
/// path, the shape stretched to each duration).
OpenPathComparison compare_paths_open(const IsingProblem& problem, const std::vector<ShapeCandidate>& candidates,
                                      const ShapeComparison& closed, const OhmicBath& bath,
                                      const OpenPathOptions& options);

}  // namespace gapwise
