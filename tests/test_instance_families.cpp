// Instance families: graphs, reproducible seeding, coupling distributions, and
// the planted-solution guarantee of the frustrated-loop construction.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <random>
#include <set>

#include "io/input_error.hpp"
#include "problem/classical_spectrum.hpp"
#include "problem/instance_families.hpp"
#include "problem/planted_loops.hpp"
#include "problem/seeded_random.hpp"

using namespace gapwise;

TEST_CASE("graphs have the textbook edge counts") {
  // Common practice (graph theory): a ring on n vertices has n edges, the complete
  // graph n(n-1)/2, an open r x c grid r(c-1) + c(r-1).
  CHECK(make_graph(GraphKind::Ring, 7, 0, 1).size() == 7);
  CHECK(make_graph(GraphKind::Complete, 9, 0, 1).size() == 36);
  CHECK(make_graph(GraphKind::SquareLattice, 12, 0, 1).size() == 3 * 3 + 4 * 2);  // 3 x 4
  CHECK(make_graph(GraphKind::SquareLattice, 14, 0, 1).size() == 2 * 6 + 7 * 1);  // 2 x 7
  CHECK_THROWS_AS(make_graph(GraphKind::SquareLattice, 13, 0, 1), InputError);
  CHECK_THROWS_AS(make_graph(GraphKind::Ring, 2, 0, 1), InputError);

  const auto g = make_graph(GraphKind::RingPlusChords, 10, 0.5, 42);
  CHECK(g.size() == 15);
  std::set<std::pair<int, int>> edges;
  for (const auto& e : g) {
    CHECK(e.i < e.j);
    edges.insert({e.i, e.j});
  }
  CHECK(edges.size() == g.size());
  for (int i = 0; i < 10; ++i) CHECK(edges.count(std::minmax(i, (i + 1) % 10)) == 1);
  // Asking for more chords than free pairs gives the complete graph.
  CHECK(make_graph(GraphKind::RingPlusChords, 5, 10.0, 3).size() == 10);
}

TEST_CASE("families are reproducible from the seed, instance by instance") {
  FamilySpec f;
  f.graph = GraphKind::RingPlusChords;
  f.couplings = CouplingKind::Gaussian;
  f.seed = 2026;
  const auto a = generate_family(f, {6, 8}, 5);
  const auto b = generate_family(f, {8}, 3);  // fewer instances, other sizes
  REQUIRE(a.size() == 10);
  // Instance (8, k) is the same whichever set it was drawn in.
  for (int k = 0; k < 3; ++k) {
    const auto& x = a[static_cast<std::size_t>(5 + k)].problem;
    const auto& y = b[static_cast<std::size_t>(k)].problem;
    REQUIRE(x.couplings.size() == y.couplings.size());
    for (std::size_t c = 0; c < x.couplings.size(); ++c) {
      CHECK(x.couplings[c].i == y.couplings[c].i);
      CHECK(x.couplings[c].value == y.couplings[c].value);  // bit for bit
    }
    CHECK(a[static_cast<std::size_t>(5 + k)].seed == b[static_cast<std::size_t>(k)].seed);
  }
  CHECK(a[0].name == "n06-000");
  CHECK(a[0].seed != a[1].seed);
  f.seed = 2027;
  CHECK(generate_instance(f, 6, 0).problem.couplings[0].value != a[0].problem.couplings[0].value);
}

TEST_CASE("coupling distributions: +-1 signs and standard normal moments") {
  FamilySpec f;
  f.graph = GraphKind::Complete;
  f.couplings = CouplingKind::PlusMinusOne;
  int plus = 0, total = 0;
  for (const auto& inst : generate_family(f, {20}, 10))
    for (const auto& c : inst.problem.couplings) {
      CHECK(std::abs(c.value) == 1.0);
      plus += c.value > 0;
      ++total;
    }
  // Binomial(1900, 1/2): standard deviation 21.8; allow 5 of them (common practice).
  CHECK(std::abs(plus - total / 2.0) < 5 * std::sqrt(total / 4.0));

  f.couplings = CouplingKind::Gaussian;
  double s1 = 0, s2 = 0, s4 = 0;
  int m = 0;
  for (const auto& inst : generate_family(f, {30}, 10))
    for (const auto& c : inst.problem.couplings) { s1 += c.value; s2 += c.value * c.value; s4 += std::pow(c.value, 4); ++m; }
  // N(0,1): mean 0, variance 1, fourth moment 3; tolerances about 5 standard errors.
  CHECK(m == 4350);
  CHECK(std::abs(s1 / m) < 5.0 / std::sqrt(m));
  CHECK(std::abs(s2 / m - 1.0) < 5.0 * std::sqrt(2.0 / m));
  CHECK(std::abs(s4 / m - 3.0) < 5.0 * std::sqrt(96.0 / m));
}

