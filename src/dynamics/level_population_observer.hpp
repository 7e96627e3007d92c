#pragma once
// Populations of the lowest instantaneous levels of H(s) along a run: at each
// observation the lowest eigenspaces of H(s(t)) are computed (shared kernel,
// src/spectrum/lowest_levels.hpp) and the state is projected onto them. This is
// what shows where population leaks out of the instantaneous ground state.
//
//   LevelPopulationObserver pops(H, {.levels = 4});
//   simulate_anneal(H, gm, scales, path, psi0, sim, {&pops});
//   for (const auto& row : pops.rows())
//     row.s, row.populations[0];   // weight on the instantaneous ground level
//
// A "level" here is a distinct energy: an eigenspace, with its degeneracy. The
// population of a degenerate level is the norm of the projection onto the whole
// eigenspace, which does not depend on the basis a solver picks inside it (the
// per-vector split would). Eigenvalues closer than `degeneracy_tol_ghz` count as
// one level. Levels not resolved (a Lanczos run that found fewer complete
// eigenspaces than asked) are reported as NaN, never guessed.
#include <vector>

#include "dynamics/anneal_observer.hpp"
#include "spectrum/lowest_levels.hpp"

namespace gapwise {

struct LevelPopulationOptions {
  int levels = 4;                       ///< distinct levels to report
  double degeneracy_tol_ghz = 1e-8;     ///< eigenvalues closer than this are one level
  EigenMethod method = EigenMethod::Auto;
  /// Even: levels of the even spin-flip sector only (problems without fields,
  /// state in that sector, e.g. a forward anneal from |+>): half the dimension,
  /// and no columns spent on odd levels the state never reaches.
  SpinFlipSector sector = SpinFlipSector::Full;
  /// Record an observation only when at least min_interval_ns after the last
  /// recorded one or at least min_interval_s away from it in s (0, 0: every
  /// observation), and always at t >= final_time_ns.
  double min_interval_ns = 0.0;
  double min_interval_s = 0.0;
  double final_time_ns = 0.0;
  /// Record only the observations at requested s values (SimulationOptions::
  /// observe_s), e.g. to pay for eigenproblems only where the user asked.
  /// Requested observations are always recorded, whatever the intervals above.
  bool requested_only = false;
};

/// Populations of the lowest distinct levels of H = H(a, b) in psi.
struct LevelPopulations {
  std::vector<double> energies_ghz;  ///< size levels; NaN where not resolved
  std::vector<int> degeneracy;       ///< size levels; 0 where not resolved
  std::vector<double> populations;   ///< size levels; NaN where not resolved
};

/// psi is a full-space state; `h` may be a sector (then psi must lie in it).
LevelPopulations level_populations(const SectorHamiltonian& h, double a_ghz, double b_ghz, const QuantumState& psi,
                                   const LevelPopulationOptions& options);
LevelPopulations level_populations(const TransverseIsingHamiltonian& h, double a_ghz, double b_ghz,
                                   const QuantumState& psi, const LevelPopulationOptions& options);

class LevelPopulationObserver final : public AnnealObserver {
 public:
  struct Row {
    double t_ns = 0, s = 0;
    LevelPopulations levels;
  };
  explicit LevelPopulationObserver(const TransverseIsingHamiltonian& h, LevelPopulationOptions options = {})
      : h_(h, options.sector), opt_(options) {}
  void observe(const ObservationPoint& at, const QuantumState& psi) override;
  const std::vector<Row>& rows() const { return rows_; }
  const LevelPopulationOptions& options() const { return opt_; }

 private:
  SectorHamiltonian h_;
  LevelPopulationOptions opt_;
  std::vector<Row> rows_;
};

/// Where the instantaneous ground level lost the most population between two
/// consecutive observations (the first row pair with the largest drop).
struct PopulationLeak {
  double s_from = 0, s_to = 0;   ///< values of s at the two observations
  double t_from_ns = 0, t_to_ns = 0;
  double drop = 0;               ///< population lost by level 0 in that step (0 when it never falls)
  double final_ground_level = 0; ///< level-0 population at the last observation
};
PopulationLeak largest_ground_level_leak(const std::vector<LevelPopulationObserver::Row>& rows);

}  // namespace gapwise
