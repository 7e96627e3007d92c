#pragma once
// The units a gapwise result file may put in a dataset's `units` attribute: a
// small whitelist grammar, a subset of the UDUNITS-2 syntax that the CF
// metadata conventions use (so udunits, pint or astropy parse it too):
//
//   units  := "1" | factor ( ("." | "/") factor )*
//   factor := symbol ( "^" "-"? digit+ )?
//   symbol := "ns" | "us" | "ms" | "s" | "GHz" | "MHz" | "kHz" | "Hz" | "K" | "mK"
//
// "1" is dimensionless (probabilities, s, counts, indices, problem energies in
// the problem's own units). Energies are in GHz (physics-conventions.md: h = 1).
//
//   parseable_units("GHz/ns");   // true
//   parseable_units("ns (-1: infinite)");   // false: prose belongs in `legend`
#include <string_view>

namespace gapwise {

bool parseable_units(std::string_view units);

}  // namespace gapwise
