#include "studies/open_pause_map.hpp"

#include <map>

namespace gapwise {

OpenPauseMap open_pause_map(const AnnealSetup& setup, const PauseMapOptions& mo, const OhmicBath& bath,
                            const OpenPropagatorOptions& propagator,
                            const std::function<void(std::size_t, std::size_t)>& progress) {
  OpenPauseMap open;
  open.bath = &bath;
  const auto paths = pause_map_paths(setup, mo);
  std::size_t done = 0;
  std::map<std::vector<double>, double> value;
  for (const auto& [key, path] : paths) {
    open.runs.push_back(simulate_open_anneal(setup.hamiltonian, setup.ground, setup.schedule.scales, path, setup.start,
                                             bath, propagator));
    value[key] = open.runs.back().ground_probability;
    if (progress) progress(++done, paths.size());
  }
  for (double d : mo.pause_ns) open.reference.push_back(value.at(pause_map_reference_key(mo, d)));
  for (double s : mo.pause_s)
    for (double d : mo.pause_ns) open.p.push_back(d > 0 ? value.at({s, d}) : value.at(pause_map_reference_key(mo, d)));
  return open;
}

PauseMapCell best_pause(const PauseMap& m) {
  PauseMapCell b;
  b.gain = -1;
  for (std::size_t i = 0; i < m.options.pause_s.size(); ++i)
    for (std::size_t j = 0; j < m.options.pause_ns.size(); ++j) {
      const double gain = m.at(i, j).ground_probability - m.reference[j].ground_probability;
      if (gain > b.gain) b = {i, j, gain};
    }
  return b;
}

PauseMapCell best_pause(const OpenPauseMap& open, const PauseMapOptions& mo) {
  PauseMapCell b;
  b.gain = -2;
  const std::size_t nj = mo.pause_ns.size();
  for (std::size_t i = 0; i < mo.pause_s.size(); ++i)
    for (std::size_t j = 0; j < nj; ++j) {
      const double gain = open.p[i * nj + j] - open.reference[j];
      if (gain > b.gain) b = {i, j, gain};
    }
  return b;
}

}  // namespace gapwise
