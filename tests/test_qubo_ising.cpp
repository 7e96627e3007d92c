// QUBO <-> Ising with x_i = z_i = (1 - s_i)/2 is exact, offset included: the
// energies agree on every basis state (identity of the substitution; common practice).
#include <doctest/doctest.h>

#include <random>

#include "problem/ising_problem.hpp"

using namespace gapwise;

TEST_CASE("QUBO and its Ising form have equal energies on every state of random small problems") {
  std::mt19937_64 rng(12345);
  std::normal_distribution<double> g(0.0, 1.0);
  std::bernoulli_distribution keep(0.6);
  for (int trial = 0; trial < 50; ++trial) {
    const int n = 1 + trial % 7;
    QuboProblem q;
    q.variables = n;
    q.offset = g(rng);
    for (int i = 0; i < n; ++i)
      for (int j = i; j < n; ++j)
        if (keep(rng)) q.terms.push_back({i, j, g(rng)});
    const IsingProblem is = qubo_to_ising(q);
    const QuboProblem back = ising_to_qubo(is);
    for (BasisIndex b = 0; b < (BasisIndex{1} << n); ++b) {
      CHECK(is.energy(b) == doctest::Approx(q.energy(b)).epsilon(1e-12));
      CHECK(back.energy(b) == doctest::Approx(q.energy(b)).epsilon(1e-12));
    }
  }
}

TEST_CASE("A hand-checked QUBO: x0 + x1 - 2 x0 x1 (XOR-like) maps to a ferromagnetic pair") {
  // E = x0 + x1 - 2 x0 x1: 0 for 00 and 11, 1 for 01 and 10.
  QuboProblem q{2, {{0, 0, 1.0}, {1, 1, 1.0}, {0, 1, -2.0}}, 0.0};
  const IsingProblem is = qubo_to_ising(q);
  // x = (1 - s)/2: E = 1/2 - s0 s1 / 2, so J = -1/2 (ferromagnetic), h = 0, offset 1/2.
  REQUIRE(is.couplings.size() == 1);
  CHECK(is.couplings[0].value == doctest::Approx(-0.5));
  CHECK(is.h[0] == doctest::Approx(0.0));
  CHECK(is.h[1] == doctest::Approx(0.0));
  CHECK(is.offset == doctest::Approx(0.5));
}
