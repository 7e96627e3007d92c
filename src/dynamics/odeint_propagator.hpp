#pragma once
// The reference propagator: Boost.Odeint's controlled Dormand-Prince 5(4)
// stepper on d psi/dt = -i 2 pi H(t) psi (t in ns, H in GHz). Generic and
// trusted; the fast propagators are checked against it.
#include "dynamics/propagator.hpp"

namespace gapwise {

class OdeintPropagator final : public Propagator {
 public:
  OdeintPropagator(const TransverseIsingHamiltonian& h, PropagatorOptions options) : h_(h), opt_(options) {}
  std::string name() const override { return "odeint"; }
  void advance(const AnnealDrive& drive, double t0_ns, double t1_ns, QuantumState& psi,
               PropagationStats& stats) override;

 private:
  const TransverseIsingHamiltonian& h_;
  PropagatorOptions opt_;
  ProgressTicker ticker_{opt_};
};

}  // namespace gapwise
