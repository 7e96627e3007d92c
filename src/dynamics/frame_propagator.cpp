#include "dynamics/frame_propagator.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>
#include <stdexcept>

#include <Eigen/Eigenvalues>

#include "dynamics/split_operator_propagator.hpp"
#include "frame/frame_point_cache.hpp"
#include "frame/instantaneous_frame.hpp"
#include "frame/oscillatory_quadrature.hpp"
#include "spectrum/lowest_levels.hpp"

namespace gapwise {

namespace {

constexpr double kRefineBudget = 4e5;  // grid points x dimension a refinement may reach
constexpr double kTwoPi = 2.0 * std::numbers::pi;
const Complex kI{0.0, 1.0};

/// c <- exp(-i dt H_frame) c for one interval, H_frame = 2 pi H_avg - i L / dt.
void frame_step(const Eigen::MatrixXd& h_avg, const Eigen::MatrixXd& l, double dt, Eigen::VectorXcd& c) {
  Eigen::MatrixXcd hf = (kTwoPi * h_avg).cast<Complex>();
  if (dt > 0) hf -= kI * l.cast<Complex>() / dt;
  Eigen::SelfAdjointEigenSolver<Eigen::MatrixXcd> es(hf);
  Eigen::VectorXcd y = es.eigenvectors().adjoint() * c;
  for (Eigen::Index i = 0; i < y.size(); ++i) y(i) *= std::polar(1.0, -dt * es.eigenvalues()(i));
  c = es.eigenvectors() * y;
}

/// Integrated dynamical phase of each level over one interval as a polynomial
/// in x in [0, 1]: phi_n(x) = 2 pi dt int_0^x E_n, E_n the cubic Hermite
/// interpolant of E and dE/ds (Hellmann-Feynman) at both ends (signed ds).
std::vector<PhasePolynomial> level_phases(const FramePoint& a, const FramePoint& b, int kk, double ds, double dt) {
  std::vector<PhasePolynomial> ph(static_cast<std::size_t>(kk));
  for (int n = 0; n < kk; ++n) {
    const double ea = a.h_out(n, n), eb = b.h_in(n, n);
    const double sa = a.dh_out(n) * ds, sb = b.dh_in(n) * ds;
    const double e2 = 3.0 * (eb - ea) - 2.0 * sa - sb, e3 = 2.0 * (ea - eb) + sa + sb;
    const double f = kTwoPi * dt;
    ph[static_cast<std::size_t>(n)].c = {0.0, f * ea, f * sa / 2.0, f * e2 / 3.0, f * e3 / 4.0};
  }
  return ph;
}

/// One interval in the interaction picture of the dynamical phases (Filon-type
/// modified Magnus step, Iserles, BIT 42, 561 (2002)). With c = exp(-i phi) b,
///   i db/dx = G~(x) b,  G~_mn = exp(i (phi_m - phi_n)) G_mn(x),
///   G(x) = 2 pi dt Hoff(x) - i L(x),
/// Hoff the off-diagonal part of V^T H V (inside near-degenerate groups only)
/// and L = V^T dV/dx the connection. G is taken linear in x: L(x) = l + (x - 1/2) delta
/// with l the interval's exact turn (log of the aligned overlap) and delta the
/// change of the pointwise connection <m|dH/ds|n>/(E_n - E_m) across it (0 inside
/// groups), Hoff linear between the ends. The first Magnus term
/// int_0^1 G~ is then exact up to the quadrature of the weights, whatever the
/// phases turn by: the step is set by how fast H(s) changes, not by the
/// energy scale times the duration. Second-order in ds.
void oscillatory_step(const FramePoint& a, const FramePoint& b, const Eigen::MatrixXd& l, int kk, double ds,
                      double dt, Eigen::VectorXcd& c) {
  const std::vector<PhasePolynomial> ph = level_phases(a, b, kk, ds, dt);
  Eigen::MatrixXcd w = Eigen::MatrixXcd::Zero(kk, kk);
  const double f = kTwoPi * dt;
  for (int m = 0; m < kk; ++m)
    for (int n = m + 1; n < kk; ++n) {
      const double ca = a.conn_out(m, n), cb = b.conn_in(m, n);
      const double delta = (std::isnan(ca) || std::isnan(cb)) ? 0.0 : ds * (cb - ca);
      const Complex p = -kI * (l(m, n) - 0.5 * delta) + f * a.h_out(m, n);
      const Complex q = -kI * (l(m, n) + 0.5 * delta) + f * b.h_in(m, n);
      if (p == Complex(0.0, 0.0) && q == Complex(0.0, 0.0)) continue;
      PhasePolynomial d;
      for (std::size_t i = 0; i < 5; ++i)
        d.c[i] = ph[static_cast<std::size_t>(m)].c[i] - ph[static_cast<std::size_t>(n)].c[i];
      const auto [w0, w1] = linear_oscillatory_weights(d);
      w(m, n) = p * w0 + q * w1;
      w(n, m) = std::conj(w(m, n));
    }
  // Second Magnus term, -1/2 int int_{x2 < x1} [G~(x1), G~(x2)], with G at its
  // mid-interval value and the phases linear over the interval. Where the
  // phases turn by many radians per interval this is the second-order
  // (adiabatic) energy shift |G|^2 / omega, which does not shrink with the
  // interval: without it the step is not convergent there.
  {
    Eigen::MatrixXcd g(kk, kk);
    for (int m = 0; m < kk; ++m)
      for (int n = 0; n < kk; ++n) g(m, n) = -kI * l(m, n) + f * 0.5 * (m == n ? 0.0 : a.h_out(m, n) + b.h_in(m, n));
    Eigen::VectorXd omega(kk);
    for (int n = 0; n < kk; ++n) omega(n) = ph[static_cast<std::size_t>(n)].at(1.0);
    // I(p, q) = int_0^1 dx1 int_0^x1 dx2 exp(i p x1 + i q x2)
    //         = (mu0(p + q) - mu0(p)) / (i q)  (mu_j: moments of exp(i p x)),
    // and for the pair of triangles of one triple (m, k, n) p + q = w_m - w_n:
    // tables of mu0, mu1, mu2 over the K^2 phase differences make each triple a
    // few operations.
    Eigen::MatrixXcd mu0(kk, kk), mu1(kk, kk), mu2(kk, kk);
    for (int m = 0; m < kk; ++m)
      for (int n = 0; n < kk; ++n) {
        const auto mu = oscillatory_moments(omega(m) - omega(n));
        mu0(m, n) = mu[0];
        mu1(m, n) = mu[1];
        mu2(m, n) = mu[2];
      }
    // I(w_a - w_b, w_b - w_c) for a triple a, b, c.
    auto triangle = [&](int ia, int ib, int ic) {
      const double q = omega(ib) - omega(ic);
      if (std::abs(q) < 1e-3) return mu1(ia, ib) + Complex(0.0, 0.5 * q) * mu2(ia, ib);
      return (mu0(ia, ic) - mu0(ia, ib)) / Complex(0.0, q);
    };
    Eigen::MatrixXcd c2 = Eigen::MatrixXcd::Zero(kk, kk);
    for (int m = 0; m < kk; ++m)
      for (int n = m; n < kk; ++n) {
        Complex sum(0.0, 0.0);
        for (int k = 0; k < kk; ++k) {
          const Complex gg = g(m, k) * g(k, n);
          if (gg == Complex(0.0, 0.0)) continue;
          // exp(i w_mk x1 + i w_kn x2) - exp(i w_kn x1 + i w_mk x2) over the
          // triangle: I(w_mk, w_kn) - I(w_kn, w_mk), the second written out.
          const double qs = omega(m) - omega(k);
          const Complex second = std::abs(qs) < 1e-3
                                     ? mu1(k, n) + Complex(0.0, 0.5 * qs) * mu2(k, n)
                                     : (mu0(m, n) - mu0(k, n)) / Complex(0.0, qs);
          sum += gg * (triangle(m, k, n) - second);
        }
        c2(m, n) = sum;
      }
    // Omega2 = -c2 / 2 is anti-Hermitian; as a Hermitian generator (exp(-i w)) it adds i Omega2.
    for (int m = 0; m < kk; ++m)
      for (int n = m; n < kk; ++n) {
        const Complex add = Complex(0.0, -0.5) * c2(m, n);
        if (m == n) {
          w(m, m) += add.real();
        } else {
          w(m, n) += add;
          w(n, m) = std::conj(w(m, n));
        }
      }
  }
  Eigen::SelfAdjointEigenSolver<Eigen::MatrixXcd> es(w);
  Eigen::VectorXcd y = es.eigenvectors().adjoint() * c;
  for (Eigen::Index i = 0; i < y.size(); ++i) y(i) *= std::polar(1.0, -es.eigenvalues()(i));
  c = es.eigenvectors() * y;
  for (int n = 0; n < kk; ++n) c(n) *= std::polar(1.0, -ph[static_cast<std::size_t>(n)].at(1.0));
}

struct FrameRun {
  Eigen::VectorXcd c;
  double top_population = 0.0;
};

/// The K x K evolution through the frame, with the first kk levels, on the grid
/// (coarse: every other point).
FrameRun run_frame(const InstantaneousFrame& fr, const Eigen::VectorXcd& c0, int kk, bool coarse,
                   double ns_per_unit_s, double pause_ns) {
  FrameRun r;
  r.c = c0.head(kk);
  auto watch = [&] { r.top_population = std::max(r.top_population, std::norm(r.c(kk - 1))); };
  watch();
  const auto& pts = fr.points();
  if (pts.size() == 1) {  // constant s: exact phases of the (projected) Hamiltonian
    frame_step(pts[0].h_out.topLeftCorner(kk, kk), Eigen::MatrixXd::Zero(kk, kk), pause_ns, r.c);
    return r;
  }
  std::size_t j = 0;
  const std::size_t last = pts.size() - 1;
  while (j < last) {
    const std::size_t stride = (coarse && j + 2 <= last) ? 2 : 1;
    const FramePoint& a = pts[j];
    const FramePoint& b = pts[j + stride];
    const double ds = b.s - a.s;
    const double dt = std::abs(ds) * ns_per_unit_s;
    Eigen::MatrixXd l;
    if (stride == 1)
      l = fr.intervals()[j].generator.topLeftCorner(kk, kk);
    else
      l = rotation_log(closest_rotation(b.overlap_two_back)).topLeftCorner(kk, kk);
    oscillatory_step(a, b, l, kk, ds, dt, r.c);
    r.c = b.rebase.topLeftCorner(kk, kk) * r.c;
    watch();
    j += stride;
  }
  return r;
}

}  // namespace

Eigen::VectorXcd propagate_through_frame(const InstantaneousFrame& frame, const Eigen::VectorXcd& c0,
                                         double ns_per_unit_s, bool every_other_point) {
  return run_frame(frame, c0, frame.levels(), every_other_point, ns_per_unit_s, 0.0).c;
}

namespace {

QuantumState to_state(const Eigen::MatrixXd& v_full, const Eigen::VectorXcd& c) {
  const Eigen::VectorXcd x = v_full.leftCols(c.size()).cast<Complex>() * c;
  return QuantumState(x.data(), x.data() + x.size());
}

double watched_probability(const QuantumState& psi, const std::vector<std::size_t>& w) {
  double p = 0.0;
  for (std::size_t b : w) p += std::norm(psi[b]);
  return p;
}

double total_variation(const QuantumState& x, const QuantumState& y) {
  double tv = 0.0;
  for (std::size_t b = 0; b < x.size(); ++b) tv += std::abs(std::norm(x[b]) - std::norm(y[b]));
  return 0.5 * tv;
}

}  // namespace

FramePropagator::FramePropagator(const TransverseIsingHamiltonian& h, PropagatorOptions options)
    : h_(&h), opt_(std::move(options)), cache_(opt_.frame_cache) {
  if (!cache_) cache_ = std::make_shared<FramePointCache>();
  full_ = std::make_unique<SectorHamiltonian>(h, SpinFlipSector::Full);
  if (!h.problem().has_fields() && h.qubits() >= 2) {
    even_ = std::make_unique<SectorHamiltonian>(h, SpinFlipSector::Even);
    odd_ = std::make_unique<SectorHamiltonian>(h, SpinFlipSector::Odd);
  }
}

const SectorHamiltonian& FramePropagator::sector_of(const QuantumState& psi) const {
  if (!even_) return *full_;
  // Weight of psi in the odd sector: || (psi - P psi) / 2 ||^2, P psi(b) = psi(~b).
  const std::size_t mask = psi.size() - 1;
  double odd = 0.0, even = 0.0;
  for (std::size_t b = 0; b < psi.size(); ++b) {
    odd += std::norm(0.5 * (psi[b] - psi[b ^ mask]));
    even += std::norm(0.5 * (psi[b] + psi[b ^ mask]));
  }
  const double tiny = 1e-3 * opt_.tolerance * opt_.tolerance;
  if (odd <= tiny) return *even_;
  if (even <= tiny) return *odd_;
  return *full_;
}

void FramePropagator::advance(const AnnealDrive& drive, double t0, double t1, QuantumState& psi,
                              PropagationStats& stats) {
  if (!(t1 > t0)) return;
  if (psi.size() != h_->dim()) throw std::invalid_argument("frame propagator: state size does not match the Hamiltonian");
  if (advance_in_frame(drive, t0, t1, psi, stats)) {
    ++stats.frame_pieces;
    return;
  }
  // The frame cannot hold this piece to the tolerance: full propagation here.
  ++stats.frame_fallback_pieces;
  AnnealDrive piece{drive.scales, AnnealPath({{0.0, drive.s_at(t0)}, {t1 - t0, drive.s_at(t1)}})};
  SplitOperatorPropagator split(*h_, opt_, SplitComposition::Suzuki4);
  split.advance(piece, 0.0, t1 - t0, psi, stats);
}

bool FramePropagator::advance_in_frame(const AnnealDrive& drive, double t0, double t1, QuantumState& psi,
                                       PropagationStats& stats) {
  const SectorHamiltonian& sec = sector_of(psi);
  const double s0 = drive.s_at(t0), s1 = drive.s_at(t1);
  const double tol = opt_.tolerance;
  const auto& w = opt_.watched_states;
  const int kmax = static_cast<int>(std::min<std::size_t>(kMaxLevels, sec.dim()));
  const int per_pair = sec.sector() == SpinFlipSector::Full ? 1 : 2;
  int k = std::min(kmax, std::max(4, static_cast<int>((w.size() + per_pair - 1) / per_pair) + 2));
  FrameOptions fo;
  // K must not cut a near-degenerate group at the start (near s = 0 the first
  // excited level of the transverse term is n-fold degenerate): a cut group's
  // kept part is an arbitrary pick inside it, and its couplings are noise.
  fo.cache = cache_.get();
  fo.first_ds = next_ds_;
  // The levels at s0 for that check: solved once with vectors (kmax + 1 of
  // them) and stored, so that the frames starting there take them too.
  auto whole_groups = [&](int want) {
    const int levels = std::min(kmax + 1, static_cast<int>(sec.dim()));
    // A stored point at s0 with fewer levels (the end of the previous piece)
    // answers when a gap shows up among its levels.
    if (const auto few = cache_->find(sec, *drive.scales, s0, std::min(want, kmax) + 1)) {
      const std::vector<double>& e = few->energies_ghz;
      int kk = std::min(want, kmax);
      while (kk < static_cast<int>(e.size()) &&
             e[static_cast<std::size_t>(kk)] - e[static_cast<std::size_t>(kk - 1)] < fo.group_gap_ghz)
        ++kk;
      if (kk < static_cast<int>(e.size())) {
        cache_->count_reuse();
        ++stats.frame_reused_points;
        return kk;
      }
    }
    std::shared_ptr<const SolvedPoint> at = cache_->find(sec, *drive.scales, s0, levels);
    if (at) {
      cache_->count_reuse();
      ++stats.frame_reused_points;
    } else {
      LevelOptions lo;
      lo.levels = levels;
      lo.vectors = true;
      Levels lv = lowest_levels(sec, drive.scales->a_ghz(s0), drive.scales->b_ghz(s0), lo);
      ++stats.frame_eigen_solves;
      stats.hamiltonian_applications += lv.operator_applications;
      auto sp = std::make_shared<SolvedPoint>();
      sp->s = s0;
      sp->energies_ghz = lv.energies_ghz;
      sp->vectors = std::move(lv.vectors);
      for (Eigen::Index c = 0; c < sp->vectors.cols(); ++c) sp->vectors.col(c).normalize();
      sp->h_applications = lv.operator_applications;
      cache_->store(sec, *drive.scales, *sp);
      at = sp;
    }
    const std::vector<double>& e = at->energies_ghz;
    int kk = std::min(want, kmax);
    while (kk < static_cast<int>(e.size()) &&
           e[static_cast<std::size_t>(kk)] - e[static_cast<std::size_t>(kk - 1)] < fo.group_gap_ghz)
      ++kk;
    return kk;
  };
  k = whole_groups(k);
  if (k > kmax) return false;
  // The frame's grid holds the turn of the levels that carry the state to
  // max_rotation and the block among the levels above them to 4 x that
  // (FrameOptions::strict_levels): the watched levels plus one, raised below
  // when the start state reaches higher.
  const int watched_levels = static_cast<int>((w.size() + per_pair - 1) / per_pair);
  fo.strict_levels = std::max(2, watched_levels + 1);
  int refinements = 0;
  const bool pause = s0 == s1;
  fo.ns_per_unit_s = pause ? 0.0 : (t1 - t0) / std::abs(s1 - s0);
  const Eigen::Map<const Eigen::VectorXcd> x(psi.data(), static_cast<Eigen::Index>(psi.size()));
  for (int attempt = 0; attempt < 10; ++attempt) {
    fo.levels = k;
    std::unique_ptr<InstantaneousFrame> fr;
    try {
      fr = std::make_unique<InstantaneousFrame>(sec, *drive.scales, s0, s1, fo);
    } catch (const std::runtime_error&) {
      return false;  // the grid cannot follow the levels (crossing, cut group): full propagation
    }
    stats.frame_eigen_solves += fr->eigen_solves();
    stats.frame_warm_solves += fr->warm_solves();
    stats.frame_reused_points += fr->reused_points();
    stats.hamiltonian_applications += fr->h_applications();
    const int kk = fr->levels();
    const Eigen::VectorXcd c0 = fr->first_vectors_full().cast<Complex>().adjoint() * x;
    const double outside = std::max(0.0, 1.0 - c0.squaredNorm());
    if (outside > tol / 10) {  // the start is not (yet) in the kept span
      if (k >= kmax) return false;
      k = std::min(kmax, 2 * k);
      continue;
    }
    {  // every level the start state occupies, and the one above, on the strict bound
      int top = 0;
      for (int n = 0; n < kk; ++n)
        if (std::norm(c0(n)) > tol / 100) top = n;
      if (top + 2 > fo.strict_levels && fo.strict_levels < kk) {
        fo.strict_levels = top + 2;
        continue;  // the stored eigenpairs make the rebuild cheaper
      }
    }
    const double pause_ns = t1 - t0;
    const FrameRun fine = run_frame(*fr, c0, kk, false, fo.ns_per_unit_s, pause_ns);
    const QuantumState psi_fine = to_state(fr->last_vectors_full(), fine.c);
    double err_grid_p = 0, err_k_p = 0, tv_grid = 0, tv_k = 0;
    if (!pause && fr->points().size() > 2) {
      const QuantumState psi_coarse =
          to_state(fr->last_vectors_full(), run_frame(*fr, c0, kk, true, fo.ns_per_unit_s, pause_ns).c);
      err_grid_p = std::abs(watched_probability(psi_fine, w) - watched_probability(psi_coarse, w));
      tv_grid = total_variation(psi_fine, psi_coarse);
    }
    if (kk < static_cast<int>(sec.dim())) {  // with every level kept there is no truncation
      const int ks = kk - std::max(1, kk / 4);
      const QuantumState psi_small =
          to_state(fr->last_vectors_full(), run_frame(*fr, c0, ks, false, fo.ns_per_unit_s, pause_ns).c);
      err_k_p = std::abs(watched_probability(psi_fine, w) - watched_probability(psi_small, w));
      tv_k = total_variation(psi_fine, psi_small);
    }
    const double err_tv = tv_grid + tv_k + outside;
    const double err_p = w.empty() ? err_tv : err_grid_p + err_k_p + outside;
    const bool ok = err_p <= tol / 2 && (w.empty() || err_tv <= opt_.others_factor * tol / 2);
    if (ok) {
      psi = psi_fine;
      if (!pause) next_ds_ = fr->next_ds();
      stats.steps += static_cast<long>(fr->intervals().size());
      stats.frame_grid_points += static_cast<long>(fr->points().size());
      stats.frame_levels = std::max(stats.frame_levels, kk);
      stats.frame_top_level_population = std::max(stats.frame_top_level_population, fine.top_population);
      stats.frame_truncation_estimate += err_k_p;
      stats.error_estimate += err_p;
      return true;
    }
    const bool k_limited = err_k_p + outside >= err_grid_p || tv_k >= tv_grid;
    if (k_limited) {
      if (k >= kmax) return false;
      k = whole_groups(2 * k);
      if (k > kmax) return false;
    } else {
      // The grid error falls at least as the square of the turn per interval
      // where the phases are slow (and only linearly where they oscillate fast,
      // see the method notes). Refine while the predicted grid stays within a
      // budget of (points x dimension); beyond it full propagation is cheaper.
      const double shrink = std::max(0.05, std::sqrt((tol / 4) / err_p));
      const double predicted = static_cast<double>(fr->points().size()) / shrink * static_cast<double>(sec.dim());
      if (predicted > kRefineBudget || ++refinements > 4) return false;
      fo.max_rotation *= shrink;
      fo.max_phase_error *= shrink * shrink;
    }
  }
  return false;
}

}  // namespace gapwise
