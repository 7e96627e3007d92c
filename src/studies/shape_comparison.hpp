#pragma once
// Several paths on one problem at equal total duration (or over a list of
// durations): p and time to solution per path and duration, and the populations
// of the lowest instantaneous levels along each run, so one sees where
// population leaks. Every path is its shape stretched to exactly the duration
// (AnnealPath::scaled_to ends at the duration bit for bit); the end times are
// reported so the equality can be checked.
//
//   std::vector<ShapeCandidate> c{{"linear", linear}, {"pause 0.45", paused}, {"local adiabatic", g.schedule}};
//   ShapeComparison r = compare_shapes(problem, c, {.durations_ns = {20, 50}});
//   r.at(1, 0).ground_probability;  r.at(1, 0).tts.tts_ns;  r.at(1, 0).leak.s_from;
//
// Runs are spread over OpenMP threads, one whole anneal per thread; each run is
// the same deterministic computation whatever the thread count.
#include <string>
#include <vector>

#include "dynamics/anneal_simulation.hpp"
#include "dynamics/level_population_observer.hpp"
#include "studies/time_to_solution.hpp"

namespace gapwise {

struct ShapeCandidate {
  std::string name;
  Schedule schedule;  ///< its scales must equal those of every other candidate
};

struct ShapeComparisonOptions {
  std::vector<double> durations_ns;
  double target_probability = kDefaultTargetProbability;
  SimulationOptions simulation;
  int levels = 4;                 ///< instantaneous levels whose populations are followed
  int population_points = 60;     ///< observations along each run (about; waypoints count too)
  int threads = 0;                ///< 0: OpenMP's default
};

struct ShapeRun {
  std::string name;
  double duration_ns = 0;   ///< requested
  double end_time_ns = 0;   ///< the path's actual last time (== duration_ns)
  double ground_probability = 0;
  double norm_drift = 0;
  TimeToSolution tts;
  std::vector<LevelPopulationObserver::Row> populations;
  PopulationLeak leak;
  long steps = 0;
  double wall_seconds = 0;
};

struct ShapeComparison {
  std::vector<std::string> names;
  std::vector<double> durations_ns;
  SpinFlipSector sector = SpinFlipSector::Full;  ///< where the level populations were taken
  std::vector<ShapeRun> runs;                    ///< shape-major: runs[i * durations + j]
  const ShapeRun& at(std::size_t shape, std::size_t duration) const { return runs[shape * durations_ns.size() + duration]; }
};

/// Throws InputError when candidates disagree on the energy scales or a
/// duration is not positive.
ShapeComparison compare_shapes(const IsingProblem& problem, const std::vector<ShapeCandidate>& candidates,
                               const ShapeComparisonOptions& options);

/// The space whose levels compare_shapes follows: the even spin-flip sector when the
/// problem has no fields and every candidate's start state is invariant under the
/// global flip, else the full space (its `levels` must not exceed that space's states).
SpinFlipSector comparison_sector(const TransverseIsingHamiltonian& h, const std::vector<ShapeCandidate>& candidates);

/// True when two energy-scale objects describe the same A(s), B(s).
bool same_energy_scales(const EnergyScales& x, const EnergyScales& y);

}  // namespace gapwise
