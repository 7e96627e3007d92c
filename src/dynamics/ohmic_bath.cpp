#include "dynamics/ohmic_bath.hpp"

#include <cmath>
#include <numbers>

#include <fmt/format.h>

namespace gapwise {

double OhmicBath::rate(double omega) const {
  constexpr double two_pi = 2.0 * std::numbers::pi;
  const double theta = theta_ghz();
  const double w = std::abs(omega);
  if (w == 0.0) return two_pi * coupling * two_pi * theta;  // 2 pi eta / beta, 1/beta = 2 pi theta
  const double omega_c = two_pi * cutoff_ghz;
  const double x = theta > 0.0 ? w / (two_pi * theta) : INFINITY;  // beta |omega| = dE / theta
  // Downhill rate: 2 pi eta w e^{-w/wc} / (1 - e^{-x}); expm1 keeps it exact for
  // small x (the limit 2 pi eta / beta is approached without cancellation).
  const double down = two_pi * coupling * w * std::exp(-w / omega_c) / (-std::expm1(-x));
  return omega > 0.0 ? down : down * std::exp(-x);
}

std::string OhmicBath::summary() const {
  auto mark = [](bool d) { return d ? " (illustrative default)" : ""; };
  return fmt::format("{:g} mK{} (k_B T/h = {:.4f} GHz), coupling eta {:g}{}, cutoff {:g} GHz{}", temperature_mk,
                     mark(temperature_defaulted), theta_ghz(), coupling, mark(coupling_defaulted), cutoff_ghz,
                     mark(cutoff_defaulted));
}

}  // namespace gapwise
