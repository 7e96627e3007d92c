#pragma once
// Observers: measurements taken at chosen times of a run, decoupled from the
// propagator. The driver calls every observer at each waypoint of the path and
// at the requested interior samples.
//
//   TraceObserver trace(H, ground);
//   simulate_anneal(..., {&trace});
//   for (auto& row : trace.rows()) ...   // t, s, p_ground, <H>, norm
#include <vector>

#include "dynamics/quantum_state.hpp"
#include "hamiltonian/transverse_ising.hpp"
#include "problem/classical_spectrum.hpp"

namespace gapwise {

struct ObservationPoint {
  double t_ns = 0;
  double s = 0;
  double a_ghz = 0;
  double b_ghz = 0;
  /// True at the s values asked for by SimulationOptions::observe_s (s is then
  /// exactly the requested value); false at waypoints and evenly spaced samples.
  bool requested = false;
};

class AnnealObserver {
 public:
  virtual ~AnnealObserver() = default;
  virtual void observe(const ObservationPoint& at, const QuantumState& psi) = 0;
};

/// Total probability of the classical ground manifold in psi.
double ground_probability(const QuantumState& psi, const GroundManifold& ground);

/// <psi|H|psi> in GHz at coefficients (a, b).
double energy_expectation_ghz(const TransverseIsingHamiltonian& h, double a_ghz, double b_ghz,
                              const QuantumState& psi);

/// Records, at each observation: ground-state probability so far, energy
/// expectation (GHz) and norm.
class TraceObserver final : public AnnealObserver {
 public:
  struct Row {
    double t_ns, s, ground_probability, energy_ghz, norm;
    bool requested;  ///< at an s of SimulationOptions::observe_s
  };
  TraceObserver(const TransverseIsingHamiltonian& h, const GroundManifold& ground) : h_(h), ground_(ground) {}
  void observe(const ObservationPoint& at, const QuantumState& psi) override;
  const std::vector<Row>& rows() const { return rows_; }

 private:
  const TransverseIsingHamiltonian& h_;
  const GroundManifold& ground_;
  std::vector<Row> rows_;
  QuantumState scratch_;
};

}  // namespace gapwise
