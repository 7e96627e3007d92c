#include "dynamics/master_equation.hpp"
#include "dynamics/truncated_master_equation.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <numbers>
#include <stdexcept>
#include <unordered_map>
#include <utility>

#include <fmt/format.h>

namespace gapwise {
namespace {

constexpr double kTwoPi = 2.0 * std::numbers::pi;
// Matrix elements of sigma^z_i between eigenvectors below this are dropped (the
// entries are at most 1; this is rounding of the eigenvectors).
constexpr double kNegligibleElement = 1e-13;

Eigen::MatrixXd dense_hamiltonian(const TransverseIsingHamiltonian& h, double a_ghz, double b_ghz) {
  const int d = static_cast<int>(h.dim());
  Eigen::MatrixXd m = Eigen::MatrixXd::Zero(d, d);
  const auto& diag = h.diagonal();
  for (int x = 0; x < d; ++x) {
    m(x, x) = 0.5 * b_ghz * diag[static_cast<std::size_t>(x)];
    for (int q = 0; q < h.qubits(); ++q) m(x ^ (1 << q), x) = -0.5 * a_ghz;
  }
  return m;
}

// M^T X M for complex X and real M, as real products.
DensityMatrix congruence(const Eigen::MatrixXd& m, const DensityMatrix& x, bool transpose_first) {
  const Eigen::MatrixXd re = x.real(), im = x.imag();
  Eigen::MatrixXd r, i;
  if (transpose_first) {
    r.noalias() = m.transpose() * re * m;
    i.noalias() = m.transpose() * im * m;
  } else {
    r.noalias() = m * re * m.transpose();
    i.noalias() = m * im * m.transpose();
  }
  DensityMatrix out(x.rows(), x.cols());
  out.real() = r;
  out.imag() = i;
  return out;
}

struct LevelPair {
  int a, b;  // L has the element |a><b| (b -> a)
};

}  // namespace

DensityMatrix FrozenGenerator::to_eigenbasis(const DensityMatrix& rho) const { return congruence(vectors, rho, true); }
DensityMatrix FrozenGenerator::from_eigenbasis(const DensityMatrix& rho_e) const {
  return congruence(vectors, rho_e, false);
}

FrozenGenerator build_frozen_generator(const TransverseIsingHamiltonian& h, double a_ghz, double b_ghz,
                                       const OhmicBath& bath) {
  Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> es(dense_hamiltonian(h, a_ghz, b_ghz));
  if (es.info() != Eigen::Success) throw std::runtime_error("dense eigen-decomposition of H(s) did not converge");
  const int d = static_cast<int>(h.dim()), n = h.qubits();
  // sigma^z_i in the eigenbasis: S_i = V^T Z_i V.
  std::vector<Eigen::MatrixXd> s;
  if (bath.coupling != 0.0) {
    s.resize(static_cast<std::size_t>(n));
    for (int i = 0; i < n; ++i) {
      Eigen::MatrixXd zv = es.eigenvectors();
      for (int x = 0; x < d; ++x)
        if ((x >> i) & 1) zv.row(x) *= -1.0;
      s[static_cast<std::size_t>(i)].noalias() = es.eigenvectors().transpose() * zv;
    }
  }
  FrozenGenerator g = build_frozen_generator(es.eigenvalues(), s, bath, a_ghz, b_ghz);
  g.vectors = es.eigenvectors();
  return g;
}

FrozenGenerator build_frozen_generator(const Eigen::VectorXd& energies, const std::vector<Eigen::MatrixXd>& s,
                                       const OhmicBath& bath, double a_ghz, double b_ghz) {
  FrozenGenerator g;
  g.energies = energies;
  const int d = g.dim(), n = static_cast<int>(s.size());
  const double tol = kLevelTolerance * std::max(1.0, g.energies(d - 1) - g.energies(0));

  // Eigenspaces: runs of levels each within tol of the run's first level.
  g.eigenspace.assign(static_cast<std::size_t>(d), 0);
  std::vector<int> first{0};
  for (int k = 1; k < d; ++k) {
    if (g.energies(k) - g.energies(first.back()) > tol) first.push_back(k);
    g.eigenspace[static_cast<std::size_t>(k)] = static_cast<int>(first.size()) - 1;
  }
  const int spaces = static_cast<int>(first.size());
  first.push_back(d);
  std::vector<double> mean(static_cast<std::size_t>(spaces));
  for (int c = 0; c < spaces; ++c)
    mean[static_cast<std::size_t>(c)] = g.energies.segment(first[c], first[c + 1] - first[c]).mean();
  if (bath.coupling == 0.0 || s.empty()) return g;

  // Bohr frequencies of eigenspace pairs, grouped.
  struct SpacePair {
    double gap;  // E_b - E_a, GHz
    int ca, cb;
  };
  std::vector<SpacePair> pairs;
  pairs.reserve(static_cast<std::size_t>(spaces) * static_cast<std::size_t>(spaces));
  for (int ca = 0; ca < spaces; ++ca)
    for (int cb = 0; cb < spaces; ++cb)
      pairs.push_back({ca == cb ? 0.0 : mean[static_cast<std::size_t>(cb)] - mean[static_cast<std::size_t>(ca)], ca, cb});
  std::sort(pairs.begin(), pairs.end(), [](const SpacePair& x, const SpacePair& y) { return x.gap < y.gap; });

  // K = sum gamma L^+ L, keyed by (b, b'): block diagonal over eigenspaces, except
  // where two eigenspaces' Bohr frequencies to a common level fall in one group.
  std::unordered_map<long long, double> k_entries;
  std::vector<LevelPair> members;
  std::vector<double> elements;  // n values per member: (S_i)_{ab}
  double jump_terms = 0;
  std::vector<double> column_sum(static_cast<std::size_t>(d) * static_cast<std::size_t>(d), 0.0);
  for (std::size_t start = 0; start < pairs.size();) {
    std::size_t end = start + 1;
    while (end < pairs.size() && pairs[end].gap - pairs[start].gap <= tol) ++end;
    double gap_sum = 0;
    for (std::size_t p = start; p < end; ++p) gap_sum += pairs[p].gap;
    const double gap = gap_sum / static_cast<double>(end - start);
    const double gamma = bath.rate(kTwoPi * gap);  // gap > 0: b above a, relaxation b -> a
    members.clear();
    elements.clear();
    for (std::size_t p = start; p < end; ++p)
      for (int a = first[pairs[p].ca]; a < first[pairs[p].ca + 1]; ++a)
        for (int b = first[pairs[p].cb]; b < first[pairs[p].cb + 1]; ++b) {
          double largest = 0;
          for (int i = 0; i < n; ++i) largest = std::max(largest, std::abs(s[static_cast<std::size_t>(i)](a, b)));
          if (largest <= kNegligibleElement) continue;
          members.push_back({a, b});
          for (int i = 0; i < n; ++i) elements.push_back(s[static_cast<std::size_t>(i)](a, b));
        }
    start = end;
    if (gamma == 0.0 || members.empty()) continue;
    const std::size_t m = members.size();
    jump_terms += static_cast<double>(m) * static_cast<double>(m);
    if (jump_terms > kMaxJumpTerms)
      throw std::runtime_error(fmt::format(
          "the spectrum of H(s) at A = {:g} GHz, B = {:g} GHz has Bohr frequencies shared by so many level pairs "
          "that the full-space master equation would need more than {:g} jump terms",
          a_ghz, b_ghz, kMaxJumpTerms));
    for (std::size_t k = 0; k < m; ++k)
      for (std::size_t l = 0; l < m; ++l) {
        double c = 0;
        for (int i = 0; i < n; ++i) c += elements[k * n + i] * elements[l * n + i];
        if (c == 0.0) continue;
        const int row = members[k].a + d * members[l].a, col = members[k].b + d * members[l].b;
        g.jump_row.push_back(row);
        g.jump_col.push_back(col);
        g.jump_value.push_back(gamma * c);
        column_sum[static_cast<std::size_t>(col)] += std::abs(gamma * c);
        // K = sum gamma L^+ L: (L^+ L)_{b b'} = sum_a S_ab S_ab' for members (a, b), (a, b').
        if (members[k].a == members[l].a)
          k_entries[static_cast<long long>(members[k].b) * d + members[l].b] += gamma * c;
      }
  }
  std::vector<std::pair<long long, double>> sorted_k(k_entries.begin(), k_entries.end());
  std::sort(sorted_k.begin(), sorted_k.end());
  std::vector<double> k_row_sum(static_cast<std::size_t>(d), 0.0);
  for (const auto& [key, value] : sorted_k) {
    if (value == 0.0) continue;
    g.k_row.push_back(static_cast<int>(key / d));
    g.k_col.push_back(static_cast<int>(key % d));
    g.k_value.push_back(value);
    k_row_sum[static_cast<std::size_t>(key / d)] += std::abs(value);
  }
  const double k_norm = *std::max_element(k_row_sum.begin(), k_row_sum.end());
  g.norm_bound = *std::max_element(column_sum.begin(), column_sum.end()) + k_norm;
  return g;
}

void FrozenGenerator::apply_dissipator(const DensityMatrix& rho_e, DensityMatrix& out) const {
  const int d = dim();
  out.setZero(d, d);
  const Complex* in = rho_e.data();
  Complex* o = out.data();
  for (std::size_t k = 0; k < jump_value.size(); ++k) o[jump_row[k]] += jump_value[k] * in[jump_col[k]];
  // -1/2 (K rho + rho K)
  for (std::size_t k = 0; k < k_value.size(); ++k) {
    const int b = k_row[k], bp = k_col[k];
    const double v = 0.5 * k_value[k];
    out.row(b) -= v * rho_e.row(bp);  // (K rho)(b, c) = K(b, b') rho(b', c)
    out.col(bp) -= v * rho_e.col(b);  // (rho K)(r, b') = rho(r, b) K(b, b')
  }
}

void FrozenGenerator::evolve(DensityMatrix& rho_e, double tau_ns) const {
  const int d = dim();
  if (!jump_value.empty() || !k_value.empty()) {
    const int substeps = std::max(1, static_cast<int>(std::ceil(2.0 * norm_bound * tau_ns)));
    const double h = tau_ns / substeps;
    DensityMatrix term(d, d), next(d, d);
    for (int sub = 0; sub < substeps; ++sub) {
      term = rho_e;
      const double scale = rho_e.norm();
      for (int k = 1; k <= 60; ++k) {
        apply_dissipator(term, next);
        term = next * (h / k);
        rho_e += term;
        if (term.norm() <= 1e-17 * scale) break;
      }
    }
  }
  for (int col = 0; col < d; ++col)
    for (int row = 0; row < d; ++row) {
      const double phase = -kTwoPi * (energies(row) - energies(col)) * tau_ns;
      rho_e(row, col) *= Complex(std::cos(phase), std::sin(phase));
    }
}

DensityMatrix gibbs_state(const TransverseIsingHamiltonian& h, double a_ghz, double b_ghz, double theta_ghz) {
  Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> es(dense_hamiltonian(h, a_ghz, b_ghz));
  const Eigen::VectorXd& e = es.eigenvalues();
  Eigen::VectorXd w = (-(e.array() - e(0)) / theta_ghz).exp();
  w /= w.sum();
  const Eigen::MatrixXd rho = es.eigenvectors() * w.asDiagonal() * es.eigenvectors().transpose();
  return rho.cast<Complex>();
}

namespace {

double smallest_eigenvalue(const DensityMatrix& rho) {
  Eigen::SelfAdjointEigenSolver<DensityMatrix> es(rho, Eigen::EigenvaluesOnly);
  return es.eigenvalues()(0);
}

class FullSpaceMasterEquation final : public DensityPropagator {
 public:
  FullSpaceMasterEquation(const TransverseIsingHamiltonian& h, const OhmicBath& bath,
                          const OpenPropagatorOptions& options)
      : h_(h), bath_(bath), options_(options), ticker_(PropagatorOptions{.progress = options.progress,
                                                                          .progress_interval_s =
                                                                              options.progress_interval_s}) {}
  std::string name() const override { return "ame-full"; }

