#pragma once
// The gapwise bath file (TOML, format_version 1): the thermal environment of an
// open-system anneal (dynamics/ohmic_bath.hpp). Key by key in
// notebooks-free-docs/user-guide.md ("Bath files"). Example:
//
//   format = "gapwise-bath"
//   format_version = 1
//   description = "dilution refrigerator at 12 mK, weak ohmic coupling"
//   temperature_mk = 12.0   # T in millikelvin (k_B T/h = 0.25 GHz)
//   coupling = 1e-3         # eta, dimensionless system-bath coupling
//   cutoff_ghz = 8.0        # f_c in GHz; omega_c = 2 pi f_c
//
// A key left out takes its illustrative default (OhmicBath), and the run says so.
#include <string>
#include <string_view>

#include "dynamics/ohmic_bath.hpp"

namespace gapwise {

/// Refusal limits (beyond them the weak-coupling master equation or the file is wrong).
inline constexpr double kMaxBathTemperatureMk = 10000.0;  ///< 10 K
inline constexpr double kMaxBathCoupling = 1.0;
inline constexpr double kMaxBathCutoffGhz = 10000.0;

OhmicBath read_bath_file(const std::string& path);
OhmicBath parse_bath_text(std::string_view text, const std::string& name);
/// The same bath as a bath file.
std::string format_bath_toml(const OhmicBath& bath);

}  // namespace gapwise
