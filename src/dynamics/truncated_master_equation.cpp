#include "dynamics/truncated_master_equation.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <numbers>
#include <stdexcept>

#include <fmt/format.h>
#ifdef _OPENMP
#include <omp.h>
#endif

#include "frame/instantaneous_frame.hpp"
#include "frame/oscillatory_quadrature.hpp"

namespace gapwise {
namespace {

constexpr double kTwoPi = 2.0 * std::numbers::pi;

LevelOptions tracker_options(int k) {
  LevelOptions lo;
  lo.levels = k;
  lo.vectors = true;
  lo.tolerance = 1e-11;
  return lo;
}

// rho <- U rho U^+ with U = exp(omega), omega anti-Hermitian (via the Hermitian i omega).
void apply_unitary_exp(const Eigen::MatrixXcd& omega, DensityMatrix& rho) {
  const Eigen::MatrixXcd herm = Complex(0, 1) * omega;
  Eigen::SelfAdjointEigenSolver<Eigen::MatrixXcd> es(0.5 * (herm + herm.adjoint()));
  const Eigen::VectorXd& w = es.eigenvalues();
  Eigen::VectorXcd ph(w.size());
  for (int k = 0; k < w.size(); ++k) ph(k) = Complex(std::cos(w(k)), -std::sin(w(k)));  // exp(-i w)
  const Eigen::MatrixXcd u = es.eigenvectors() * ph.asDiagonal() * es.eigenvectors().adjoint();
  rho = (u * rho * u.adjoint()).eval();
}

}  // namespace

TruncatedMasterEquation::TruncatedMasterEquation(const TransverseIsingHamiltonian& h, const OhmicBath& bath,
                                                 const TruncatedOptions& options)
    : h_(h),
      full_(h, SpinFlipSector::Full),
      bath_(bath),
      options_(options),
      k_(std::clamp(options.levels, 1, static_cast<int>(h.dim()))),
      tracker_(full_, unit_scales_, tracker_options(std::clamp(options.levels, 1, static_cast<int>(h.dim())))) {
  if (options.levels < 1) throw std::invalid_argument("the truncated master equation needs at least 1 level");
  tracker_.set_warm_distance(0.05);
}

void TruncatedMasterEquation::build_generator(Point& p) const {
  const int n = h_.qubits(), d = static_cast<int>(h_.dim());
  std::vector<Eigen::MatrixXd> s;
  if (bath_.coupling != 0.0) {
    s.resize(static_cast<std::size_t>(n));
    Eigen::MatrixXd zv(d, k_);
    for (int i = 0; i < n; ++i) {
      zv = p.vectors;
      for (int x = 0; x < d; ++x)
        if ((x >> i) & 1) zv.row(x) *= -1.0;
      s[static_cast<std::size_t>(i)].noalias() = p.vectors.transpose() * zv;
    }
  }
  p.generator = build_frozen_generator(p.energies, s, bath_, p.a, p.b);
}

TruncatedMasterEquation::Point TruncatedMasterEquation::solve(const AnnealDrive& drive, double t) {
  Point p;
  p.t = t;
  p.s = drive.s_at(t);
  p.a = drive.a_ghz(t);
  p.b = drive.b_ghz(t);
  const Levels& lv = tracker_.at(p.s, p.a, p.b);
  ++stats_.eigen_solves;
  p.energies = Eigen::Map<const Eigen::VectorXd>(lv.energies_ghz.data(), k_);
  p.vectors = lv.vectors.leftCols(k_);
  return p;
}

void TruncatedMasterEquation::start_point(const AnnealDrive& drive, double t0_ns) {
  here_ = solve(drive, t0_ns);
  // Inside an exactly degenerate eigenspace (e.g. the excited manifolds of the
  // transverse field alone at s = 0) any basis is an eigenbasis; take the one the
  // path continues into (closest to the eigenvectors a little later), so that the
  // frame does not turn by a finite angle over the first, tiny, interval.
  const std::size_t piece = drive.path.piece_at(t0_ns);
  const double v = drive.path.ds_dt_ns(piece);
  const double tol = kLevelTolerance * std::max(1.0, here_.energies(k_ - 1) - here_.energies(0));
  bool degenerate = false;
  for (int m = 1; m < k_; ++m) degenerate = degenerate || here_.energies(m) - here_.energies(m - 1) <= tol;
  if (degenerate && v != 0.0) {
    // The eigenvectors at s0 + 1e-7 (in s): within O(1e-7) of an eigenbasis at s0, and the one the path
    // continues into, also where the kept set cuts a degenerate eigenspace in two.
    const double probe_t = t0_ns + std::min(1e-7 / std::abs(v), 0.5 * (drive.path.points().back().t_ns - t0_ns));
    const double s0 = here_.s, a0 = here_.a, b0 = here_.b;
    here_ = solve(drive, probe_t);
    here_.t = t0_ns, here_.s = s0, here_.a = a0, here_.b = b0;
  }
  build_generator(here_);
}

void TruncatedMasterEquation::start(const AnnealDrive& drive, double t0_ns, const Eigen::VectorXcd& psi0) {
  start_point(drive, t0_ns);
  const Eigen::VectorXcd c = here_.vectors.transpose().cast<Complex>() * psi0;
  rho_ = c * c.adjoint();
  note_top();
}

void TruncatedMasterEquation::start(const AnnealDrive& drive, double t0_ns, const DensityMatrix& rho) {
  start_point(drive, t0_ns);
  const Eigen::MatrixXcd v = here_.vectors.cast<Complex>();
  rho_ = v.transpose() * rho * v;
  note_top();
}

void TruncatedMasterEquation::note_top() {
  stats_.top_level_population = std::max(stats_.top_level_population, rho_(k_ - 1, k_ - 1).real());
}

void TruncatedMasterEquation::advance(const AnnealDrive& drive, double t0, double t1) {
  const double span = t1 - t0;
  if (!(span > 0)) return;
  const std::size_t piece = drive.path.piece_at(0.5 * (t0 + t1));
  const double v = drive.path.ds_dt_ns(piece);
  if (v == 0.0) {  // constant H: one exact exponential
    here_.generator.evolve(rho_, span);
    here_.t = t1;
    note_top();
    ++stats_.grid_points;
    return;
  }
  const double s0 = drive.s_at(t0), s1 = drive.s_at(t1);
  const double total_ds = std::abs(s1 - s0);
  double t = t0;
  double dt = std::min(span, ds_guess_ > 0 ? ds_guess_ / std::abs(v) : std::min(span, options_.max_ds / std::abs(v)));
  const double level_tol = kLevelTolerance;
  while (t < t1) {
    const bool last = t + dt >= t1 - 1e-14 * std::max(1.0, std::abs(t1));
    const double step = last ? t1 - t : dt;
    Point next = solve(drive, t + step);
    // Match columns by largest overlap (labels may swap at crossings inside the kept set).
    const Eigen::MatrixXd o = here_.vectors.transpose() * next.vectors;  // old x new
    std::vector<int> assign(static_cast<std::size_t>(k_), -1);
    std::vector<char> used(static_cast<std::size_t>(k_), 0);
    {
      std::vector<std::pair<double, std::pair<int, int>>> cand;
      cand.reserve(static_cast<std::size_t>(k_ * k_));
      for (int m = 0; m < k_; ++m)
        for (int q = 0; q < k_; ++q) cand.push_back({-std::abs(o(m, q)), {m, q}});
      std::sort(cand.begin(), cand.end());
      for (const auto& [neg, mq] : cand) {
        if (assign[static_cast<std::size_t>(mq.first)] >= 0 || used[static_cast<std::size_t>(mq.second)]) continue;
        assign[static_cast<std::size_t>(mq.first)] = mq.second;
        used[static_cast<std::size_t>(mq.second)] = 1;
      }
    }
    // W: new vectors in old labels; align exactly degenerate eigenspaces (Procrustes), then signs.
    Eigen::MatrixXd w(next.vectors.rows(), k_);
    Eigen::VectorXd e_new(k_);
    for (int m = 0; m < k_; ++m) {
      w.col(m) = next.vectors.col(assign[static_cast<std::size_t>(m)]);
      e_new(m) = next.energies(assign[static_cast<std::size_t>(m)]);
    }
    const double tol = level_tol * std::max(1.0, next.energies(k_ - 1) - next.energies(0));
    for (int g0 = 0; g0 < k_;) {
      int g1 = g0 + 1;
      while (g1 < k_ && next.energies(g1) - next.energies(g0) <= tol) ++g1;
      if (g1 - g0 > 1) {
        std::vector<int> labels;
        for (int m = 0; m < k_; ++m)
          if (assign[static_cast<std::size_t>(m)] >= g0 && assign[static_cast<std::size_t>(m)] < g1) labels.push_back(m);
        const int gs = static_cast<int>(labels.size());
        Eigen::MatrixXd wg(w.rows(), gs), vg(w.rows(), gs);
        for (int q = 0; q < gs; ++q) wg.col(q) = w.col(labels[static_cast<std::size_t>(q)]),
                                     vg.col(q) = here_.vectors.col(labels[static_cast<std::size_t>(q)]);
        const Eigen::MatrixXd aligned = wg * closest_rotation(vg.transpose() * wg).transpose();
        for (int q = 0; q < gs; ++q) w.col(labels[static_cast<std::size_t>(q)]) = aligned.col(q);
      }
      g0 = g1;
    }
    for (int m = 0; m < k_; ++m)
      if (here_.vectors.col(m).dot(w.col(m)) < 0) w.col(m) *= -1.0;
    const Eigen::MatrixXd q = here_.vectors.transpose() * w;
    const Eigen::MatrixXd l = rotation_log(closest_rotation(q));
    const double turn = k_ > 1 ? l.topLeftCorner(k_ - 1, k_ - 1).norm() : 0.0;
    const double ds = std::abs(drive.s_at(t + step) - drive.s_at(t));
    // A crossing too narrow to resolve at min_ds is passed diabatically: over so short an interval the state
    // does not move and the exact change of coordinates (the frame turn with phases ~ 0) carries it.
    if ((turn > options_.max_rotation || ds > options_.max_ds * (1 + 1e-12)) && ds > options_.min_ds) {
      ++stats_.rejected;
      const double shrink = turn > options_.max_rotation ? std::clamp(0.9 * options_.max_rotation / turn, 0.1, 0.7) : 0.5;
      dt = step * shrink;
      continue;
    }
    if (turn > options_.max_rotation) ++stats_.unresolved_crossings;
    // 1. half step at the old point.
    here_.generator.evolve(rho_, 0.5 * step);
    // 2. frame turn in the interaction picture (Filon weights of the relative phases).
    Eigen::MatrixXcd omega = Eigen::MatrixXcd::Zero(k_, k_);
    for (int m = 0; m < k_; ++m)
      for (int n = 0; n < k_; ++n) {
        if (m == n || l(m, n) == 0.0) continue;
        const double w0 = here_.energies(m) - here_.energies(n), w1 = e_new(m) - e_new(n);
        PhasePolynomial dph{{0.0, kTwoPi * step * w0, kTwoPi * step * 0.5 * (w1 - w0), 0.0, 0.0}};
        const auto [c0, c1] = linear_oscillatory_weights(dph);
        const double mid = dph.at(0.5);
        omega(m, n) = -l(m, n) * (c0 + c1) * Complex(std::cos(mid), -std::sin(mid));
      }
    apply_unitary_exp(omega, rho_);
    // Old labels -> new (energy-ordered) labels; the new basis is W re-ordered.
    DensityMatrix permuted(k_, k_);
    for (int m = 0; m < k_; ++m)
      for (int n = 0; n < k_; ++n)
        permuted(assign[static_cast<std::size_t>(m)], assign[static_cast<std::size_t>(n)]) = rho_(m, n);
    rho_ = std::move(permuted);
    for (int m = 0; m < k_; ++m) next.vectors.col(assign[static_cast<std::size_t>(m)]) = w.col(m);
    build_generator(next);
    // 3. half step at the new point.
    next.generator.evolve(rho_, 0.5 * step);
    rho_ = 0.5 * (rho_ + rho_.adjoint()).eval();
    here_ = std::move(next);
    ++stats_.grid_points;
    note_top();
    t = last ? t1 : t + step;
    if (on_interval) on_interval(t);
    // Next step: aim at 70 % of the allowed turn.
    const double grow = turn > 0 ? std::clamp(0.7 * options_.max_rotation / turn, 0.5, 2.0) : 2.0;
    dt = step * grow;
    dt = std::min(dt, options_.max_ds / std::abs(v));
    if (!last) ds_guess_ = dt * std::abs(v);
  }
  (void)total_ds;
}

double TruncatedMasterEquation::probability_of(const std::vector<BasisIndex>& states) const {
  double p = 0;
  for (BasisIndex b : states) {
    const Eigen::RowVectorXd row = here_.vectors.row(static_cast<Eigen::Index>(b));
    p += (row.cast<Complex>() * rho_ * row.transpose().cast<Complex>())(0, 0).real();
  }
  return p;
}

std::vector<double> TruncatedMasterEquation::populations() const {
  const Eigen::MatrixXcd vr = here_.vectors.cast<Complex>() * rho_;  // 2^n x K
  std::vector<double> out(static_cast<std::size_t>(here_.vectors.rows()));
  for (Eigen::Index x = 0; x < here_.vectors.rows(); ++x)
    out[static_cast<std::size_t>(x)] = (vr.row(x) * here_.vectors.row(x).transpose().cast<Complex>())(0, 0).real();
  return out;
}

DensityMatrix TruncatedMasterEquation::full_density() const {
  const Eigen::MatrixXcd v = here_.vectors.cast<Complex>();
  return v * rho_ * v.transpose();
}

TruncatedStats TruncatedMasterEquation::stats() const {
  TruncatedStats s = stats_;
  s.levels = k_;
  s.lost_population = 1.0 - rho_.trace().real();
  Eigen::SelfAdjointEigenSolver<DensityMatrix> es(rho_, Eigen::EigenvaluesOnly);
  s.min_eigenvalue = es.eigenvalues()(0);
  return s;
}

namespace {
struct TruncatedRun {
  double p = 0;
  TruncatedStats stats;
  std::vector<double> populations;
};

TruncatedRun run_truncated(const TransverseIsingHamiltonian& h, const GroundManifold& ground, const EnergyScales& scales,
                           const AnnealPath& path, const QuantumState& psi0, const OhmicBath& bath, int k,
                           const OpenPropagatorOptions& options, int pass) {
  TruncatedOptions to;
  to.levels = k;
  to.max_rotation = options.max_rotation;
  to.max_ds = options.max_ds;
  TruncatedMasterEquation me(h, bath, to);
  AnnealDrive drive{&scales, path};
  const auto& pts = path.points();
  Eigen::Map<const Eigen::VectorXcd> psi(psi0.data(), static_cast<Eigen::Index>(h.dim()));
  me.start(drive, pts.front().t_ns, Eigen::VectorXcd(psi));
  const double duration = path.duration_ns();
  const double t_start = pts.front().t_ns;
  if (options.progress && duration > 0)
    me.on_interval = [&](double t) { options.progress({pass, std::clamp((t - t_start) / duration, 0.0, 1.0)}); };
  for (std::size_t j = 0; j + 1 < pts.size(); ++j) {
    me.advance(drive, pts[j].t_ns, pts[j + 1].t_ns);
    if (options.progress) options.progress({pass, duration > 0 ? pts[j + 1].t_ns / duration : 1.0});
  }
  TruncatedRun r;
  r.p = me.probability_of(ground.states);
  r.stats = me.stats();
  r.populations = me.populations();
  return r;
}
}  // namespace

int truncated_working_vectors(int levels) {
  const int k = std::max(levels, 1);
  return 10 * k + 2 * (2 * std::max(k, 7) + 2) + 16;
}

OpenAnnealResult simulate_truncated_open_anneal(const TransverseIsingHamiltonian& h, const GroundManifold& ground,
                                                const EnergyScales& scales, const AnnealPath& path,
                                                const QuantumState& psi0, const OhmicBath& bath,
                                                const OpenPropagatorOptions& options) {
  const auto start = std::chrono::steady_clock::now();
#ifdef _OPENMP
  // The H x products of the eigen-solves are at most 2^14 long here: measured faster on one thread than
  // with OpenMP's workers on the loaded 2-core machine (40 % of the time in thread wake-ups at 6 qubits).
  struct OneThread {
    int saved = omp_get_max_threads();
    OneThread() { omp_set_num_threads(1); }
    ~OneThread() { omp_set_num_threads(saved); }
  } one_thread;
#endif
  const int dim = static_cast<int>(std::min<std::size_t>(h.dim(), 1u << 20));
  OpenAnnealResult out;
  out.duration_ns = path.duration_ns();
  out.propagator = "ame-truncated";
  TruncatedRun kept, previous;
  int pass = 1;
  if (options.levels > 0) {
    const int k = std::min(options.levels, dim);
    kept = run_truncated(h, ground, scales, path, psi0, bath, k, options, pass++);
    if (!options.check_levels) {
      out.truncation_estimate = NAN;
      out.levels_fixed = true;
    } else if (k - 2 >= 2) {
      previous = run_truncated(h, ground, scales, path, psi0, bath, k - 2, options, pass++);
      out.truncation_estimate = std::abs(kept.p - previous.p);
    } else {
      out.truncation_estimate = NAN;
    }
  } else {
    const int cap = std::min(options.max_levels, dim);
    int k = std::min(options.start_levels, cap);
    previous = run_truncated(h, ground, scales, path, psi0, bath, k, options, pass++);
    out.truncation_estimate = NAN;
    kept = previous;
    while (k < cap) {
      const int next = std::min(k + options.level_step, cap);
      kept = run_truncated(h, ground, scales, path, psi0, bath, next, options, pass++);
      out.truncation_estimate = std::abs(kept.p - previous.p);
      k = next;
      if (out.truncation_estimate <= options.tolerance) break;
      previous = kept;
    }
    out.level_cap_hit = !(out.truncation_estimate <= options.tolerance);
  }
  out.levels = kept.stats.levels;
  out.ground_probability = kept.p;
  out.populations = std::move(kept.populations);
  out.top_level_population = kept.stats.top_level_population;
  out.lost_population = kept.stats.lost_population;
  out.trace_deviation = std::abs(kept.stats.lost_population);
  out.min_eigenvalue = kept.stats.min_eigenvalue;
  out.stats.steps = kept.stats.grid_points;
  out.stats.rejected_steps = kept.stats.rejected;
  out.stats.eigen_solves = kept.stats.eigen_solves;
  out.stats.error_estimate = out.truncation_estimate;
  out.stats.max_trace_deviation = out.trace_deviation;
  out.stats.min_eigenvalue = kept.stats.min_eigenvalue;
  out.wall_seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  return out;
}

}  // namespace gapwise
