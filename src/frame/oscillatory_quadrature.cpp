#include "frame/oscillatory_quadrature.hpp"

#include <algorithm>
#include <cmath>

namespace gapwise {

std::array<std::complex<double>, 3> oscillatory_moments(double beta) {
  using C = std::complex<double>;
  std::array<C, 3> mu{};
  if (std::abs(beta) < 0.5) {
    // Taylor series of exp(i beta x): sum_k (i beta)^k / (k! (j + k + 1)); |beta| < 0.5
    // makes the 20th term below 1e-25.
    C term(1.0, 0.0);
    for (int k = 0; k < 20; ++k) {
      for (int j = 0; j < 3; ++j) mu[static_cast<std::size_t>(j)] += term / static_cast<double>(j + k + 1);
      term *= C(0.0, beta) / static_cast<double>(k + 1);
    }
    return mu;
  }
  // Integration by parts: mu_j = (e^{i beta} - j mu_{j-1}) / (i beta); the
  // cancellation costs at most a factor 1/|beta|^2 <= 4 in rounding here.
  const C e = std::polar(1.0, beta);
  const C ib(0.0, beta);
  mu[0] = (e - 1.0) / ib;
  mu[1] = (e - mu[0]) / ib;
  mu[2] = (e - 2.0 * mu[1]) / ib;
  return mu;
}

std::pair<std::complex<double>, std::complex<double>> linear_oscillatory_weights(const PhasePolynomial& d,
                                                                                 double curvature_bound) {
  using C = std::complex<double>;
  // |d''| <= 2|c2| + 6|c3| + 12|c4| on [0, 1].
  const double curv = 2.0 * std::abs(d.c[2]) + 6.0 * std::abs(d.c[3]) + 12.0 * std::abs(d.c[4]);
  const double want = std::ceil(std::sqrt(curv / curvature_bound));
  const int m = static_cast<int>(std::clamp(want, 1.0, 1048576.0));
  const double w = 1.0 / m;
  C w0(0.0, 0.0), w1(0.0, 0.0);
  double d_left = d.at(0.0);
  for (int i = 0; i < m; ++i) {
    const double u = i * w;
    const double d_right = d.at(u + w);
    const double d_mid = d.at(u + 0.5 * w);
    const double beta = d_right - d_left;
    const C rem = std::polar(1.0, d_mid - d_left - 0.5 * beta);  // exp(i r(1/2)); r(0) = r(1) = 0
    const auto mu = oscillatory_moments(beta);
    const C scale = w * std::polar(1.0, d_left);
    // Quadratic through g(0), g(1/2), g(1): q0 + q1 x + q2 x^2.
    auto integral = [&](double g0, double gm_real, double g1) {
      const C gm = gm_real * rem;
      const C q1 = -3.0 * g0 + 4.0 * gm - g1;
      const C q2 = 2.0 * g0 - 4.0 * gm + 2.0 * g1;
      return scale * (g0 * mu[0] + q1 * mu[1] + q2 * mu[2]);
    };
    w0 += integral(1.0 - u, 1.0 - u - 0.5 * w, 1.0 - u - w);
    w1 += integral(u, u + 0.5 * w, u + w);
    d_left = d_right;
  }
  return {w0, w1};
}

}  // namespace gapwise
