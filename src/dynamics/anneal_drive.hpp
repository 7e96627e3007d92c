#pragma once
// The time-dependent coefficients of H(t) for one run: a(t) = A(s(t)) and
// b(t) = B(s(t)) in GHz, with the path's pieces as the smooth intervals. The
// physics side of a propagation; it does not know which propagator runs it.
#include "schedule/anneal_path.hpp"
#include "schedule/energy_scales.hpp"

namespace gapwise {

struct AnnealDrive {
  const EnergyScales* scales = nullptr;
  AnnealPath path;

  double s_at(double t_ns) const { return path.s_at(t_ns); }
  double a_ghz(double t_ns) const { return scales->a_ghz(path.s_at(t_ns)); }
  double b_ghz(double t_ns) const { return scales->b_ghz(path.s_at(t_ns)); }
};

}  // namespace gapwise