  void advance(const AnnealDrive& drive, double t0, double t1, DensityMatrix& rho,
               OpenPropagationStats& stats) override {
    const double duration = drive.path.duration_ns();
    const double span = t1 - t0;
    if (!(span > 0)) return;
    const std::size_t piece = drive.path.piece_at(0.5 * (t0 + t1));
    if (drive.path.ds_dt_ns(piece) == 0.0) {
      // Constant H: one exact exponential (covariance makes phases and dissipator commute).
      apply(drive.a_ghz(t0), drive.b_ghz(t0), span, rho, stats);
      finish_step(rho, stats, t1, duration);
    } else {
      double dt = std::min(span, guess_ > 0 ? guess_ : span / 16.0);
      double t = t0;
      // Error allowed per ns of the run (the tolerance spread over the whole duration).
      const double per_ns = options_.tolerance / std::max(duration, 1e-300);
      while (t < t1) {
        const bool last = t + dt >= t1 * (1.0 - 1e-14);
        const double step = last ? t1 - t : dt;
        DensityMatrix whole = rho, halves = rho;
        cf4_step(drive, t, step, whole, stats);
        cf4_step(drive, t, 0.5 * step, halves, stats);
        cf4_step(drive, t + 0.5 * step, 0.5 * step, halves, stats);
        // Error measure: the populations of the instantaneous levels (eigenbasis of the
        // last exponential), which is what accumulates into p; computational-basis
        // populations also carry the fast, transient beating of coherences between
        // levels, which would force steps far shorter than the result needs.
        const DensityMatrix diff = whole - halves;
        const double err = (last_vectors_.transpose() * diff.real() * last_vectors_).diagonal().cwiseAbs().sum();
        // (floor: the rounding of the basis changes, far below any useful tolerance)
        const double allowed = std::max(per_ns * step, 1e-13);
        const double factor = err > 0 ? 0.9 * std::pow(allowed / err, 1.0 / 3.0) : 4.0;
        if (err <= allowed) {
          rho = std::move(halves);
          t = last ? t1 : t + step;
          stats.error_estimate += err;
          finish_step(rho, stats, t, duration);
          dt = step * std::clamp(factor, 0.3, 4.0);
          if (!last) guess_ = dt;
        } else {
          ++stats.rejected_steps;
          dt = step * std::clamp(factor, 0.1, 0.9);
          if (dt < span * 1e-12)
            throw std::runtime_error(fmt::format(
                "the master equation cannot meet tolerance {:g} near t = {:g} ns: the step fell below {:g} ns",
                options_.tolerance, t, dt));
        }
      }
    }
    stats.min_eigenvalue = std::min(stats.min_eigenvalue, smallest_eigenvalue(rho));
    if (t1 >= duration * (1.0 - 1e-14)) ticker_.finish(1);
  }

