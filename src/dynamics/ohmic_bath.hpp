#pragma once
// The thermal environment of an open-system anneal: every qubit couples
// through sigma^z to its own bath (independent, identical), each with the ohmic
// spectral density with exponential cutoff. Units as everywhere in gapwise:
// energies in GHz (E/h), angular frequencies omega = 2 pi dE in rad/ns, rates
// in 1/ns, temperature as theta = k_B T / h in GHz (20.8366 GHz per kelvin).
//
//   gamma(omega) = 2 pi eta omega exp(-|omega|/omega_c) / (1 - exp(-beta omega)),
//   gamma(0) = 2 pi eta / beta,   beta omega = dE / theta,   omega_c = 2 pi f_c.
//
//   OhmicBath bath{.temperature_mk = 12, .coupling = 1e-3, .cutoff_ghz = 8};
//   double down = bath.rate(2 * pi * 0.5);   // 1/ns, relaxation across 0.5 GHz
//   double up = bath.rate(-2 * pi * 0.5);    // = down * exp(-0.5 / theta)
#include <string>

namespace gapwise {

/// k_B / h in GHz per kelvin (CODATA 2018: k_B = 1.380649e-23 J/K and
/// h = 6.62607015e-34 J s are exact, so k_B/h = 2.0836619e10 Hz/K).
inline constexpr double kThetaGhzPerKelvin = 20.836619;

struct OhmicBath {
  // Illustrative defaults (not a device's values): 12 mK is within the 10-20 mK
  // range annealing hardware runs at; eta = 1e-3 and f_c = 8 GHz are of the
  // order used in open-system annealing studies, quoted from memory.
  static constexpr double kDefaultTemperatureMk = 12.0;
  static constexpr double kDefaultCoupling = 1e-3;
  static constexpr double kDefaultCutoffGhz = 8.0;

  double temperature_mk = kDefaultTemperatureMk;  ///< T in millikelvin, >= 0
  double coupling = kDefaultCoupling;             ///< eta, dimensionless, >= 0
  double cutoff_ghz = kDefaultCutoffGhz;          ///< f_c in GHz, > 0 (omega_c = 2 pi f_c)
  std::string description;
  std::string source;  ///< file it came from ("" when built in code)
  /// Which of the three values were not in the file (the defaults, illustrative).
  bool temperature_defaulted = false, coupling_defaulted = false, cutoff_defaulted = false;

  /// theta = k_B T / h in GHz.
  double theta_ghz() const { return temperature_mk * 1e-3 * kThetaGhzPerKelvin; }
  /// gamma(omega) in 1/ns for omega in rad/ns (positive: the system gives the
  /// energy to the bath). Negative omega via detailed balance,
  /// gamma(-|w|) = exp(-|w|/(2 pi theta)) gamma(|w|), so nothing overflows at low
  /// temperature; T = 0 gives gamma = 0 for omega <= 0.
  double rate(double omega) const;
  /// One line for terminal output: "12 mK (theta 0.2500 GHz), eta 0.001, cutoff 8 GHz".
  std::string summary() const;
};

}  // namespace gapwise
