#include "studies/thermal_channel.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdint>
#include <limits>
#include <numbers>
#include <stdexcept>

#include <boost/math/quadrature/gauss.hpp>
#include <boost/math/tools/roots.hpp>
#include <fmt/format.h>

#include "dynamics/anneal_drive.hpp"
#include "dynamics/anneal_simulation.hpp"
#include "dynamics/truncated_master_equation.hpp"
#include "studies/loss_diagnosis.hpp"

namespace gapwise {

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

/// The dense eigen-decomposition only (a bath without coupling builds no dissipator).
FrozenGenerator spectrum_at(const TransverseIsingHamiltonian& h, double a, double b) {
  OhmicBath none;
  none.coupling = 0.0;
  return build_frozen_generator(h, a, b, none);
}

ThermalLevels levels_of(const FrozenGenerator& g, const TransverseIsingHamiltonian& h, const OhmicBath& bath,
                        int ground_levels, int levels) {
  ThermalLevels out;
  const int d = g.dim(), n = h.qubits();
  for (int l = 0; l < std::min(levels, d); ++l) out.energies_ghz.push_back(g.energies(l));
  const int gl = ground_levels;
  if (gl >= d) {
    out.gap_ghz = kNaN;
    out.relaxation_rate_per_ns = 0;
    return out;
  }
  out.gap_ghz = g.energies(gl) - g.energies(0);
  // The first excited eigenspace: the levels within the master equation's level tolerance of E_g.
  const double tol = kLevelTolerance * std::max(1.0, g.energies(d - 1) - g.energies(0));
  int top = gl + 1;
  while (top < d && g.energies(top) - g.energies(gl) <= tol) ++top;
  double rate = 0;
  for (int b = gl; b < top; ++b)
    for (int a = 0; a < gl; ++a) {
      const double omega = 2 * std::numbers::pi * (g.energies(b) - g.energies(a));
      const double both = bath.rate(omega) + bath.rate(-omega);  // gamma(w)(1 + e^{-beta w})
      double m2 = 0;
      for (int i = 0; i < n; ++i) {
        double m = 0;
        for (int x = 0; x < d; ++x) m += g.vectors(x, a) * g.vectors(x, b) * (((x >> i) & 1) ? -1.0 : 1.0);
        m2 += m * m;
      }
      rate += m2 * both;
    }
  out.relaxation_rate_per_ns = rate / (top - gl);
  return out;
}

/// Populations of the lowest levels and of the ground group from rho (computational basis).
void read_populations(const DensityMatrix& rho, const FrozenGenerator& g, int ground_levels, int levels,
                      ThermalTrackPoint& pt) {
  const Eigen::MatrixXd re = rho.real();
  const int d = g.dim();
  pt.populations.clear();
  pt.group_population = 0;
  for (int l = 0; l < std::min(std::max(levels, ground_levels), d); ++l) {
    const double pop = g.vectors.col(l).dot(re * g.vectors.col(l));
    if (l < levels) pt.populations.push_back(pop);
    if (l < ground_levels) pt.group_population += pop;
  }
}

struct RateAlongPath {
  const TransverseIsingHamiltonian& h;
  const OhmicBath& bath;
  const AnnealDrive& drive;
  int ground_levels;
  double at(double t) const {
    return levels_of(spectrum_at(h, drive.a_ghz(t), drive.b_ghz(t)), h, bath, ground_levels, 0).relaxation_rate_per_ns;
  }
  double integral(double t0, double t1) const {
    if (!(t1 > t0)) return 0.0;
    return boost::math::quadrature::gauss<double, 4>::integrate([&](double t) { return at(t); }, t0, t1);
  }
};

void summarize(ThermalRun& run, const RateAlongPath& rate, const AnnealPath& path, double tolerance) {
  auto& tr = run.track;
  // N(t) from the end backwards.
  for (std::size_t k = tr.size(); k-- > 0;)
    tr[k].remaining_relaxations =
        k + 1 == tr.size() ? 0.0 : tr[k + 1].remaining_relaxations + rate.integral(tr[k].t_ns, tr[k + 1].t_ns);
  run.total_relaxations = tr.empty() ? 0.0 : tr.front().remaining_relaxations;
  for (std::size_t k = 0; k + 1 < tr.size(); ++k) {
    if (!(tr[k].remaining_relaxations >= 1.0 && tr[k + 1].remaining_relaxations < 1.0)) continue;
    // The last crossing of N = 1 (N never increases along t, so there is one).
    const double t_hi = tr[k + 1].t_ns, n_hi = tr[k + 1].remaining_relaxations;
    auto f = [&](double t) { return n_hi + rate.integral(t, t_hi) - 1.0; };
    std::uintmax_t iters = 100;
    const auto r = boost::math::tools::toms748_solve(
        f, tr[k].t_ns, t_hi, tr[k].remaining_relaxations - 1.0, n_hi - 1.0,
        boost::math::tools::eps_tolerance<double>(40), iters);
    run.freeze_t_ns = 0.5 * (r.first + r.second);
    run.freeze_s = path.s_at(*run.freeze_t_ns);
  }
  for (std::size_t k = 0; k < tr.size(); ++k) {
    if (tr[k].group_population < run.lowest_group_population)
      run.lowest_group_population = tr[k].group_population, run.lowest_at_s = tr[k].s;
    if (k == 0) continue;
    const double dp = tr[k].group_population - tr[k - 1].group_population;
    if (std::abs(dp) <= tolerance) continue;  // below the run's accuracy: not a movement
    if (-dp > run.fall) run.fall = -dp, run.fall_s_from = tr[k - 1].s, run.fall_s_to = tr[k].s;
    if (dp > run.rise) run.rise = dp, run.rise_s_from = tr[k - 1].s, run.rise_s_to = tr[k].s;
  }
}
}  // namespace

