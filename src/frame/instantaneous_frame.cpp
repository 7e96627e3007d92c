#include "frame/instantaneous_frame.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <tuple>
#include <numbers>
#include <stdexcept>
#include <utility>

#include <fmt/format.h>
#include <unsupported/Eigen/MatrixFunctions>
#ifdef _OPENMP
#include <omp.h>
#endif

#include "frame/frame_point_cache.hpp"
#include "spectrum/lowest_levels.hpp"

namespace gapwise {

Eigen::MatrixXd closest_rotation(const Eigen::MatrixXd& m) {
  Eigen::JacobiSVD<Eigen::MatrixXd> svd(m, Eigen::ComputeFullU | Eigen::ComputeFullV);
  return svd.matrixU() * svd.matrixV().transpose();
}

Eigen::MatrixXd rotation_log(const Eigen::MatrixXd& q) {
  Eigen::MatrixXd l = q.log();
  return 0.5 * (l - l.transpose());  // antisymmetric up to rounding; drop the rounding
}

namespace {

struct Group {
  int first, last;  // levels [first, last]
};

/// Consecutive levels closer than `gap` form a group (the order is that of the
/// frame's columns, energy order unless levels crossed).
std::vector<Group> groups_of(const std::vector<double>& e, int k, double gap) {
  std::vector<Group> g;
  for (int i = 0; i < k; ++i) {
    if (!g.empty() && std::abs(e[static_cast<std::size_t>(i)] - e[static_cast<std::size_t>(i - 1)]) < gap)
      g.back().last = i;
    else
      g.push_back({i, i});
  }
  return g;
}

/// Union of two partitions of 0..k-1 into index ranges: ranges that overlap merge.
std::vector<Group> linked(const std::vector<Group>& a, const std::vector<Group>& b, int k) {
  std::vector<int> end(static_cast<std::size_t>(k));
  for (int i = 0; i < k; ++i) end[static_cast<std::size_t>(i)] = i;
  for (const auto* part : {&a, &b})
    for (const Group& g : *part) end[static_cast<std::size_t>(g.first)] = std::max(end[static_cast<std::size_t>(g.first)], g.last);
  std::vector<Group> out;
  int i = 0;
  while (i < k) {
    int last = end[static_cast<std::size_t>(i)];
    for (int j = i; j <= last; ++j) last = std::max(last, end[static_cast<std::size_t>(j)]);
    out.push_back({i, last});
    i = last + 1;
  }
  return out;
}

/// Rotation R of the block of `v` (columns of g) that best matches `prev`
/// (orthogonal Procrustes): v_G R closest to prev_G. Returns R (identity-sized block).
Eigen::MatrixXd procrustes(const Eigen::MatrixXd& prev, const Eigen::MatrixXd& v, const Group& g) {
  const int w = g.last - g.first + 1;
  const Eigen::MatrixXd o = v.middleCols(g.first, w).transpose() * prev.middleCols(g.first, w);
  return closest_rotation(o);  // maximizes trace(R^T o) -> v_G R ~ prev_G
}

constexpr int kWarmGuard = 4;

/// The lowest `want` eigenpairs of H(a, b) by block Krylov Rayleigh-Ritz
/// started from the previous point's Ritz vectors x0 (dim x p): a few rounds of
/// Rayleigh-Ritz on span[X, HX, H^2 X, H^3 X] (block Lanczos without the
/// three-term recurrence; Saad, Numerical Methods for Large Eigenvalue
/// Problems, 2nd ed., SIAM 2011, ch. 5-6, from memory). Starting from a block
/// that already holds every level of a degenerate eigenspace, it cannot miss
/// a partner the way single-vector Lanczos can. Returns false when the wanted
/// residuals are not below tol x max(1, |E|) GHz after the rounds (the caller
/// then solves from scratch). On success x holds the new Ritz vectors (p).
bool warm_start_levels(const SectorHamiltonian& h, double a, double b, const Eigen::MatrixXd& x0, int want, double tol,
                       std::vector<double>& energies, Eigen::MatrixXd& x, long& applications) {
  const Eigen::Index dim = x0.rows(), p = x0.cols();
  constexpr int kDepth = 4, kRounds = 6;
  if (kDepth * p > dim) return false;
  x = x0;
  Eigen::MatrixXd krylov(dim, kDepth * p), hq(dim, kDepth * p);
  for (int round = 0; round < kRounds; ++round) {
    krylov.leftCols(p) = x;
    for (int d = 1; d < kDepth; ++d)
      for (Eigen::Index c = 0; c < p; ++c)
        h.apply(a, b, krylov.col((d - 1) * p + c).data(), krylov.col(d * p + c).data());
    applications += (kDepth - 1) * p + kDepth * p;
    // Orthonormal basis of the block (Householder QR: orthonormal even when
    // columns are nearly dependent, as they become near convergence).
    Eigen::HouseholderQR<Eigen::MatrixXd> qr(krylov);
    const Eigen::MatrixXd q = qr.householderQ() * Eigen::MatrixXd::Identity(dim, kDepth * p);
    for (Eigen::Index c = 0; c < q.cols(); ++c) h.apply(a, b, q.col(c).data(), hq.col(c).data());
    Eigen::MatrixXd t = q.transpose() * hq;
    t = 0.5 * (t + t.transpose()).eval();
    Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> es(t);
    x = q * es.eigenvectors().leftCols(p);
    const Eigen::MatrixXd hx = hq * es.eigenvectors().leftCols(p);
    bool done = true;
    for (int i = 0; i < want; ++i) {
      const double e = es.eigenvalues()(i);
      if ((hx.col(i) - e * x.col(i)).norm() > tol * std::max(1.0, std::abs(e))) done = false;
    }
    if (done) {
      energies.assign(es.eigenvalues().data(), es.eigenvalues().data() + want);
      for (Eigen::Index c = 0; c < p; ++c) x.col(c).normalize();
      return true;
    }
  }
  return false;
}

/// A trial point: aligned eigenbasis (out) and the basis the incoming interval ends in (in).
struct Trial {
  double s = 0;
  std::vector<double> energies;   // K + 1 when available
  Eigen::MatrixXd v_out, v_in;    // dim x K
  Eigen::MatrixXd rebase;         // K x K, v_in = v_out * rebase
  std::vector<Group> groups;      // at this point
  std::vector<Group> linked_groups;  // groups of this point joined with the previous point's (the in basis)
  bool top_cut = false;           // the top group continues beyond K
  bool crossed = false;           // kept levels crossed in the interval arriving here
  Eigen::MatrixXd warm;           // dim x block: Ritz vectors in energy order (start of the next solve)
};

}  // namespace

InstantaneousFrame::InstantaneousFrame(const SectorHamiltonian& h, const EnergyScales& scales, double s_from,
                                       double s_to, const FrameOptions& options) {
  const long dim = static_cast<long>(h.dim());
#ifdef _OPENMP
  // Below 2^16 the H x products run on one thread anyway (transverse_ising.hpp);
  // what OpenMP would still spread over threads is Eigen's products of K or
  // Lanczos-subspace columns (V^T W, K x K results; Spectra's restarts), where
  // the fork/join and spin-wait cost more than the arithmetic: profiled at 10
  // qubits (dimension 1024, K = 11), about half of the frame's build time was
  // in libgomp and in 2-thread GEMMs of 11 x 11 results. The thread count is
  // the calling thread's own setting (no other thread is affected).
  struct OneThreadBelow {
    int saved = omp_get_max_threads();
    bool on;
    explicit OneThreadBelow(bool small) : on(small) { if (on) omp_set_num_threads(1); }
    ~OneThreadBelow() { if (on) omp_set_num_threads(saved); }
  } one_thread(dim < (1L << 16));
#endif
  k_ = static_cast<int>(std::min<long>(std::max(options.levels, 1), dim));
  const int k = k_;
  const int solve_levels = static_cast<int>(std::min<long>(k + 1, dim));

  // Levels beyond the K + 1 solved ones carried along as guards for the warm
  // start (a level entering the kept set from above is already in the block).
  const int block = static_cast<int>(std::min<long>(solve_levels + (options.warm_start ? kWarmGuard : 0), dim));
  auto eigen_at = [&](double s, const Trial* from) {
    const double a = scales.a_ghz(s), b = scales.b_ghz(s);
    Trial t;
    t.s = s;
    bool warm = false, reused = false;
    if (options.cache != nullptr) {
      if (const auto cp = options.cache->find(h, scales, s, block)) {
        t.energies.assign(cp->energies_ghz.begin(),
                          cp->energies_ghz.begin() + std::min<long>(solve_levels, static_cast<long>(cp->energies_ghz.size())));
        t.warm = cp->vectors.leftCols(block);
        options.cache->count_reuse();
        ++reused_;
        reused = true;
      }
    }
    if (!reused) ++solves_;
    if (!reused && options.warm_start && from != nullptr && from->warm.cols() == block && a != 0.0 && block < dim) {
      long apps = 0;
      warm = warm_start_levels(h, a, b, from->warm, solve_levels, options.warm_tolerance, t.energies, t.warm, apps);
      h_applications_ += apps;
      if (warm) ++warm_solves_;
      if (warm && options.cache != nullptr) {
        SolvedPoint sp;
        sp.s = s;
        sp.energies_ghz = t.energies;
        sp.vectors = t.warm.leftCols(std::min<Eigen::Index>(t.warm.cols(), static_cast<Eigen::Index>(t.energies.size())));
        sp.h_applications = apps;
        options.cache->store(h, scales, std::move(sp));
      }
    }
    if (!reused && !warm) {
      LevelOptions lo;
      lo.levels = block;
      lo.vectors = true;
      lo.tolerance = options.solve_tolerance;
      const bool seeded = options.seeded_lanczos && from != nullptr && from->warm.cols() > 0;
      Levels lv;
      try {
        lv = lowest_levels(h, a, b, lo, seeded ? &from->warm : nullptr);
      } catch (const std::runtime_error&) {
        if (!seeded) throw;
        lv = lowest_levels(h, a, b, lo);  // the seeded solve did not converge: from scratch
      }
      if (seeded) ++warm_solves_;
      h_applications_ += lv.operator_applications;
      if (static_cast<int>(lv.energies_ghz.size()) < k || lv.vectors.cols() < k)
        throw std::runtime_error(fmt::format("instantaneous frame: {} levels at s = {} (asked for {})",
                                             lv.energies_ghz.size(), s, k));
      t.energies.assign(lv.energies_ghz.begin(),
                        lv.energies_ghz.begin() + std::min<long>(solve_levels, static_cast<long>(lv.energies_ghz.size())));
      t.warm = std::move(lv.vectors);
      for (Eigen::Index c = 0; c < t.warm.cols(); ++c) t.warm.col(c).normalize();
      if (options.cache != nullptr) {
        SolvedPoint sp;
        sp.s = s;
        sp.energies_ghz = lv.energies_ghz;
        sp.vectors = t.warm;
        sp.h_applications = lv.operator_applications;
        options.cache->store(h, scales, std::move(sp));
      }
    }
    t.v_out = t.warm.leftCols(k);
    t.groups = groups_of(t.energies, k, options.group_gap_ghz);
    t.top_cut = static_cast<int>(t.energies.size()) > k &&
                t.energies[static_cast<std::size_t>(k)] - t.energies[static_cast<std::size_t>(k - 1)] <
                    options.group_gap_ghz;
    return t;
  };
  // Align a trial to the previous point's outgoing basis.
  auto align = [&](Trial& t, const Trial& prev) {
    for (const Group& g : t.groups) {
      const Eigen::MatrixXd r = procrustes(prev.v_out, t.v_out, g);
      t.v_out.middleCols(g.first, g.last - g.first + 1) = t.v_out.middleCols(g.first, g.last - g.first + 1) * r;
    }
    t.rebase = Eigen::MatrixXd::Identity(k, k);
    t.linked_groups = linked(prev.groups, t.groups, k);
    for (const Group& g : t.linked_groups) {
      if (g.first == g.last) continue;
      const int w = g.last - g.first + 1;
      t.rebase.block(g.first, g.first, w, w) = procrustes(prev.v_out, t.v_out, g);
    }
    // Levels that cross (exactly, or so narrowly that one interval steps over
    // the crossing) swap ranks in energy. The interval arriving here must end
    // in the continuation of the previous point's columns, so V_in follows each
    // level by continuity (largest overlap, clear matches > 1/2 only; a partial
    // turn is left to the grid) and the rebase re-labels the amplitudes into the
    // energy order of V_out. Only levels outside near-degenerate groups on both
    // sides are followed this way (groups are aligned as subspaces above).
    const Eigen::MatrixXd o = prev.v_out.transpose() * t.v_out;
    std::vector<std::tuple<double, int, int>> cand;
    for (int i = 0; i < k; ++i)
      for (int j = 0; j < k; ++j)
        if (std::abs(o(i, j)) > 0.5) cand.emplace_back(std::abs(o(i, j)), i, j);
    std::sort(cand.begin(), cand.end(), [](const auto& x, const auto& y) { return std::get<0>(x) > std::get<0>(y); });
    std::vector<int> perm(static_cast<std::size_t>(k), -1);
    std::vector<bool> used(static_cast<std::size_t>(k), false);
    for (const auto& [v, i, j] : cand)
      if (perm[static_cast<std::size_t>(i)] < 0 && !used[static_cast<std::size_t>(j)]) {
        perm[static_cast<std::size_t>(i)] = j;
        used[static_cast<std::size_t>(j)] = true;
      }
    auto singleton = [](const std::vector<Group>& gs, int i) {
      for (const Group& g : gs)
        if (g.first <= i && i <= g.last) return g.first == g.last;
      return true;
    };
    bool complete = true, identity = true, clean = true;
    for (int i = 0; i < k; ++i) {
      const int j = perm[static_cast<std::size_t>(i)];
      complete = complete && j >= 0;
      if (j >= 0 && j != i) {
        identity = false;
        clean = clean && singleton(prev.groups, i) && singleton(t.groups, i) && singleton(prev.groups, j) &&
                singleton(t.groups, j);
      }
    }
    if (complete && !identity && clean) {
      for (int i = 0; i < k; ++i) {
        const int j = perm[static_cast<std::size_t>(i)];
        if (j == i) continue;
        t.rebase.col(i).setZero();
        t.rebase(j, i) = o(i, j) < 0 ? -1.0 : 1.0;
      }
      t.crossed = true;
    }
    t.v_in = t.v_out * t.rebase;
  };
  // Pointwise <m|dn/ds> = <m|dH/ds|n> / (E_n - E_m) (first-order perturbation
  // theory, from differentiating H|n> = E_n|n>), NaN inside groups.
  auto connection = [&](const Eigen::MatrixXd& hp, const Eigen::MatrixXd& dp, const std::vector<Group>& groups) {
    Eigen::MatrixXd c = Eigen::MatrixXd::Zero(k, k);
    std::vector<int> group_of(static_cast<std::size_t>(k));
    for (std::size_t gi = 0; gi < groups.size(); ++gi)
      for (int i = groups[gi].first; i <= groups[gi].last; ++i) group_of[static_cast<std::size_t>(i)] = static_cast<int>(gi);
    for (int m = 0; m < k; ++m)
      for (int n = 0; n < k; ++n) {
        if (m == n) continue;
        const double de = hp(n, n) - hp(m, m);
        if (group_of[static_cast<std::size_t>(m)] == group_of[static_cast<std::size_t>(n)] ||
            std::abs(de) < 10.0 * options.group_gap_ghz)
          c(m, n) = std::numeric_limits<double>::quiet_NaN();
        else
          c(m, n) = dp(m, n) / de;
      }
    return c;
  };
  // K x K projections of H and dH/ds in the outgoing basis.
  auto project = [&](const Trial& t, FramePoint& p) {
    const double a = scales.a_ghz(t.s), b = scales.b_ghz(t.s);
    const double da = scales.da_ds(t.s), db = scales.db_ds(t.s);
    Eigen::MatrixXd hv(dim, k), dv(dim, k);
    h_applications_ += 2L * k;
    for (int c = 0; c < k; ++c) {
      h.apply(a, b, t.v_out.col(c).data(), hv.col(c).data());
      h.apply(da, db, t.v_out.col(c).data(), dv.col(c).data());
    }
    p.s = t.s;
    p.h_out = t.v_out.transpose() * hv;
    p.h_out = 0.5 * (p.h_out + p.h_out.transpose()).eval();
    const Eigen::MatrixXd d_out = t.v_out.transpose() * dv;
    p.dh_out = d_out.diagonal();
    p.rebase = t.rebase;
    p.h_in = t.rebase.transpose() * p.h_out * t.rebase;
    const Eigen::MatrixXd d_in = t.rebase.transpose() * d_out * t.rebase;
    p.dh_in = d_in.diagonal();
    p.conn_out = connection(p.h_out, d_out, t.groups);
    p.conn_in = connection(p.h_in, d_in, t.linked_groups.empty() ? t.groups : t.linked_groups);
  };
  auto to_full = [&](const Eigen::MatrixXd& v) {
    Eigen::MatrixXd f(static_cast<Eigen::Index>(h.full().dim()), k);
    for (int c = 0; c < k; ++c) {
      const std::vector<double> x = h.to_full(v.col(c).data());
      f.col(c) = Eigen::Map<const Eigen::VectorXd>(x.data(), static_cast<Eigen::Index>(x.size()));
    }
    return f;
  };

  // Forced grid points: the ends and the knots of a tabulated scale in between.
  const double dir = s_to >= s_from ? 1.0 : -1.0;
  std::vector<double> stops;
  if (!scales.is_linear_ramp())
    for (double knot : scales.table_s())
      if ((knot - s_from) * dir > 1e-12 && (s_to - knot) * dir > 1e-12) stops.push_back(knot);
  if (dir < 0) std::reverse(stops.begin(), stops.end());
  if (s_to != s_from) stops.push_back(s_to);  // equal: one point (a pause)

  Trial prev = eigen_at(s_from, nullptr);
  // First point: signs fixed so that each vector's largest entry is positive.
  for (int c = 0; c < k; ++c) {
    Eigen::Index i = 0;
    prev.v_out.col(c).cwiseAbs().maxCoeff(&i);
    if (prev.v_out(i, c) < 0) prev.v_out.col(c) *= -1.0;
  }
  prev.rebase = Eigen::MatrixXd::Identity(k, k);
  prev.v_in = prev.v_out;
  {
    FramePoint p;
    project(prev, p);
    points_.push_back(std::move(p));
  }
  first_full_ = to_full(prev.v_out);
  Eigen::MatrixXd two_back;  // v_out two points back (empty until there is one)

  const double span = std::abs(s_to - s_from);
  double ds = std::max(options.first_ds > 0.0 ? std::min(options.first_ds, span) : span / 16.0, options.min_ds);
  std::size_t next_stop = 0;
  const double two_pi = 2.0 * std::numbers::pi;
  while (next_stop < stops.size()) {
    const double stop = stops[next_stop];
    const double left = std::abs(stop - prev.s);
    const bool to_stop = ds >= left * (1.0 - 1e-9);
    double step = to_stop ? left : ds;
    double s_new = to_stop ? stop : prev.s + dir * step;
    // A stored point within the step is free: step onto the farthest one (the
    // checks below judge it as any other trial; a shorter step is always allowed).
    bool snapped = false;
    if (!to_stop && options.cache != nullptr)
      if (const auto c = options.cache->farthest_towards(h, scales, prev.s, s_new, block)) {
        s_new = *c;
        step = std::abs(s_new - prev.s);
        snapped = true;
      }
    const double proposed = ds;
    Trial t = eigen_at(s_new, &prev);
    align(t, prev);
    const Eigen::MatrixXd o = prev.v_out.transpose() * t.v_in;
    const Eigen::MatrixXd l = rotation_log(closest_rotation(o));
    // Turn of the frame, leaving out a top group that continues beyond K (its
    // kept part is not a well-defined subspace; the K test judges it).
    int k_eff = k;
    if (t.top_cut) k_eff = t.groups.back().first;
    if (prev.top_cut) k_eff = std::min(k_eff, prev.groups.back().first);
    const double turn_all = k_eff > 0 ? l.topLeftCorner(k_eff, k_eff).norm() : 0.0;
    // With strict_levels = m, the bound max_rotation applies to the strip of L
    // that touches the m lowest columns (the levels holding the state and their
    // couplings to every kept level); the block among the upper levels only
    // to upper_rotation_factor x max_rotation (see FrameOptions).
    double turn = turn_all;
    if (const int m = options.strict_levels; m > 0 && m < k_eff) {
      const double upper = l.block(m, m, k_eff - m, k_eff - m).squaredNorm();
      const double strip = std::sqrt(std::max(0.0, turn_all * turn_all - upper));
      turn = std::max(strip, turn_all / std::max(1.0, options.upper_rotation_factor));
    }
    FramePoint p;
    project(t, p);
    const double ds_signed = s_new - prev.s;
    const Eigen::VectorXd corr = (points_.back().dh_out - p.dh_in) * (ds_signed / 12.0);
    const double phase = two_pi * options.ns_per_unit_s * step * (corr.array() - corr(0)).abs().maxCoeff();
    const double ratio = std::max(turn / options.max_rotation, std::cbrt(phase / options.max_phase_error));
    if (ratio > 1.0 && step > options.min_ds) {
      ds = std::max(step * std::clamp(0.8 / ratio, 0.1, 0.5), options.min_ds);
      continue;
    }
    if (ratio > 1.0)
      throw std::runtime_error(fmt::format(
          "instantaneous frame: the frame turns by {:.3g} rad (phase correction {:.3g} rad) over the smallest interval "
          "ds = {:.3g} at s = {:.6g}; levels cross or the kept set is cut inside a near-degenerate group",
          turn, phase, step, prev.s));
    if (static_cast<long>(points_.size()) >= options.max_points)
      throw std::runtime_error(fmt::format("instantaneous frame: more than {} grid points needed", options.max_points));
    if (t.crossed) ++crossings_;
    FrameInterval iv;
    iv.generator = l;
    Eigen::JacobiSVD<Eigen::MatrixXd> svd(o);
    iv.subspace_loss = 1.0 - svd.singularValues().minCoeff();
    intervals_.push_back(std::move(iv));
    if (two_back.size() > 0) p.overlap_two_back = two_back.transpose() * t.v_in;
    points_.push_back(std::move(p));
    two_back = prev.v_out;
    prev = std::move(t);
    if (to_stop) ++next_stop;
    ds = step * std::min(2.0, ratio > 0 ? 0.8 / ratio : 2.0);
    if (snapped) ds = std::max(ds, proposed);  // a short step onto a stored point says nothing against the longer one
    ds = std::max(ds, options.min_ds);
  }
  last_full_ = to_full(prev.v_out);
  next_ds_ = ds;
}

}  // namespace gapwise
