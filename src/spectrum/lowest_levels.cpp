#include "spectrum/lowest_levels.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numeric>
#include <random>
#include <stdexcept>

#include <Spectra/SymEigsSolver.h>
#include <fmt/format.h>

#include "io/input_error.hpp"

namespace gapwise {

std::string eigen_method_name(EigenMethod m) {
  switch (m) {
    case EigenMethod::Dense: return "dense";
    case EigenMethod::Lanczos: return "lanczos";
    default: return "auto";
  }
}

namespace {

using Eigen::Index;

/// H + sigma V V^T: the found levels moved up by sigma, everything else untouched.
class DeflatedOperator {
 public:
  using Scalar = double;
  DeflatedOperator(const SectorOperatorAtS& op, const Eigen::MatrixXd& v, double sigma)
      : op_(&op), v_(&v), sigma_(sigma) {}
  long rows() const { return op_->rows(); }
  long cols() const { return op_->cols(); }
  void perform_op(const double* x_in, double* y_out) const {
    op_->perform_op(x_in, y_out);
    Eigen::Map<const Eigen::VectorXd> x(x_in, rows());
    Eigen::Map<Eigen::VectorXd> y(y_out, rows());
    y.noalias() += sigma_ * (*v_ * (v_->transpose() * x));
  }

