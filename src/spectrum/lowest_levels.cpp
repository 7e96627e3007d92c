#include "spectrum/lowest_levels.hpp"

#include <algorithm>
#include <stdexcept>

#include <Spectra/SymEigsSolver.h>
#include <fmt/format.h>

namespace gapwise {

Levels lowest_levels(const TransverseIsingHamiltonian& h, double a, double b, int k, bool vectors,
                     EigenMethod method) {
  const std::size_t dim = h.dim();
  k = std::min<int>(k, static_cast<int>(dim));
  if (method == EigenMethod::Auto) method = dim <= kDenseMaxDim ? EigenMethod::Dense : EigenMethod::Lanczos;
  if (method == EigenMethod::Lanczos && static_cast<std::size_t>(k) + 2 > dim) method = EigenMethod::Dense;
  Levels out;
  out.method_used = method;
  if (method == EigenMethod::Dense) {
    const Eigen::Index n = static_cast<Eigen::Index>(dim);
    Eigen::MatrixXd m(n, n);
    Eigen::VectorXd e(n), col(n);
    for (Eigen::Index j = 0; j < n; ++j) {
      e.setZero();
      e[j] = 1.0;
      h.apply(a, b, e.data(), col.data());
      m.col(j) = col;
    }
    Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> es(m, vectors ? Eigen::ComputeEigenvectors : Eigen::EigenvaluesOnly);
    if (es.info() != Eigen::Success) throw std::runtime_error("dense eigensolver failed");
    for (int i = 0; i < k; ++i) out.energies_ghz.push_back(es.eigenvalues()[i]);
    if (vectors) out.vectors = es.eigenvectors().leftCols(k);
    return out;
  }
  HamiltonianAtS op(h, a, b);
  const int ncv = static_cast<int>(std::min<std::size_t>(dim, static_cast<std::size_t>(std::max(2 * k + 1, 20))));
  Spectra::SymEigsSolver<HamiltonianAtS> eigs(op, k, ncv);
  eigs.init();
  eigs.compute(Spectra::SortRule::SmallestAlge, 10000, 1e-12);
  if (eigs.info() != Spectra::CompInfo::Successful)
    throw std::runtime_error(fmt::format("Lanczos did not converge for the lowest {} levels (A = {} GHz, B = {} GHz)",
                                         k, a, b));
  out.iterations = static_cast<int>(eigs.num_iterations());
  Eigen::VectorXd ev = eigs.eigenvalues();  // descending for SmallestAlge? sort below
  std::vector<int> order(static_cast<std::size_t>(ev.size()));
  for (int i = 0; i < ev.size(); ++i) order[static_cast<std::size_t>(i)] = i;
  std::sort(order.begin(), order.end(), [&](int x, int y) { return ev[x] < ev[y]; });
  Eigen::MatrixXd vec;
  if (vectors) vec = eigs.eigenvectors();
  if (vectors) out.vectors.resize(vec.rows(), ev.size());
  for (std::size_t i = 0; i < order.size(); ++i) {
    out.energies_ghz.push_back(ev[order[i]]);
    if (vectors) out.vectors.col(static_cast<Eigen::Index>(i)) = vec.col(order[i]);
  }
  return out;
}

}  // namespace gapwise
