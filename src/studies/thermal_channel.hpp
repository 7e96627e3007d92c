#pragma once
// The thermal channel of a diagnosis: what a bath does along the path.
//
// Definitions (units as everywhere: GHz, ns, theta = k_B T / h in GHz):
//   ground group      the lowest g instantaneous levels of H(s) in the full space,
//                     g the degeneracy of the final ground manifold (these end in
//                     it). The full space, not the spin-flip sector: the bath's
//                     sigma^z_i anticommutes with the global flip, so it couples
//                     the sectors.
//   gap               E_g(s) - E_0(s) (the first level above the ground group).
//   gap = theta       the points along s where the gap crosses theta: where it is
//                     below, the first excited level is thermally reachable
//                     (uphill rate e^{-gap/theta} of the downhill one, > 1/e).
//   relaxation rate   Gamma(s) = (1/d_1) sum_{b in E_1} sum_{a < g} sum_i
//                     |<a|sigma^z_i|b>|^2 gamma(omega_ba) (1 + e^{-beta omega_ba}),
//                     omega_ba = 2 pi (E_b - E_a), E_1 the eigenspace of E_g (d_1
//                     levels): the golden-rule rate at which the populations of
//                     the ground group and the first excited level relax towards
//                     their Boltzmann ratio (for one qubit with gap D:
//                     gamma(2 pi D)(1 + e^{-D/theta}) (A/D)^2).
//   remaining relaxations  N(t) = integral from t to t_f of Gamma(s(t')) dt'
//                     (Gauss-Legendre, 4 points per interval between observations).
//   freeze-out        the last time t_F (and s_F = s(t_F)) with N(t_F) = 1: after
//                     it, less than one relaxation time remains, so the level
//                     populations can no longer follow the bath. None when
//                     N(t_0) < 1 (the bath never equilibrates the two levels).
//   populations       of the lowest `levels` instantaneous levels, read from the
//                     master equation's density matrix at each observation
//                     (ame-full: its rho; ame-truncated: V rho_K V^T).
//
//   ThermalChannel tc = thermal_channel(H, ground, schedule, {100.0}, bath, {});
//   tc.runs[0].freeze_s;  tc.theta_crossings_s;  tc.runs[0].track[5].populations[0];
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "dynamics/master_equation.hpp"
#include "problem/classical_spectrum.hpp"
#include "schedule/schedule.hpp"

namespace gapwise {

struct ThermalLevels {
  std::vector<double> energies_ghz;  ///< lowest levels, ascending
  double gap_ghz = 0;                ///< E_g - E_0 (NaN when the space has no level above the ground group)
  double relaxation_rate_per_ns = 0; ///< Gamma, see above
};

struct ThermalTrackPoint {
  double t_ns = 0, s = 0;
  ThermalLevels levels;
  std::vector<double> populations;   ///< of the lowest levels (same count as energies)
  double group_population = 0;       ///< of the lowest g levels
  double remaining_relaxations = 0;  ///< N(t)
};

struct ThermalRun {
  double duration_ns = 0;
  OpenAnnealResult open;              ///< the final state's p, trace, positivity, method
  std::vector<ThermalTrackPoint> track;
  double total_relaxations = 0;       ///< N(t_0)
  std::optional<double> freeze_t_ns, freeze_s;
  /// Largest fall and largest rise of the ground group's population between two
  /// consecutive observations (0 when there is none), where along s.
  double fall = 0, fall_s_from = 0, fall_s_to = 0;
  double rise = 0, rise_s_from = 0, rise_s_to = 0;
  double lowest_group_population = 1, lowest_at_s = 0;
  std::string track_note;             ///< how the track was obtained, when it differs from the run of `open`
};

struct ThermalChannel {
  double theta_ghz = 0;
  int ground_levels = 1;                  ///< g
  std::vector<double> grid_s, grid_gap_ghz, grid_rate_per_ns;  ///< the gap and Gamma on the s grid
  std::vector<double> theta_crossings_s;  ///< gap = theta (refined), ascending
  double min_gap_over_theta = 0, min_gap_s = 0;  ///< on the grid
  std::vector<ThermalRun> runs;           ///< one per duration
};

struct ThermalChannelOptions {
  int levels = 4;              ///< instantaneous levels whose populations are kept
  int points = 41;             ///< observations along s (evenly in s, plus the path's waypoints)
  /// More s values for the grid and the observations, e.g. the gap minima s* and their
  /// windows from the closed diagnosis: an even grid alone can step over a narrow
  /// minimum and so miss both gap = theta points around it.
  std::vector<double> extra_s;
  double tolerance = 1e-6;     ///< of the master equation
  std::string method = "auto"; ///< as OpenPropagatorOptions::method
  std::function<void(std::size_t duration_index, const PropagationProgress&)> progress;
};

/// The largest problem the thermal channel takes: it decomposes H(s) densely
/// (2^n x 2^n) at every observation point and reads the populations from the
/// full density matrix, whichever master equation ran.
inline constexpr int kMaxThermalChannelQubits = kMaxFullSpaceOpenQubits;

/// Gamma, the gap and the lowest `levels` energies of H(a, b) (dense
/// eigen-decomposition; for up to kMaxThermalChannelQubits qubits).
ThermalLevels thermal_levels(const TransverseIsingHamiltonian& h, double a_ghz, double b_ghz, const OhmicBath& bath,
                             int ground_levels, int levels);

/// The thermal channel at each duration (the schedule's shape stretched to it).
/// Throws std::invalid_argument beyond kMaxThermalChannelQubits qubits.
ThermalChannel thermal_channel(const TransverseIsingHamiltonian& h, const GroundManifold& ground,
                               const Schedule& schedule, const std::vector<double>& durations_ns,
                               const OhmicBath& bath, const ThermalChannelOptions& options);

}  // namespace gapwise
