#include <stdexcept>

#include "dynamics/odeint_propagator.hpp"
#include "dynamics/propagator.hpp"

namespace gapwise {

std::vector<std::string> propagator_names() { return {"odeint"}; }

std::unique_ptr<Propagator> make_propagator(const std::string& name, const TransverseIsingHamiltonian& h,
                                            const PropagatorOptions& options) {
  if (name == "odeint") return std::make_unique<OdeintPropagator>(h, options);
  throw std::invalid_argument("unknown propagator '" + name + "'");
}

}  // namespace gapwise