ThermalLevels thermal_levels(const TransverseIsingHamiltonian& h, double a_ghz, double b_ghz, const OhmicBath& bath,
                             int ground_levels, int levels) {
  return levels_of(spectrum_at(h, a_ghz, b_ghz), h, bath, ground_levels, levels);
}

ThermalChannel thermal_channel(const TransverseIsingHamiltonian& h, const GroundManifold& ground,
                               const Schedule& schedule, const std::vector<double>& durations_ns,
                               const OhmicBath& bath, const ThermalChannelOptions& o) {
  if (h.qubits() > kMaxThermalChannelQubits)
    throw std::invalid_argument(fmt::format("the thermal channel holds at most {} qubits (a dense eigen-decomposition "
                                            "of the 2^n x 2^n Hamiltonian at every observation point, populations "
                                            "from the full density matrix); this problem has {}",
                                            kMaxThermalChannelQubits, h.qubits()));
  if (o.points < 2) throw std::invalid_argument("the thermal channel needs at least 2 observation points");
  struct EigenThreads {  // as the master equation: single-threaded dense products (measured faster here)
    int saved = Eigen::nbThreads();
    EigenThreads() { Eigen::setNbThreads(1); }
    ~EigenThreads() { Eigen::setNbThreads(saved); }
  } one_thread;
  ThermalChannel tc;
  tc.theta_ghz = bath.theta_ghz();
  tc.ground_levels = static_cast<int>(ground.states.size());
  const int gl = tc.ground_levels;

  // Gap against theta on an even grid over the s the path covers.
  const AnnealPath unit = schedule.path_for(durations_ns.empty() ? 1.0 : durations_ns.front());
  double s_lo = 1, s_hi = 0;
  for (const auto& w : unit.points()) s_lo = std::min(s_lo, w.s), s_hi = std::max(s_hi, w.s);
  std::vector<double> s_grid;
  for (int k = 0; k < o.points; ++k) s_grid.push_back(s_lo + (s_hi - s_lo) * k / (o.points - 1));
  for (double s : o.extra_s)
    if (s > s_lo && s < s_hi) s_grid.push_back(s);
  std::sort(s_grid.begin(), s_grid.end());
  s_grid.erase(std::unique(s_grid.begin(), s_grid.end(),
                           [&](double a, double b) { return std::abs(a - b) <= 1e-12 * std::max(1.0, s_hi - s_lo); }),
               s_grid.end());
  auto gap_at = [&](double s) {
    return levels_of(spectrum_at(h, schedule.scales.a_ghz(s), schedule.scales.b_ghz(s)), h, bath, gl, 0).gap_ghz;
  };
  tc.min_gap_over_theta = INFINITY;
  for (double s : s_grid) {
    const ThermalLevels lv = levels_of(spectrum_at(h, schedule.scales.a_ghz(s), schedule.scales.b_ghz(s)), h, bath, gl, 0);
    tc.grid_s.push_back(s);
    tc.grid_gap_ghz.push_back(lv.gap_ghz);
    tc.grid_rate_per_ns.push_back(lv.relaxation_rate_per_ns);
    const double ratio = tc.theta_ghz > 0 ? lv.gap_ghz / tc.theta_ghz : INFINITY;
    if (ratio < tc.min_gap_over_theta) tc.min_gap_over_theta = ratio, tc.min_gap_s = s;
  }
  if (tc.theta_ghz > 0)
    for (std::size_t k = 0; k + 1 < s_grid.size(); ++k) {
      const double f0 = tc.grid_gap_ghz[k] - tc.theta_ghz, f1 = tc.grid_gap_ghz[k + 1] - tc.theta_ghz;
      if (!std::isfinite(f0) || !std::isfinite(f1)) continue;
      if (f0 == 0) {
        tc.theta_crossings_s.push_back(s_grid[k]);
        continue;
      }
      if (f0 * f1 >= 0) continue;
      std::uintmax_t iters = 100;
      const auto r = boost::math::tools::toms748_solve([&](double s) { return gap_at(s) - tc.theta_ghz; }, s_grid[k],
                                                       s_grid[k + 1], f0, f1,
                                                       boost::math::tools::eps_tolerance<double>(44), iters);
      tc.theta_crossings_s.push_back(0.5 * (r.first + r.second));
    }

  for (std::size_t di = 0; di < durations_ns.size(); ++di) {
    const double dur = durations_ns[di];
    ThermalRun run;
    run.duration_ns = dur;
    const AnnealPath path = with_waypoints_at(schedule.path_for(dur), s_grid);
    const AnnealDrive drive{&schedule.scales, path};
    const QuantumState psi0 = initial_state(h, schedule, path);
    const std::string method = resolve_open_method(o.method, h.qubits());
    OpenPropagatorOptions po;
    po.tolerance = o.tolerance;
    po.method = method;
    if (o.progress) po.progress = [&, di](const PropagationProgress& p) { o.progress(di, p); };
    const auto start = std::chrono::steady_clock::now();
    const auto& pts = path.points();
    auto observe = [&](const DensityMatrix& rho, const Waypoint& w) {
      const FrozenGenerator g = spectrum_at(h, drive.a_ghz(w.t_ns), drive.b_ghz(w.t_ns));
      ThermalTrackPoint pt;
      pt.t_ns = w.t_ns;
      pt.s = w.s;
      pt.levels = levels_of(g, h, bath, gl, o.levels);
      read_populations(rho, g, gl, o.levels, pt);
      run.track.push_back(std::move(pt));
    };
    Eigen::Map<const Eigen::VectorXcd> psi(psi0.data(), static_cast<Eigen::Index>(h.dim()));
    if (method == "ame-full") {
      auto prop = make_full_space_master_equation(h, bath, po);
      DensityMatrix rho = psi * psi.adjoint();
      OpenAnnealResult& r = run.open;
      r.duration_ns = dur;
      r.propagator = prop->name();
      r.stats.min_eigenvalue = 1.0;
      observe(rho, pts.front());
      for (std::size_t k = 0; k + 1 < pts.size(); ++k) {
        prop->advance(drive, pts[k].t_ns, pts[k + 1].t_ns, rho, r.stats);
        observe(rho, pts[k + 1]);
      }
      r.populations.resize(h.dim());
      for (std::size_t b = 0; b < h.dim(); ++b) r.populations[b] = rho(static_cast<Eigen::Index>(b), static_cast<Eigen::Index>(b)).real();
      for (BasisIndex b : ground.states) r.ground_probability += r.populations[b];
      r.trace_deviation = std::abs(rho.trace().real() - 1.0);
      Eigen::SelfAdjointEigenSolver<DensityMatrix> es(rho, Eigen::EigenvaluesOnly);
      r.min_eigenvalue = es.eigenvalues()(0);
      r.wall_seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    } else if (method == "ame-truncated") {
      // K by the error control of the plain run; the track re-runs that K piece by piece.
      run.open = simulate_open_anneal(h, ground, schedule.scales, path, psi0, bath, po);
      TruncatedMasterEquation me(h, bath, {.levels = run.open.levels, .max_rotation = po.max_rotation, .max_ds = po.max_ds});
      me.start(drive, pts.front().t_ns, Eigen::VectorXcd(psi));
      observe(me.full_density(), pts.front());
      for (std::size_t k = 0; k + 1 < pts.size(); ++k) {
        me.advance(drive, pts[k].t_ns, pts[k + 1].t_ns);
        observe(me.full_density(), pts[k + 1]);
      }
      run.track_note = fmt::format("track: ame-truncated re-run with K = {} (p there {:.8f})", run.open.levels,
                                   me.probability_of(ground.states));
    } else {
      throw std::invalid_argument(fmt::format("unknown open-system method '{}'", method));
    }
    summarize(run, RateAlongPath{h, bath, drive, gl}, path, o.tolerance);
    tc.runs.push_back(std::move(run));
  }
  return tc;
}

}  // namespace gapwise
