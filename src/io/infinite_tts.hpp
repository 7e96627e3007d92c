#pragma once
// How every result file and table holds an infinite time to solution (p = 0:
// no number of repetitions reaches the target). One place, so that a change of
// the convention (say, to IEEE infinity in HDF5) is one edit:
//   HDF5 datasets and attributes: -1 (kInfiniteTtsMarker), with the unit text
//                                 saying so (tts_unit("ns"));
//   text tables and CSV:          "inf";
//   JSON summaries:               the key is left out.
// Repetition counts (infinite for the same reason) use the same marker.
//
//   h5.write("/x/tts_ns", stored_tts(values), tts_unit("ns"));
//   table.add({..., tts_text(x.tts_ns, 6)});
//   put_tts(json, "tts_ns", x.tts_ns);
#include <string>
#include <string_view>
#include <vector>

#include "io/json_summary.hpp"

namespace gapwise {

inline constexpr double kInfiniteTtsMarker = -1.0;

/// The value a result file holds: kInfiniteTtsMarker for +infinity, else the value.
double stored_tts(double tts);
std::vector<double> stored_tts(std::vector<double> tts);
/// The inverse, for readers of result files.
double tts_from_stored(double stored);
/// The unit text of such a dataset, e.g. "ns (-1: infinite, p = 0)".
std::string tts_unit(std::string_view unit);
/// Text tables and CSV: "inf", or the number with up to `digits` significant digits.
std::string tts_text(double tts, int digits = 6);
/// JSON: the key is left out when the value is infinite.
void put_tts(toml::table& json, std::string_view key, double tts);

}  // namespace gapwise
