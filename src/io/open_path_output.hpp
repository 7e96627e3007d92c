#pragma once
// compare-paths --bath outputs (studies/open_path_comparison.hpp): the text
// block under the table, the JSON table `open_system` and the HDF5 group
// /compare/bath. Field by field: user guide, "compare-paths --bath".
#include <string>

#include "io/hdf5_output.hpp"
#include "io/json_summary.hpp"
#include "studies/open_path_comparison.hpp"

namespace gapwise {

std::string open_path_text(const OpenPathComparison& r, const OhmicBath& bath);
toml::table open_path_json(const OpenPathComparison& r, const OhmicBath& bath);
void write_open_path_hdf5(Hdf5Output& h5, const OpenPathComparison& r, const OhmicBath& bath);

}  // namespace gapwise
