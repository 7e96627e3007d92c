#include "schedule/path_shapes.hpp"

#include <cmath>
#include <stdexcept>

#include <fmt/format.h>

#include "io/input_error.hpp"

namespace gapwise {
namespace {

[[noreturn]] void refuse(const std::string& key, const std::string& problem, const std::string& fix) {
  throw InputError({"", 0, 0, key}, problem, fix);
}

void check_fraction(double s, const std::string& key, const char* what) {
  if (!(s >= 0.0 && s <= 1.0))
    refuse(key, fmt::format("{} s = {} is outside [0, 1]", what, s), "give a schedule parameter s between 0 and 1");
}

/// First time the path reaches s (linear interpolation inside the piece), and
/// the index of the waypoint after which that time falls.
struct Reach {
  double t = 0;
  std::size_t piece = 0;
  bool found = false;
};

Reach first_reach(const AnnealPath& base, double s) {
  const auto& p = base.points();
  for (std::size_t k = 0; k + 1 < p.size(); ++k) {
    const double s0 = p[k].s, s1 = p[k + 1].s;
    if (s0 == s) return {p[k].t_ns, k, true};
    if ((s0 < s && s <= s1) || (s1 <= s && s < s0)) {
      const double f = (s - s0) / (s1 - s0);
      return {p[k].t_ns + f * (p[k + 1].t_ns - p[k].t_ns), k, true};
    }
  }
  if (p.back().s == s) return {p.back().t_ns, p.size() - 1, true};
  return {};
}

/// The path through pts; times that fail to increase (durations so unequal that
/// a sum rounds back to one of its parts) are refused under `key`, not thrown
/// as a bare invalid_argument.
AnnealPath checked_path(std::vector<Waypoint> pts, const std::string& key) {
  for (std::size_t k = 1; k < pts.size(); ++k)
    if (!(pts[k].t_ns > pts[k - 1].t_ns))
      refuse(key,
             fmt::format("the shape's times do not increase ({} then {}): its durations differ by more than "
                         "double precision can add",
                         pts[k - 1].t_ns, pts[k].t_ns),
             "give durations within a factor of about 1e12 of each other");
  return AnnealPath(std::move(pts));
}

}  // namespace

AnnealPath insert_pause(const AnnealPath& base, double s, double duration) {
  check_fraction(s, "pause.s", "pause at");
  if (!(duration >= 0.0) || !std::isfinite(duration))
    refuse("pause.duration", fmt::format("pause duration {} is negative", duration), "give a duration >= 0");
  if (duration == 0.0) return base;
  const Reach r = first_reach(base, s);
  if (!r.found)
    refuse("pause.s",
           fmt::format("the path never reaches s = {} (it covers [{}, {}])", s, base.s_min(), base.s_max()),
           "put the pause at an s the path visits");
  const auto& p = base.points();
  std::vector<Waypoint> out;
  for (std::size_t k = 0; k <= r.piece && k < p.size(); ++k)
    if (p[k].t_ns < r.t) out.push_back(p[k]);
  out.push_back({r.t, s});
  out.push_back({r.t + duration, s});
  for (std::size_t k = r.piece + 1; k < p.size(); ++k)
    // Never merged with the point before: a time that rounds onto the pause's end
    // (a pause within a rounding step of the whole run) would overwrite the
    // pause's s and drop the pause; checked_path refuses it instead.
    if (p[k].t_ns > r.t) out.push_back({p[k].t_ns + duration, p[k].s});
  return checked_path(std::move(out), "pause.duration");
}

AnnealPath cut_and_quench(const AnnealPath& base, double s, double duration) {
  check_fraction(s, "quench.s", "quench from");
  if (!(s < 1.0)) refuse("quench.s", "a quench from s = 1 does nothing", "give the s where the fast ramp starts, below 1");
  if (!(duration > 0.0) || !std::isfinite(duration))
    refuse("quench.duration", fmt::format("quench duration {} is not positive", duration),
           "a quench is a short ramp, not a zero-length one: give a duration > 0");
  const Reach r = first_reach(base, s);
  if (!r.found)
    refuse("quench.s", fmt::format("the path never reaches s = {} (it covers [{}, {}])", s, base.s_min(), base.s_max()),
           "start the quench at an s the path visits");
  std::vector<Waypoint> out;
  for (std::size_t k = 0; k <= r.piece; ++k)
    if (base.points()[k].t_ns < r.t) out.push_back(base.points()[k]);
  out.push_back({r.t, s});
  out.push_back({r.t + duration, 1.0});
  return checked_path(std::move(out), "quench.duration");
}

AnnealPath forward_shape(const AnnealPath& base, const ForwardShapeSpec& spec, double total) {
  if (!(total > 0.0) || !std::isfinite(total))
    refuse("duration", fmt::format("total duration {} is not positive", total), "give a duration > 0");
  const double pause = spec.pause ? spec.pause->duration : 0.0;
  const double quench = spec.quench ? spec.quench->duration : 0.0;
  if (spec.pause) {
    check_fraction(spec.pause->s, "pause.s", "pause at");
    if (!(pause >= 0.0) || !std::isfinite(pause))
      refuse("pause.duration", fmt::format("pause duration {} is negative", pause), "give a duration >= 0");
  }
  if (spec.quench) {
    check_fraction(spec.quench->s, "quench.s", "quench from");
    if (!(quench > 0.0) || !std::isfinite(quench))
      refuse("quench.duration", fmt::format("quench duration {} is not positive", quench),
             "a quench is a short ramp, not a zero-length one: give a duration > 0");
    if (spec.pause && spec.pause->s > spec.quench->s)
      refuse("pause.s", fmt::format("the pause at s = {} comes after the quench starts (s = {})", spec.pause->s,
                                    spec.quench->s),
             "pause at or before the quench point");
  }
  const double ramp = total - pause - quench;
  if (!(ramp > 0.0))
    refuse(spec.pause && pause > 0 ? "pause.duration" : "quench.duration",
           fmt::format("pause ({}) and quench ({}) leave no time for the ramp in a total of {}", pause, quench, total),
           "shorten the pause or the quench, or lengthen the total duration");
  // Stretch the base (or its part up to the quench point) to the ramp time.
  AnnealPath slow = base;
  if (spec.quench) {
    const AnnealPath cut = cut_and_quench(base, spec.quench->s, 1.0);
    std::vector<Waypoint> head(cut.points().begin(), cut.points().end() - 1);
    if (head.size() < 2) refuse("quench.s", "the quench starts where the path starts", "give a quench point the path reaches later");
    slow = checked_path(std::move(head), "quench.s");
  }
  slow = slow.scaled_to(ramp);
  if (spec.pause) slow = insert_pause(slow, spec.pause->s, pause);
  std::vector<Waypoint> pts = slow.points();
  if (spec.quench) pts.push_back({pts.back().t_ns + quench, 1.0});
  pts.back().t_ns = total;  // exact total, whatever the sums round to
  return checked_path(std::move(pts), spec.pause && pause > 0 ? "pause.duration" : "quench.duration");
}

AnnealPath reverse_anneal_path(const ReverseSpec& r) {
  check_fraction(r.turn_s, "reverse.turn_s", "turn point");
  if (!(r.down > 0.0) || !std::isfinite(r.down))
    refuse("reverse.down", fmt::format("the ramp down takes {}: it must be > 0", r.down), "give a duration > 0");
  if (!(r.dwell >= 0.0) || !std::isfinite(r.dwell))
    refuse("reverse.dwell", fmt::format("dwell {} is negative", r.dwell), "give a dwell >= 0 (0: turn straight back)");
  if (!(r.up > 0.0) || !std::isfinite(r.up))
    refuse("reverse.up", fmt::format("the ramp up takes {}: it must be > 0", r.up), "give a duration > 0");
  std::vector<Waypoint> pts{{0.0, 1.0}, {r.down, r.turn_s}};
  if (r.dwell > 0.0) pts.push_back({r.down + r.dwell, r.turn_s});
  pts.push_back({r.total(), 1.0});
  return checked_path(std::move(pts), r.dwell > 0.0 ? "reverse.dwell" : "reverse.up");
}

AnnealPath path_from_shape(const PathShapeSpec& spec, double total) {
  if (spec.reverse) return reverse_anneal_path(*spec.reverse);
  try {
    return forward_shape(AnnealPath({{0.0, 0.0}, {1.0, 1.0}}), spec.forward, total);
  } catch (const std::invalid_argument& e) {  // stretching to a subnormal ramp time, and the like
    refuse(spec.forward.pause ? "pause.duration" : "quench.duration",
           fmt::format("the shape cannot be built in double precision ({})", e.what()),
           "give durations within a factor of about 1e12 of each other");
  }
}

}  // namespace gapwise
