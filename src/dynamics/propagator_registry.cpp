#include <stdexcept>

#include "dynamics/frame_propagator.hpp"
#include "dynamics/odeint_propagator.hpp"
#include "dynamics/propagator.hpp"
#include "dynamics/split_operator_propagator.hpp"

namespace gapwise {

std::vector<std::string> propagator_names() { return {"split4", "split2", "split4-yoshida", "split4-bm", "split-auto", "odeint"}; }
// "frame" (FramePropagator) is constructible by make_propagator for library use
// and its tests, but not listed, so no command offers it yet: on a 3-qubit QUBO
// with a pause at 15 ns and tolerance 1e-7 it returned p off by 2e-5 while its
// own grid estimate passed (method notes, the frame section). List it once the
// estimate is trustworthy for short, non-adiabatic pieces.

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
