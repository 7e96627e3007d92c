#include "schedule/local_adiabatic_path.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "io/input_error.hpp"

namespace gapwise {
namespace {

[[noreturn]] void refuse(const std::string& problem, const std::string& fix) {
  throw InputError({"", 0, 0, "gap profile"}, problem, fix);
}

/// Linear interpolation of y(x) at xq on increasing x (clamped at the ends).
double interpolate(const std::vector<double>& x, const std::vector<double>& y, double xq) {
  if (xq <= x.front()) return y.front();
  if (xq >= x.back()) return y.back();
  const auto it = std::upper_bound(x.begin(), x.end(), xq);
  const std::size_t k = static_cast<std::size_t>(it - x.begin());
  const double f = (xq - x[k - 1]) / (x[k] - x[k - 1]);
  return y[k - 1] + f * (y[k] - y[k - 1]);
}

}  // namespace

LocalAdiabaticPath local_adiabatic_path(const GapProfile& prof, const LocalAdiabaticOptions& opt) {
  const std::size_t n = prof.s.size();
  if (n < 2 || prof.gap_ghz.size() != n || prof.matrix_element_ghz.size() != n)
    refuse("the gap profile needs at least two points with a gap and a matrix element each",
           "sample the spectrum at more points along s");
  if (opt.waypoints < 2) refuse(fmt::format("{} waypoints requested", opt.waypoints), "ask for at least 2");
  if (!(opt.matrix_element_floor > 0.0 && opt.matrix_element_floor <= 1.0))
    refuse(fmt::format("matrix-element floor {} is outside (0, 1]", opt.matrix_element_floor), "use e.g. 0.01");
  double m_max = 0.0;
  for (std::size_t k = 0; k < n; ++k) {
    if (!std::isfinite(prof.s[k]) || !std::isfinite(prof.gap_ghz[k]) || !std::isfinite(prof.matrix_element_ghz[k]))
      refuse(fmt::format("non-finite value at profile point {}", k), "check the spectrum along s");
    if (k && !(prof.s[k] > prof.s[k - 1])) refuse("profile s values do not increase", "sort the samples by s");
    if (!(prof.gap_ghz[k] > 0.0))
      refuse(fmt::format("the gap is {} GHz at s = {}: a closed gap admits no adiabatic path", prof.gap_ghz[k], prof.s[k]),
             "check the gap definition (a degenerate final ground manifold needs E_g - E_0)");
    m_max = std::max(m_max, std::abs(prof.matrix_element_ghz[k]));
  }
  if (!(m_max > 0.0)) refuse("the matrix element is zero everywhere", "the ground level is not coupled: any path is adiabatic");

  // Time density w(s) = |M|/Delta^2 (ns per unit s) and its cumulative integral
  // tau(s) by the trapezoid rule on the samples (dense near the minimum).
  LocalAdiabaticPath out;
  std::vector<double> w(n), tau(n, 0.0);
  for (std::size_t k = 0; k < n; ++k) {
    const double m = std::max(std::abs(prof.matrix_element_ghz[k]), opt.matrix_element_floor * m_max);
    w[k] = m / (prof.gap_ghz[k] * prof.gap_ghz[k]);
  }
  for (std::size_t k = 1; k < n; ++k) tau[k] = tau[k - 1] + 0.5 * (w[k] + w[k - 1]) * (prof.s[k] - prof.s[k - 1]);
  out.integral_ns = tau.back();
  for (auto& x : tau) x /= out.integral_ns;
  tau.back() = 1.0;
  out.time_density.resize(n);
  for (std::size_t k = 0; k < n; ++k) out.time_density[k] = w[k] / out.integral_ns;
  out.s_first = prof.s.front();
  out.s_last = prof.s.back();

  // Waypoints: equal steps in time, plus a coarser uniform grid in s.
  std::vector<Waypoint> pts;
  const int nt = opt.waypoints, ns = std::max(2, opt.waypoints / 4);
  for (int k = 0; k <= nt; ++k) {
    const double t = static_cast<double>(k) / nt;
    pts.push_back({t, interpolate(tau, prof.s, t)});
  }
  for (int k = 0; k <= ns; ++k) {
    const double s = out.s_first + (out.s_last - out.s_first) * k / ns;
    pts.push_back({interpolate(prof.s, tau, s), s});
  }
  std::sort(pts.begin(), pts.end(), [](const Waypoint& a, const Waypoint& b) { return a.t_ns < b.t_ns; });
  std::vector<Waypoint> clean;
  for (const auto& p : pts) {
    if (!clean.empty() && p.t_ns - clean.back().t_ns < 1e-12) continue;
    clean.push_back({p.t_ns, std::clamp(p.s, 0.0, 1.0)});
  }
  clean.front() = {0.0, out.s_first};
  if (1.0 - clean.back().t_ns < 1e-12) clean.back() = {1.0, out.s_last};
  else clean.push_back({1.0, out.s_last});
  out.shape = AnnealPath(std::move(clean));
  return out;
}

}  // namespace gapwise