 private:
  const SectorOperatorAtS* op_;
  const Eigen::MatrixXd* v_;
  double sigma_;
};

struct RitzResult {
  Eigen::VectorXd values;  // ascending
  Eigen::MatrixXd vectors;
  int iterations = 0;
  long operations = 0;
};

/// `seed` 0: Spectra's own start vector; otherwise a pseudo-random one from that seed
/// (every deflation round needs a fresh direction, or it sees nothing new).
/// `start`: a warm start (its columns' sum, plus a 0.1 % random part so that no
/// direction is left out entirely); on failure the cold attempts follow.
template <class Op>
RitzResult run_lanczos(Op op, int nev, double tolerance, const std::string& where, unsigned seed = 0,
                       const Eigen::MatrixXd* start = nullptr) {
  const long dim = op.rows();
  // A small subspace: on these operators the restarts (O(dim ncv^2)) cost more than
  // the matrix-vector products, and bench/ shows 2k + 2 (at least 10) beats 20.
  // A warm start converges in fewer restarts with a slightly larger one (bench/).
  const bool warm = start && start->rows() == dim && start->cols() > 0;
  int ncv = static_cast<int>(std::min<long>(dim, std::max(2 * nev + 2, warm ? 16 : 10)));
  long operations = 0;
  for (int attempt = warm ? -1 : 0; attempt < 3; ++attempt) {
    Spectra::SymEigsSolver<Op> eigs(op, nev, ncv);
    if (attempt < 0) {
      Eigen::VectorXd v = Eigen::VectorXd::Zero(dim);
      for (Index j = 0; j < start->cols(); ++j) {
        const double nj = start->col(j).norm();
        if (nj > 0.0) v += start->col(j) / nj;
      }
      std::mt19937_64 rng(7u + static_cast<unsigned>(dim));
      std::uniform_real_distribution<double> u(-1.0, 1.0);
      Eigen::VectorXd noise(dim);
      for (Index i = 0; i < dim; ++i) noise[i] = u(rng);
      const double nv = v.norm();
      if (!(nv > 0.0)) continue;
      v = v / nv + 1e-3 * noise / noise.norm();
      eigs.init(v.data());
    } else if (seed == 0) {
      eigs.init();
    } else {
      std::mt19937_64 rng(seed);
      std::uniform_real_distribution<double> u(-0.5, 0.5);
      Eigen::VectorXd start(dim);
      for (Index i = 0; i < dim; ++i) start[i] = u(rng);
      eigs.init(start.data());
    }
    eigs.compute(Spectra::SortRule::SmallestAlge, attempt < 0 ? 200 : 20000, tolerance);
    operations += static_cast<long>(eigs.num_operations());
    if (eigs.info() == Spectra::CompInfo::Successful) {
      RitzResult r;
      r.operations = operations;
      const Eigen::VectorXd ev = eigs.eigenvalues();
      const Eigen::MatrixXd vec = eigs.eigenvectors();
      std::vector<Index> order(static_cast<std::size_t>(ev.size()));
      std::iota(order.begin(), order.end(), Index{0});
      std::sort(order.begin(), order.end(), [&](Index x, Index y) { return ev[x] < ev[y]; });
      r.values.resize(ev.size());
      r.vectors.resize(vec.rows(), ev.size());
      for (std::size_t i = 0; i < order.size(); ++i) {
        r.values[static_cast<Index>(i)] = ev[order[i]];
        r.vectors.col(static_cast<Index>(i)) = vec.col(order[i]);
      }
      r.iterations = static_cast<int>(eigs.num_iterations());
      return r;
    }
    if (attempt < 0) continue;  // the warm start failed: the cold attempts as before
    if (ncv >= dim) break;
    ncv = static_cast<int>(std::min<long>(dim, 2L * ncv));  // clustered levels: a larger subspace helps
  }
  throw std::runtime_error(fmt::format("Lanczos did not converge for the lowest {} levels ({})", nev, where));
}

/// Lanczos with the deflation check: returns the lowest `k` levels and vectors.
RitzResult lanczos_levels(const SectorOperatorAtS& op, int k, double tolerance, bool check, int& added,
                          const std::string& where, const Eigen::MatrixXd* start = nullptr) {
  RitzResult r = run_lanczos(op, k, tolerance, where, 0, start);
  added = 0;
  if (!check) return r;
  const long dim = op.rows();
  for (int round = 0; round < k && r.values.size() < dim; ++round) {
    const double top = r.values[r.values.size() - 1];
    const double spread = top - r.values[0];
    const double sigma = 2.0 * spread + 1.0 + 1e-3 * std::abs(top);
    if (r.vectors.cols() + 2 > dim) break;  // nothing left that Lanczos could explore
    DeflatedOperator dop(op, r.vectors, sigma);
    // The question "is anything left below `top`?" needs far less accuracy than the
    // levels themselves: ask it loosely, and solve tightly only when the answer is yes.
    const unsigned seed = 1000u + static_cast<unsigned>(round);
    const double loose = std::max(tolerance, 1e-7);
    RitzResult extra = run_lanczos(dop, 1, loose, where + ", deflation check", seed);
    r.operations += extra.operations;
    const double margin = 10.0 * loose * std::max(1.0, std::abs(top));
    if (!(extra.values[0] < top - margin)) {
      if (loose == tolerance || extra.values[0] >= top) break;  // no level hidden below the highest one found
      extra = run_lanczos(dop, 1, tolerance, where + ", deflation check", seed);  // too close to call loosely
      r.operations += extra.operations;
    } else if (loose > tolerance) {
      extra = run_lanczos(dop, 1, tolerance, where + ", deflation check", seed);
      r.operations += extra.operations;
    }
    const double e = extra.values[0];
    const double resolution = 10.0 * tolerance * std::max(1.0, std::abs(top));
    if (!(e < top - resolution)) break;
    // A missed level: merge it, keep the k lowest.
    ++added;
    const Index m = r.values.size();
    Eigen::VectorXd vals(m + 1);
    Eigen::MatrixXd vecs(r.vectors.rows(), m + 1);
    Index pos = 0;
    while (pos < m && r.values[pos] <= e) ++pos;
    vals << r.values.head(pos), e, r.values.tail(m - pos);
    vecs << r.vectors.leftCols(pos), extra.vectors.col(0), r.vectors.rightCols(m - pos);
    r.values = vals.head(k);
    r.vectors = vecs.leftCols(k);
  }
  return r;
}

/// True when two problem-diagonal entries agree to 1e-12 relative.
bool has_repeated_values(std::vector<double> d) {
  std::sort(d.begin(), d.end());
  for (std::size_t i = 1; i < d.size(); ++i)
    if (d[i] - d[i - 1] <= 1e-12 * std::max(1.0, std::abs(d[i]))) return true;
  return false;
}

}  // namespace

std::vector<double> kato_temple_bounds(const std::vector<double>& e, const std::vector<double>& r) {
  const std::size_t k = std::min(e.size(), r.size());
  std::vector<double> out(k);
  for (std::size_t j = 0; j < k; ++j) {
    out[j] = r[j];
    if (j + 1 == k) continue;  // nothing known about the level above the highest one found
    double delta = std::numeric_limits<double>::infinity();
    if (j > 0) delta = std::min(delta, e[j] - (e[j - 1] + r[j - 1]));
    delta = std::min(delta, (e[j + 1] - r[j + 1]) - e[j]);
    // The interval (E_j - delta, E_j + delta) must hold exactly one eigenvalue: the
    // one within r_j of E_j (Weinstein), so delta > r_j is required.
    if (delta > r[j] && std::isfinite(delta)) out[j] = std::min(r[j], r[j] * r[j] / delta);
  }
  return out;
}

Levels lowest_levels(const SectorHamiltonian& h, double a, double b, const LevelOptions& opt) {
  return lowest_levels(h, a, b, opt, nullptr);
}

Levels lowest_levels(const SectorHamiltonian& h, double a, double b, const LevelOptions& opt,
                     const Eigen::MatrixXd* start) {
  const std::size_t dim = h.dim();
  const int k = std::max(1, std::min<int>(opt.levels, static_cast<int>(std::min<std::size_t>(dim, 1u << 30))));
  EigenMethod method = opt.method;
  if (method == EigenMethod::Auto) method = dim <= kDenseMaxDim ? EigenMethod::Dense : EigenMethod::Lanczos;
  if (method == EigenMethod::Lanczos && static_cast<std::size_t>(k) + 2 > dim) method = EigenMethod::Dense;
  if (method == EigenMethod::Dense && dim > kDenseHardMaxDim)
    throw InputError({"solver", 0, 0, "solver"},
                     fmt::format("the dense solver would need a {0} x {0} matrix ({1:.1f} GiB)", dim,
                                 8.0 * double(dim) * double(dim) / (1024.0 * 1024.0 * 1024.0)),
                     fmt::format("use the Lanczos solver (the automatic choice) above dimension {}", kDenseHardMaxDim));
  Levels out;
  out.method_used = method;
  const Index n = static_cast<Index>(dim);
  const SectorOperatorAtS op(h, a, b);

  if (a == 0.0) {
    // Purely classical point: the levels are the sorted diagonal, basis vectors exact.
    const auto& d = h.diagonal();
    std::vector<Index> order(dim);
    std::iota(order.begin(), order.end(), Index{0});
    std::partial_sort(order.begin(), order.begin() + k, order.end(), [&](Index x, Index y) {
      return d[static_cast<std::size_t>(x)] < d[static_cast<std::size_t>(y)] ||
             (d[static_cast<std::size_t>(x)] == d[static_cast<std::size_t>(y)] && x < y);
    });
    if (opt.vectors) out.vectors = Eigen::MatrixXd::Zero(n, k);
    for (int i = 0; i < k; ++i) {
      out.energies_ghz.push_back(0.5 * b * d[static_cast<std::size_t>(order[static_cast<std::size_t>(i)])]);
      if (opt.vectors) {
        out.vectors(order[static_cast<std::size_t>(i)], i) = 1.0;
        out.residuals_ghz.push_back(0.0);
      }
    }
    return out;
  }

  if (method == EigenMethod::Dense) {
    Eigen::MatrixXd m(n, n);
    Eigen::VectorXd e(n), col(n);
    for (Index j = 0; j < n; ++j) {
      e.setZero();
      e[j] = 1.0;
      h.apply(a, b, e.data(), col.data());
      m.col(j) = col;
    }
    Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> es(m, opt.vectors ? Eigen::ComputeEigenvectors
                                                                      : Eigen::EigenvaluesOnly);
    if (es.info() != Eigen::Success) throw std::runtime_error("dense eigensolver failed");
    for (int i = 0; i < k; ++i) out.energies_ghz.push_back(es.eigenvalues()[i]);
    if (opt.vectors) out.vectors = es.eigenvectors().leftCols(k);
  } else {
    const std::string where = fmt::format("{}, A = {} GHz, B = {} GHz", describe_sector(h.sector()), a, b);
    // Exact degeneracies over a range of s need a symmetry: a unitary commuting with
    // both D and sum X. If D has no repeated values only phases commute with it, and
    // a phase pattern commuting with sum X (which links every state to its one-flip
    // neighbours) is constant: no symmetry, nothing Lanczos could miss. With B = 0
    // the transverse term alone is highly degenerate.
    const bool check = opt.check_missed_levels && (b == 0.0 || has_repeated_values(h.diagonal()));
    out.level_check_run = check;
    // With quadratic bounds: a loose tolerance first (eigenvalue errors go as the
    // square of the residual), tightened by 1e-2 steps until the Kato-Temple bounds
    // of the levels that matter meet the wanted accuracy, at worst down to it.
    const bool relax = opt.quadratic_bounds;
    double tol = relax ? std::max(opt.tolerance, 1e-7) : opt.tolerance;
    const int bounded = opt.bounded_levels > 0 ? std::min(opt.bounded_levels, k) : k;
    const Eigen::MatrixXd* seed = start && start->rows() == n && start->cols() > 0 ? start : nullptr;
    RitzResult r;
    Eigen::MatrixXd previous;
    long operations = 0;
    for (;;) {
      int added = 0;
      r = lanczos_levels(op, k, tol, check, added, where, seed);
      operations += r.operations;
      out.missed_levels_found = std::max(out.missed_levels_found, added);
      if (!relax || tol <= opt.tolerance) break;
      std::vector<double> e(r.values.data(), r.values.data() + r.values.size()), res;
      Eigen::VectorXd hv(n);
      for (Index i = 0; i < r.values.size(); ++i) {
        op.perform_op(r.vectors.col(i).data(), hv.data());
        res.push_back((hv - r.values[i] * r.vectors.col(i)).norm());
      }
      operations += r.values.size();
      const std::vector<double> kt = kato_temple_bounds(e, res);
      bool ok = true;
      for (int j = 0; j < bounded && j < static_cast<int>(kt.size()); ++j)
        ok = ok && kt[static_cast<std::size_t>(j)] <= opt.tolerance * std::max(1.0, std::abs(e[static_cast<std::size_t>(j)]));
      if (ok) break;
      // A level the deflation check merged in is exactly degenerate with a found one:
      // no quadratic bound helps there, so go straight to the wanted tolerance.
      tol = added > 0 ? opt.tolerance : std::max(opt.tolerance, tol * 1e-2);
      previous = r.vectors;  // the next, tighter solve starts from these
      seed = &previous;
    }
    out.iterations = r.iterations;
    out.operator_applications = static_cast<int>(operations);
    for (Index i = 0; i < r.values.size(); ++i) out.energies_ghz.push_back(r.values[i]);
    if (opt.vectors) out.vectors = std::move(r.vectors);
  }
  if (opt.vectors) {
    Eigen::VectorXd hv(n);
    for (int i = 0; i < k; ++i) {
      op.perform_op(out.vectors.col(i).data(), hv.data());
      out.residuals_ghz.push_back((hv - out.energies_ghz[static_cast<std::size_t>(i)] * out.vectors.col(i)).norm());
    }
    out.operator_applications += k;
    out.error_bounds_ghz = kato_temple_bounds(out.energies_ghz, out.residuals_ghz);
  }
  return out;
}

Levels lowest_levels(const TransverseIsingHamiltonian& h, double a, double b, int k, bool vectors,
                     EigenMethod method) {
  const SectorHamiltonian full(h, SpinFlipSector::Full);
  LevelOptions o;
  o.levels = k;
  o.vectors = vectors;
  o.method = method;
  return lowest_levels(full, a, b, o);
}

}  // namespace gapwise
