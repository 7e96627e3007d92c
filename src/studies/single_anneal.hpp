#pragma once
// One anneal of a problem along a path, as `gapwise anneal` runs it: the run
// with its observers (trace, level populations at chosen s), the accuracy
// re-run at tolerance/10, and, with a bath, the same path once more with the
// adiabatic master equation. The options are checked by the caller.
//
//   SingleAnnealOptions so;          // tolerance, observe_s, levels, bath, ...
//   const SingleAnneal a = run_single_anneal(problem, schedule, path, so);
//   a.result.ground_probability;     // p; a.delta_p: |dp| of the re-run
#include <limits>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "dynamics/accuracy_guard.hpp"
#include "dynamics/anneal_observer.hpp"
#include "dynamics/anneal_simulation.hpp"
#include "dynamics/level_population_observer.hpp"
#include "dynamics/master_equation.hpp"
#include "hamiltonian/spin_flip_sector.hpp"
#include "problem/ising_problem.hpp"
#include "schedule/schedule.hpp"

namespace gapwise {

/// Which pass of the anneal a progress report belongs to.
struct SingleAnnealStage {
  int run = 1;          ///< 1: the run; 2: the check at tolerance/10; 0: the run with the bath
  int runs = 2;         ///< closed-system runs in all (1 without the check)
  bool truncated = false;  ///< with the bath: the truncated master equation (K passes)
};

struct SingleAnnealOptions {
  std::string propagator = SimulationOptions{}.propagator;
  double frame_above_ns = std::numeric_limits<double>::quiet_NaN();  ///< forced crossover of "auto" (NaN: the cost model)
  double tolerance = 1e-6;
  bool p_only = false;     ///< hold only p to the tolerance
  bool check = true;       ///< the re-run at tolerance/10
  int trace_points = 20;   ///< observations inside each piece of the path
  int top = 8;             ///< most probable outcomes kept
  std::vector<double> observe_s;  ///< sorted, unique, each reached by the path
  int levels = 0;          ///< level populations at the observe_s points (0: none)
  const OhmicBath* bath = nullptr;  ///< also the open-system run when given
  OpenPropagatorOptions open;       ///< how the open system runs (with a bath); its progress is set here
  std::function<void(const SingleAnnealStage&, const PropagationProgress&)> progress;
};

struct SingleAnneal {
  GroundManifold ground;
  AnnealResult result;
  std::optional<double> delta_p;  ///< |dp| of the re-run (none without the check)
  std::vector<AccuracyIssue> accuracy;  ///< check_accuracy of the run
  std::vector<TraceObserver::Row> trace;
  std::vector<LevelPopulationObserver::Row> level_rows;  ///< when levels > 0
  SpinFlipSector sector = SpinFlipSector::Full;          ///< where the level populations are taken
  std::optional<OpenAnnealResult> open;                  ///< with a bath
};

/// The sector whose levels matter: the even spin-flip sector when the problem
/// has no fields and the anneal starts in the ground state (a forward anneal
/// then stays in it), else the full space.
SpinFlipSector single_anneal_sector(const IsingProblem& problem, const Schedule& schedule);

/// Runs the anneal of `problem` along `path` (a path of `schedule`).
SingleAnneal run_single_anneal(const IsingProblem& problem, const Schedule& schedule, const AnnealPath& path,
                               const SingleAnnealOptions& options);

}  // namespace gapwise
