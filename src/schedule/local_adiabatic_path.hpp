#pragma once
// A path that slows down where the gap is small: the local adiabatic condition
// of Roland & Cerf (Phys. Rev. A 65, 042308 (2002)) applied at every s,
//
//   ds/dt = eps * Delta(s)^2 / |<g|dH/ds|0>|                (GHz^2 / GHz = 1/ns)
//
// so the run time for a given eps is T = I / eps with I = int_0^1 |M|/Delta^2 ds
// (ns). Delta is the gap that governs success and M the matrix element of dH/ds
// between the ground level and that level (src/spectrum/gap_search.hpp gives
// both along s). For a given total duration T, eps = I / T: the path spends its
// time in proportion to |M|/Delta^2.
//
// Where M vanishes the condition allows an infinitely fast passage; to keep the
// path finite (and safe where the sampled M is only small, not zero), M is
// floored at `matrix_element_floor` times its largest value along s.
//
// The result is an ordinary waypoint path in fractions of the duration, ready to
// be written into a schedule file and edited: waypoints equally spaced in time
// (so each piece carries the same share of the run) plus a uniform grid in s
// (so fast stretches still follow s(t) closely).
//
//   GapProfile prof{s, gap_ghz, m_ghz};                 // sorted by s, from 0 to 1
//   LocalAdiabaticPath g = local_adiabatic_path(prof, {.waypoints = 200});
//   g.shape;                          // AnnealPath, t in [0, 1]
//   double eps = g.integral_ns / 100; // the eps of a 100 ns run
#include <vector>

#include "schedule/anneal_path.hpp"

namespace gapwise {

/// Gap and matrix element sampled along s (strictly increasing s).
struct GapProfile {
  std::vector<double> s;
  std::vector<double> gap_ghz;
  std::vector<double> matrix_element_ghz;
};

struct LocalAdiabaticOptions {
  int waypoints = 200;                ///< waypoints equally spaced in time (plus waypoints/4 in s)
  double matrix_element_floor = 0.01; ///< fraction of max |M| below which M is raised
};

struct LocalAdiabaticPath {
  AnnealPath shape;              ///< times are fractions of the duration
  double integral_ns = 0;        ///< I = int |M|/Delta^2 ds over the profile, with the floor (ns)
  double s_first = 0, s_last = 1;
  /// time fraction spent per unit s at each profile point, (|M|/Delta^2)/I
  std::vector<double> time_density;
};

/// Throws InputError (key "gap profile") for fewer than 2 samples, s not
/// increasing, a gap <= 0 or non-finite values.
LocalAdiabaticPath local_adiabatic_path(const GapProfile& profile, const LocalAdiabaticOptions& options = {});

}  // namespace gapwise
