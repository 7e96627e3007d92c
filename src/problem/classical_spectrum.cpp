#include "problem/classical_spectrum.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

namespace gapwise {

std::vector<double> problem_diagonal(const IsingProblem& problem) {
  const int n = problem.qubits;
  const std::size_t dim = std::size_t{1} << n;
  std::vector<double> d(dim, 0.0);
  // Each term is added with a branch-free sign so the loop vectorizes.
#pragma omp parallel for schedule(static) if (dim > 4096)
  for (std::size_t b = 0; b < dim; ++b) {
    double e = 0.0;
    for (int i = 0; i < n; ++i) e += problem.h[static_cast<std::size_t>(i)] * spin_of(b, i);
    for (const auto& c : problem.couplings)
      e += c.value * (1 - 2 * static_cast<int>(((b >> c.i) ^ (b >> c.j)) & 1U));
    d[b] = e;
  }
  return d;
}

bool GroundManifold::contains(BasisIndex b) const {
  return std::binary_search(states.begin(), states.end(), b);
}

double classical_energy_tolerance(const IsingProblem& problem) {
  double sum = 0.0, smallest = std::numeric_limits<double>::infinity();
  int terms = 0;
  auto term = [&](double c) {
    if (c == 0.0) return;
    sum += std::abs(c);
    smallest = std::min(smallest, std::abs(c));
    ++terms;
  };
  for (double h : problem.h) term(h);
  for (const auto& c : problem.couplings) term(c.value);
  if (terms == 0) return std::numeric_limits<double>::min();  // every energy is exactly 0
  const double rounding = 8.0 * terms * std::numeric_limits<double>::epsilon() * sum;
  return std::max(1e-9 * smallest, rounding);
}

GroundManifold find_ground_manifold(const IsingProblem& problem, const std::vector<double>& diagonal) {
  GroundManifold gm;
  double emin = std::numeric_limits<double>::infinity();
  for (double e : diagonal) emin = std::min(emin, e);
  gm.tolerance = classical_energy_tolerance(problem);
  gm.energy = emin + problem.offset;
  double next = std::numeric_limits<double>::infinity();
  for (std::size_t b = 0; b < diagonal.size(); ++b) {
    if (diagonal[b] <= emin + gm.tolerance) gm.states.push_back(b);
    else next = std::min(next, diagonal[b]);
  }
  gm.first_excited_energy = std::isfinite(next) ? next + problem.offset : gm.energy;
  return gm;
}

GroundManifold find_ground_manifold(const IsingProblem& problem) {
  return find_ground_manifold(problem, problem_diagonal(problem));
}

}  // namespace gapwise
