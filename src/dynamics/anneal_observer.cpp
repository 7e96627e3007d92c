#include "dynamics/anneal_observer.hpp"

namespace gapwise {

double ground_probability(const QuantumState& psi, const GroundManifold& ground) {
  double p = 0.0;
  for (BasisIndex b : ground.states) p += std::norm(psi[b]);
  return p;
}

double energy_expectation_ghz(const TransverseIsingHamiltonian& h, double a, double b, const QuantumState& psi) {
  QuantumState hpsi(psi.size());
  h.apply(a, b, psi.data(), hpsi.data());
  Complex e(0.0, 0.0);
  for (std::size_t k = 0; k < psi.size(); ++k) e += std::conj(psi[k]) * hpsi[k];
  return e.real();
}

void TraceObserver::observe(const ObservationPoint& at, const QuantumState& psi) {
  rows_.push_back({at.t_ns, at.s, ground_probability(psi, ground_), energy_expectation_ghz(h_, at.a_ghz, at.b_ghz, psi),
                   norm_squared(psi), at.requested});
}

}  // namespace gapwise