TEST_CASE("uniform_index is unbiased on a range that is not a power of two") {
  std::mt19937_64 rng(5);
  std::vector<int> counts(6, 0);
  const int draws = 60000;
  bool in_range = true;
  for (int k = 0; k < draws; ++k) {
    const auto v = uniform_index(rng, 6);
    in_range = in_range && v < 6;
    ++counts[std::min<std::size_t>(v, 5)];
  }
  CHECK(in_range);
  // Chi-square with 5 degrees of freedom: 20.5 is its 99.9 % point (standard tables).
  double chi2 = 0;
  for (int c : counts) chi2 += (c - draws / 6.0) * (c - draws / 6.0) / (draws / 6.0);
  CHECK(chi2 < 20.5);
}

TEST_CASE("planted instances: the known ground energy is the brute-force ground energy") {
  // Hen et al., Phys. Rev. A 92, 042325 (2015): a sum of frustrated loops, each
  // satisfied on all but one edge by the planted state, has that state as a
  // ground state with E_0 = sum over loops of (2 - L). Checked here against
  // exhaustive enumeration over all 2^n states.
  int checked = 0;
  for (GraphKind g : {GraphKind::Ring, GraphKind::RingPlusChords, GraphKind::SquareLattice, GraphKind::Complete})
    for (int n : {4, 6, 9, 12})
      for (std::uint64_t seed : {1u, 2u, 3u}) {
        if (g == GraphKind::SquareLattice && n == 4) continue;  // fine, but keep the loop short
        FamilySpec f;
        f.graph = g;
        f.couplings = CouplingKind::PlantedLoops;
        f.seed = seed;
        f.loops_per_qubit = g == GraphKind::Ring ? 0.5 : 1.0;
        const Instance inst = generate_instance(f, n, 0);
        REQUIRE(inst.planted_energy);
        REQUIRE(inst.planted_state);
        const GroundManifold gm = find_ground_manifold(inst.problem);
        CAPTURE(graph_name(g));
        CAPTURE(n);
        CAPTURE(seed);
        CHECK(gm.energy == doctest::Approx(*inst.planted_energy).epsilon(1e-12));
        CHECK(inst.problem.energy(*inst.planted_state) == doctest::Approx(*inst.planted_energy).epsilon(1e-12));
        CHECK(gm.contains(*inst.planted_state));
        // h = 0: the global flip of the planted state is a ground state as well.
        const BasisIndex flipped = *inst.planted_state ^ ((BasisIndex{1} << n) - 1);
        CHECK(gm.contains(flipped));
        ++checked;
      }
  CHECK(checked == 45);
}

TEST_CASE("planted loops on a ring: every loop is the whole ring") {
  // On a ring the only cycle is the ring itself, so E_0 = M (2 - n) for M loops.
  std::mt19937_64 rng(11);
  const auto edges = make_graph(GraphKind::Ring, 8, 0, 1);
  const PlantedInstance p = plant_frustrated_loops(8, edges, 0.5, 0, rng);
  CHECK(p.loops == 4);
  for (int len : p.loop_lengths) CHECK(len == 8);
  CHECK(p.ground_energy == 4 * (2 - 8));
  CHECK(find_ground_manifold(p.problem).energy == doctest::Approx(p.ground_energy));
}

TEST_CASE("planted loops respect the ruggedness bound or say why not") {
  std::mt19937_64 rng(3);
  const auto edges = make_graph(GraphKind::Complete, 8, 0, 1);
  const PlantedInstance p = plant_frustrated_loops(8, edges, 1.0, 2, rng);
  for (const auto& c : p.problem.couplings) CHECK(std::abs(c.value) <= 2.0);
  CHECK(find_ground_manifold(p.problem).energy == doctest::Approx(p.ground_energy));
  // Twelve loops around one ring cannot stay within |J| <= 1.
  const auto ring = make_graph(GraphKind::Ring, 6, 0, 1);
  CHECK_THROWS_WITH_AS(plant_frustrated_loops(6, ring, 2.0, 1, rng), doctest::Contains("--ruggedness"), InputError);
  // A vertex of degree one lies on no loop.
  CHECK_THROWS_AS(plant_frustrated_loops(3, {{0, 1}, {1, 2}}, 1.0, 0, rng), InputError);
}
