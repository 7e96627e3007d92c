#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "dynamics/frame_propagator.hpp"
#include "dynamics/odeint_propagator.hpp"
#include "dynamics/propagator.hpp"
#include "dynamics/split_operator_propagator.hpp"

namespace gapwise {

std::vector<std::string> propagator_names() { return {"split4", "split2", "split4-yoshida", "split4-bm", "split-auto", "odeint", "frame", "auto"}; }
// "auto": split-auto or frame per anneal, whichever is predicted cheaper
// (propagator_choice.hpp); simulate_anneal resolves it before make_propagator.
// "frame": propagation in the frame of the lowest instantaneous levels, for
// long anneals (src/dynamics/frame_propagator.hpp); it checks itself and runs
// split4 on the pieces it cannot hold to the tolerance.

double propagator_code(const std::string& name) {
  const auto names = propagator_names();
  for (std::size_t k = 0; k < names.size(); ++k)
    if (names[k] == name) return static_cast<double>(k);
  return -1.0;
}

std::string propagator_name_of_code(double code) {
  const auto names = propagator_names();
  if (!(code >= 0) || code >= static_cast<double>(names.size()) || code != std::floor(code)) return "";
  return names[static_cast<std::size_t>(code)];
}

std::string propagator_code_legend() {
  const auto names = propagator_names();
  std::string out;
  for (std::size_t k = 0; k < names.size(); ++k) out += (k ? " " : "") + std::to_string(k) + " " + names[k];
  return out;
}

std::vector<std::pair<std::string, std::size_t>> propagator_counts(const std::vector<std::string>& used) {
  std::vector<std::pair<std::string, std::size_t>> counts;
  for (const auto& u : used) {
    const std::string name = u.empty() ? "unknown" : u;
    auto it = std::find_if(counts.begin(), counts.end(), [&](const auto& c) { return c.first == name; });
    if (it == counts.end()) counts.emplace_back(name, 1);
    else ++it->second;
  }
  return counts;
}

std::string propagator_tally(const std::vector<std::string>& used) {
  std::string s;
  for (const auto& [name, n] : propagator_counts(used)) s += (s.empty() ? "" : ", ") + name + " " + std::to_string(n);
  return s;
}

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
  if (name == "auto")
    throw std::invalid_argument("propagator 'auto' is chosen per anneal: run it through simulate_anneal");
  throw std::invalid_argument("unknown propagator '" + name + "'");
}

}  // namespace gapwise
