#pragma once
// Schedule shapes built from a few numbers: a pause, a quench, a reverse anneal.
// Every generator returns an ordinary piecewise-linear AnnealPath, so shapes run
// on every propagator and can be written out as waypoints. Durations are in the
// time unit of the path they work on (fractions of the total, or ns).
//
//   AnnealPath ramp({{0, 0}, {1, 1}});
//   // Pause at s = 0.45 for 20 % of the run, same total duration (1):
//   AnnealPath p = forward_shape(ramp, {.pause = PauseSpec{0.45, 0.2}}, 1.0);
//   // Quench from s = 0.6 to 1 in 2 % of the run, after a pause there:
//   AnnealPath q = forward_shape(ramp, {.pause = PauseSpec{0.6, 0.1}, .quench = QuenchSpec{0.6, 0.02}}, 1.0);
//   // Reverse anneal, ns: down from 1 to 0.55 in 5 ns, dwell 10 ns, back up in 5 ns:
//   AnnealPath r = reverse_anneal_path({.turn_s = 0.55, .down = 5, .dwell = 10, .up = 5});
//
// Bad numbers throw InputError whose key names the field relative to the shape
// ("pause.s", "reverse.dwell", ...): callers that know the real place (a file line,
// a command-line option) catch it and re-raise with that place (see
// schedule_file.cpp and the shape commands), so the check lives in one place.
#include <optional>

#include "schedule/anneal_path.hpp"

namespace gapwise {

/// Hold s constant at `s` for `duration`.
struct PauseSpec {
  double s = 0.5;
  double duration = 0.0;  ///< >= 0; 0 means no pause
};

/// Leave the base path where it first reaches `s` and ramp straight to s = 1 in `duration` (> 0).
struct QuenchSpec {
  double s = 0.5;
  double duration = 0.0;
};

/// A forward shape: the base path (stretched to fit), with an optional pause and an optional quench.
struct ForwardShapeSpec {
  std::optional<PauseSpec> pause;
  std::optional<QuenchSpec> quench;
};

/// Reverse anneal: start at s = 1 (in a classical state), ramp down to turn_s in
/// `down`, dwell there for `dwell`, ramp back to s = 1 in `up`.
struct ReverseSpec {
  double turn_s = 0.5;
  double down = 0.0;   ///< > 0
  double dwell = 0.0;  ///< >= 0
  double up = 0.0;     ///< > 0
  double total() const { return down + dwell + up; }
};

/// Everything a schedule file can say about its shape besides waypoints.
struct PathShapeSpec {
  ForwardShapeSpec forward;
  std::optional<ReverseSpec> reverse;
  bool is_reverse() const { return reverse.has_value(); }
};

/// The base path with a pause inserted where it first reaches s (the later part
/// shifted by the pause); the result is longer by `duration`. Throws InputError
/// (key "pause.s") when the base never reaches s.
AnnealPath insert_pause(const AnnealPath& base, double s, double duration);

/// The part of the base path up to where it first reaches s, followed by a
/// straight ramp to s = 1 taking `duration`.
AnnealPath cut_and_quench(const AnnealPath& base, double s, double duration);

/// The forward shape with total duration exactly `total`: the base path (its s(t)
/// up to the quench point) is stretched to fill what the pause and the quench
/// leave, the pause is inserted, the quench appended. Throws InputError when
/// the pieces do not fit (pause + quench >= total), s values are outside [0, 1],
/// the pause sits after the quench point, or durations are negative.
AnnealPath forward_shape(const AnnealPath& base, const ForwardShapeSpec& spec, double total);

/// The reverse anneal path (times in the unit of the spec). Throws InputError for
/// turn_s outside [0, 1], down or up <= 0, dwell < 0.
AnnealPath reverse_anneal_path(const ReverseSpec& spec);

/// The path a shape spec describes, with total duration `total` (forward shapes on
/// the linear ramp s = t / total; reverse shapes ignore `total` and must match it
/// when the caller needs that).
AnnealPath path_from_shape(const PathShapeSpec& spec, double total);

}  // namespace gapwise
