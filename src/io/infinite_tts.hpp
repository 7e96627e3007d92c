#pragma once
// How every result file and table holds an infinite time to solution (p = 0:
// no number of repetitions reaches the target), and "not applicable". One place:
//   HDF5 datasets:   IEEE +inf, the dataset's `inf_meaning` attribute saying why
//                    (tts_meaning("ns")); "not applicable" is NaN with a
//                    `nan_meaning` (not_applicable("1", "...")); h5py and NumPy
//                    read both as they are (np.isinf, np.nanmedian);
//   HDF5 attributes: IEEE +inf / NaN, documented in the user guide;
//   text tables and CSV: "inf";
//   JSON summaries:  the key is left out (JSON has no infinity).
// Repetition counts (infinite for the same reason) use the same convention.
//
//   h5.write("/x/tts_ns", stored_tts(values), tts_meaning("ns"));
//   table.add({..., tts_text(x.tts_ns, 6)});
//   put_tts(json, "tts_ns", x.tts_ns);
#include <string>
#include <string_view>
#include <vector>

#include "io/hdf5_output.hpp"
#include "io/json_summary.hpp"

namespace gapwise {

/// The value a result file holds: +inf stays +inf (kept as a function so that
/// every writer goes through the one convention).
double stored_tts(double tts);
std::vector<double> stored_tts(std::vector<double> tts);
/// The meaning of a time-to-solution (or repetitions) dataset in `units`.
DataMeaning tts_meaning(std::string units);
/// A dataset whose NaN entries mean "not applicable" for the reason `why`.
DataMeaning not_applicable(std::string units, std::string why);
/// Text tables and CSV: "inf", or the number with up to `digits` significant digits.
std::string tts_text(double tts, int digits = 6);
/// JSON: the key is left out when the value is infinite.
void put_tts(toml::table& json, std::string_view key, double tts);

}  // namespace gapwise
