#pragma once
// Integrals of a linear function against a fast oscillating phase factor, the
// weights of a Filon-type (modified Magnus) step in the interaction picture:
//
//   w0 = int_0^1 (1 - x) exp(i d(x)) dx,   w1 = int_0^1 x exp(i d(x)) dx,
//
// d(x) a real polynomial of degree <= 4 (the difference of two integrated
// dynamical phases over one grid interval). The phase may turn by 1e4 rad and
// more over [0, 1]: [0, 1] is cut into m pieces on which d is close to linear
// (|d''| w^2 <= curvature_bound), the linear part of the phase is integrated
// exactly (moments of exp(i beta x)) and the small remainder exp(i r(x)) times
// the linear function is interpolated by a quadratic (Filon's idea: exact
// oscillatory weights, polynomial interpolation of the smooth part; Filon,
// Proc. R. Soc. Edinburgh 49, 38 (1928); Iserles, BIT 42, 561 (2002); from
// memory). Cost: m ~ sqrt(max |d''| / curvature_bound), independent of how
// many times the phase turns.
//
//   PhasePolynomial d{{0.0, 300.0, 2.0, 0.0, 0.0}};   // d(x) = 300 x + 2 x^2
//   auto [w0, w1] = linear_oscillatory_weights(d);
#include <array>
#include <complex>
#include <utility>

namespace gapwise {

struct PhasePolynomial {
  std::array<double, 5> c{};  ///< d(x) = c0 + c1 x + ... + c4 x^4
  double at(double x) const { return c[0] + x * (c[1] + x * (c[2] + x * (c[3] + x * c[4]))); }
};

/// Moments mu_j = int_0^1 x^j exp(i beta x) dx, j = 0, 1, 2 (series for small |beta|).
std::array<std::complex<double>, 3> oscillatory_moments(double beta);

/// {w0, w1} as above; relative error about curvature_bound^2 / 100.
std::pair<std::complex<double>, std::complex<double>> linear_oscillatory_weights(const PhasePolynomial& d,
                                                                                 double curvature_bound = 0.002);

}  // namespace gapwise
