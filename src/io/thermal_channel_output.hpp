#pragma once
// The thermal channel of `diagnose --bath` (studies/thermal_channel.hpp) as
// terminal text, a JSON table and the HDF5 group /thermal of the diagnosis
// file. Layout and meaning of every field: user guide, "diagnose --bath".
//
//   std::cout << thermal_channel_text(tc, bath, closed_p, gap_min);
//   j.insert_or_assign("thermal", thermal_channel_json(tc, bath, closed_p));
//   write_thermal_channel_hdf5(h5, tc, bath, closed_p);
#include <string>
#include <vector>

#include "io/hdf5_output.hpp"
#include "io/json_summary.hpp"
#include "studies/thermal_channel.hpp"

namespace gapwise {

/// `closed_p[k]`: the closed-system p at tc.runs[k]'s duration; `closed_gap_ghz`
/// and `closed_gap_s`: the closed diagnosis' minimum gap (NaN: not known).
std::string thermal_channel_text(const ThermalChannel& tc, const OhmicBath& bath, const std::vector<double>& closed_p,
                                 double closed_gap_ghz, double closed_gap_s);
toml::table thermal_channel_json(const ThermalChannel& tc, const OhmicBath& bath, const std::vector<double>& closed_p);
void write_thermal_channel_hdf5(Hdf5Output& h5, const ThermalChannel& tc, const OhmicBath& bath,
                                const std::vector<double>& closed_p);

}  // namespace gapwise
