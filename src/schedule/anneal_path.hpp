#pragma once
// The path s(t): piecewise linear through waypoints (t in ns, s in [0, 1]).
// Each linear piece is integrated as its own interval so a kink is never
// stepped over. Pauses are pieces with constant s; a reverse anneal starts at
// s = 1, goes down to a turn point and comes back.
//
//   AnnealPath p({{0, 0}, {40, 0.45}, {60, 0.45}, {100, 1}});   // pause at s = 0.45
//   double s = p.s_at(50.0);            // 0.45
//   double v = p.ds_dt_ns(0);           // slope of piece 0, 1/ns
#include <cstddef>
#include <vector>

namespace gapwise {

struct Waypoint {
  double t_ns = 0.0;
  double s = 0.0;
};

class AnnealPath {
 public:
  AnnealPath() = default;
  /// Times strictly increasing from 0, s in [0, 1] (std::invalid_argument otherwise).
  explicit AnnealPath(std::vector<Waypoint> points);

  const std::vector<Waypoint>& points() const { return points_; }
  std::size_t pieces() const { return points_.empty() ? 0 : points_.size() - 1; }
  double duration_ns() const { return points_.empty() ? 0.0 : points_.back().t_ns; }
  double s_at(double t_ns) const;
  /// Index of the piece containing t (the last piece for t at the end).
  std::size_t piece_at(double t_ns) const;
  double ds_dt_ns(std::size_t piece) const;
  /// The same shape stretched to a new total duration (> 0, finite: std::invalid_argument
  /// otherwise). A duration too short to keep the waypoints apart in double precision
  /// throws InputError (key "duration_ns", no file: callers add theirs).
  AnnealPath scaled_to(double duration_ns) const;
  double s_min() const;
  double s_max() const;

 private:
  std::vector<Waypoint> points_;
};

}  // namespace gapwise