 private:
  void apply(double a, double b, double tau, DensityMatrix& rho, OpenPropagationStats& stats) {
    const FrozenGenerator g = build_frozen_generator(h_, a, b, bath_);
    ++stats.eigen_solves;
    stats.max_jump_terms = std::max(stats.max_jump_terms, static_cast<long>(g.jump_value.size()));
    last_vectors_ = g.vectors;
    DensityMatrix rho_e = g.to_eigenbasis(rho);
    g.evolve(rho_e, tau);
    rho = g.from_eigenbasis(rho_e);
  }
  // Commutator-free Magnus, order 4 (Blanes & Moan 2006): two exponentials of
  // linear combinations of H at the Gauss points; each one here is exp(dt/2 (L_Hk + D_Hk))
  // with H_k = 2 (alpha H1 + alpha' H2) (weights summing to 1).
  void cf4_step(const AnnealDrive& drive, double t, double dt, DensityMatrix& rho, OpenPropagationStats& stats) {
    const double c1 = 0.5 - std::sqrt(3.0) / 6.0, c2 = 0.5 + std::sqrt(3.0) / 6.0;
    const double w1 = (3.0 - 2.0 * std::sqrt(3.0)) / 6.0, w2 = (3.0 + 2.0 * std::sqrt(3.0)) / 6.0;  // 2 alpha
    const double a1 = drive.a_ghz(t + c1 * dt), b1 = drive.b_ghz(t + c1 * dt);
    const double a2 = drive.a_ghz(t + c2 * dt), b2 = drive.b_ghz(t + c2 * dt);
    apply(w2 * a1 + w1 * a2, w2 * b1 + w1 * b2, 0.5 * dt, rho, stats);  // weighted to the early point, first
    apply(w1 * a1 + w2 * a2, w1 * b1 + w2 * b2, 0.5 * dt, rho, stats);
  }
  void finish_step(DensityMatrix& rho, OpenPropagationStats& stats, double t, double duration) {
    ++stats.steps;
    rho = 0.5 * (rho + rho.adjoint()).eval();  // keep it exactly Hermitian against rounding
    stats.max_trace_deviation = std::max(stats.max_trace_deviation, std::abs(rho.trace().real() - 1.0));
    ticker_.step(1, t, duration);
  }

