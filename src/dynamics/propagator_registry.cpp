#include <stdexcept>

#include "dynamics/frame_propagator.hpp"
#include "dynamics/odeint_propagator.hpp"
#include "dynamics/propagator.hpp"
#include "dynamics/split_operator_propagator.hpp"

namespace gapwise {

std::vector<std::string> propagator_names() { return {"split4", "split2", "split4-yoshida", "split4-bm", "split-auto", "odeint", "frame"}; }
// "frame": propagation in the frame of the lowest instantaneous levels, for
// long anneals (src/dynamics/frame_propagator.hpp); it checks itself and runs
// split4 on the pieces it cannot hold to the tolerance.

std::unique_ptr<Propagator> make_propagator(const std::string& name, const TransverseIsingHamiltonian& h,
                                            const PropagatorOptions& options) {
  if (name == "frame") return std::make_unique<FramePropagator>(h, options);
  if (name == "odeint") return std::make_unique<OdeintPropagator>(h, options);
  if (name == "split4") return std::make_unique<SplitOperatorPropagator>(h, options, SplitComposition::Suzuki4);
  if (name == "split2") return std::make_unique<SplitOperatorPropagator>(h, options, SplitComposition::Strang2);
  if (name == "split-auto") return std::make_unique<SplitOperatorPropagator>(h, options, SplitComposition::Auto);
  if (name == "split4-bm") return std::make_unique<SplitOperatorPropagator>(h, options, SplitComposition::BlanesMoan4);
  if (name == "split4-yoshida")
    return std::make_unique<SplitOperatorPropagator>(h, options, SplitComposition::Yoshida4);
  throw std::invalid_argument("unknown propagator '" + name + "'");
}

}  // namespace gapwise
