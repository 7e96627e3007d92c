#include "schedule/anneal_path.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include <fmt/format.h>

#include "io/input_error.hpp"

namespace gapwise {

AnnealPath::AnnealPath(std::vector<Waypoint> points) : points_(std::move(points)) {
  if (points_.size() < 2) throw std::invalid_argument("a path needs at least two waypoints");
  if (points_.front().t_ns != 0.0) throw std::invalid_argument("a path starts at t = 0");
  for (std::size_t k = 0; k < points_.size(); ++k) {
    if (!(points_[k].s >= 0.0 && points_[k].s <= 1.0)) throw std::invalid_argument("s must lie in [0, 1]");
    if (k > 0 && !(points_[k].t_ns > points_[k - 1].t_ns)) throw std::invalid_argument("times must increase");
  }
}

std::size_t AnnealPath::piece_at(double t) const {
  auto it = std::upper_bound(points_.begin(), points_.end(), t,
                             [](double x, const Waypoint& w) { return x < w.t_ns; });
  std::size_t k = static_cast<std::size_t>(std::distance(points_.begin(), it));
  return std::clamp<std::size_t>(k, 1, points_.size() - 1) - 1;
}

double AnnealPath::s_at(double t) const {
  const std::size_t k = piece_at(t);
  const Waypoint &a = points_[k], &b = points_[k + 1];
  const double f = std::clamp((t - a.t_ns) / (b.t_ns - a.t_ns), 0.0, 1.0);
  return a.s + f * (b.s - a.s);
}

double AnnealPath::ds_dt_ns(std::size_t k) const {
  return (points_[k + 1].s - points_[k].s) / (points_[k + 1].t_ns - points_[k].t_ns);
}

AnnealPath AnnealPath::scaled_to(double new_duration_ns) const {
  if (!(new_duration_ns > 0.0) || !std::isfinite(new_duration_ns)) throw std::invalid_argument("duration must be > 0");
  std::vector<Waypoint> p = points_;
  const double old = duration_ns();
  const double f = new_duration_ns / old;
  // From a subnormal duration the factor overflows (0 x inf is NaN): scale by
  // the fraction of the run instead.
  for (auto& w : p) w.t_ns = std::isfinite(f) ? w.t_ns * f : w.t_ns / old * new_duration_ns;
  p.back().t_ns = new_duration_ns;  // exact end time, no round-off
  for (std::size_t k = 1; k < p.size(); ++k)
    if (!(p[k].t_ns > p[k - 1].t_ns))
      throw InputError({"", 0, 0, "duration_ns"},
                       fmt::format("a duration of {} ns cannot hold the path's {} waypoints apart in double precision",
                                   new_duration_ns, p.size()),
                       "give a longer duration: any run shorter than about 1e-12 ns already gives the sudden limit "
                       "(the start state, unchanged)");
  return AnnealPath(std::move(p));
}

double AnnealPath::s_min() const {
  double m = 1.0;
  for (const auto& w : points_) m = std::min(m, w.s);
  return m;
}
double AnnealPath::s_max() const {
  double m = 0.0;
  for (const auto& w : points_) m = std::max(m, w.s);
  return m;
}

}  // namespace gapwise
