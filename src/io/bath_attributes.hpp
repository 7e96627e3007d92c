// The bath's description as attributes of an HDF5 group: one writer for every
// result that ran with a bath (anneal, durations, pause-map, compare-paths,
// the thermal channel of diagnose), so each file names the bath the same way.
#pragma once

#include <string>

#include "dynamics/ohmic_bath.hpp"
#include "io/hdf5_output.hpp"

namespace gapwise {

/// bath_file, temperature_mk, theta_ghz (k_B T/h), coupling (eta), cutoff_ghz
/// and illustrative_defaults_used (1 when any value came from the defaults).
void write_bath_attributes(Hdf5Output& h5, const std::string& group, const OhmicBath& bath);

}  // namespace gapwise
