#pragma once
// A pause map once more with a thermal bath: the same paths as
// studies/shape_maps' pause_map (pause_map_paths), each run with the adiabatic
// master equation (serial, not journaled), gathered on the map's grid.
//
//   const OpenPauseMap open = open_pause_map(setup, options, bath, propagator_options);
//   open.p[i * options.pause_ns.size() + j];   // p with the bath at pause_s[i], pause_ns[j]
#include <cstddef>
#include <functional>
#include <vector>

#include "dynamics/master_equation.hpp"
#include "studies/shape_maps.hpp"

namespace gapwise {

struct OpenPauseMap {
  const OhmicBath* bath = nullptr;     ///< nullptr: no bath (the closed map only)
  std::vector<double> p;               ///< row-major (rows: pause_s), as PauseMap::points
  std::vector<double> reference;       ///< per pause duration: the unpaused run of the same cost
  std::vector<OpenAnnealResult> runs;  ///< every open-system run, for the method report
};

/// The cell with the largest gain of p over its unpaused reference.
struct PauseMapCell {
  std::size_t i = 0, j = 0;  ///< pause_s[i], pause_ns[j]
  double gain = 0;
};

/// Runs every path of the map with the bath; `progress(done, total)` after each run.
OpenPauseMap open_pause_map(const AnnealSetup& setup, const PauseMapOptions& options, const OhmicBath& bath,
                            const OpenPropagatorOptions& propagator,
                            const std::function<void(std::size_t, std::size_t)>& progress = {});

/// The best cell of the closed map (first of equal gains, location-major).
PauseMapCell best_pause(const PauseMap& map);
/// The best cell with the bath.
PauseMapCell best_pause(const OpenPauseMap& open, const PauseMapOptions& options);

}  // namespace gapwise