  const TransverseIsingHamiltonian& h_;
  OhmicBath bath_;
  OpenPropagatorOptions options_;
  ProgressTicker ticker_;
  double guess_ = 0;
  Eigen::MatrixXd last_vectors_;
};

}  // namespace

std::unique_ptr<DensityPropagator> make_full_space_master_equation(const TransverseIsingHamiltonian& h,
                                                                   const OhmicBath& bath,
                                                                   const OpenPropagatorOptions& options) {
  if (h.qubits() > kMaxFullSpaceOpenQubits)
    throw std::invalid_argument(fmt::format(
        "the full-space master equation holds at most {} qubits (a 2^n x 2^n density matrix and a dense "
        "eigen-decomposition per step); this problem has {}",
        kMaxFullSpaceOpenQubits, h.qubits()));
  return std::make_unique<FullSpaceMasterEquation>(h, bath, options);
}

std::string resolve_open_method(const std::string& method, int qubits) {
  if (method != "auto") return method;
  return qubits <= kAutoFullSpaceQubits ? "ame-full" : "ame-truncated";
}

OpenAnnealResult simulate_open_anneal(const TransverseIsingHamiltonian& h, const GroundManifold& ground,
                                      const EnergyScales& scales, const AnnealPath& path, const QuantumState& psi0,
                                      const OhmicBath& bath, const OpenPropagatorOptions& options) {
  const std::string method = resolve_open_method(options.method, h.qubits());
  if (method == "ame-truncated") {
    struct EigenThreads {
      int saved = Eigen::nbThreads();
      EigenThreads() { Eigen::setNbThreads(1); }
      ~EigenThreads() { Eigen::setNbThreads(saved); }
    } one_thread;
    return simulate_truncated_open_anneal(h, ground, scales, path, psi0, bath, options);
  }
  if (method != "ame-full")
    throw std::invalid_argument(fmt::format("unknown open-system method '{}' (auto, ame-full, ame-truncated)", method));
  const auto start = std::chrono::steady_clock::now();
  // Eigen's own threads for the 2^n x 2^n products: measured 10x slower than one
  // thread at 6-8 qubits on a loaded 2-core machine (spinning workers), so the
  // master equation runs its products single-threaded and restores the setting.
  struct EigenThreads {
    int saved = Eigen::nbThreads();
    EigenThreads() { Eigen::setNbThreads(1); }
    ~EigenThreads() { Eigen::setNbThreads(saved); }
  } one_thread;
  auto prop = make_full_space_master_equation(h, bath, options);
  const int d = static_cast<int>(h.dim());
  Eigen::Map<const Eigen::VectorXcd> psi(psi0.data(), d);
  DensityMatrix rho = psi * psi.adjoint();
  AnnealDrive drive{&scales, path};
  OpenAnnealResult r;
  r.duration_ns = path.duration_ns();
  r.propagator = prop->name();
  r.stats.min_eigenvalue = smallest_eigenvalue(rho);
  const auto& pts = path.points();
  for (std::size_t k = 0; k + 1 < pts.size(); ++k) prop->advance(drive, pts[k].t_ns, pts[k + 1].t_ns, rho, r.stats);
  r.populations.resize(static_cast<std::size_t>(d));
  for (int b = 0; b < d; ++b) r.populations[static_cast<std::size_t>(b)] = rho(b, b).real();
  for (BasisIndex b : ground.states) r.ground_probability += r.populations[b];
  r.trace_deviation = std::abs(rho.trace().real() - 1.0);
  r.min_eigenvalue = smallest_eigenvalue(rho);
  r.wall_seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  return r;
}

}  // namespace gapwise
