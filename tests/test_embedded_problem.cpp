// The physical problem built from a logical one and an embedding.
//
// Source of the physics: minor embedding (Choi, Quantum Inf. Process. 7, 193
// (2008)). A state whose chains are all intact has the logical energy of the
// state it decodes to (with our offset rule exactly, not just up to a constant),
// and a strong enough ferromagnetic chain coupling makes every physical ground
// state intact, so each decodes to a logical ground state. The sufficient
// strength used here, max_v (|h_v| + sum_u |J_uv|), is derived in the method
// notes ("Embedded problems"); the checks below test that claim exhaustively
// over every physical basis state, and a weak-coupling control shows they can fail.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <random>
#include <set>

#include "io/embedding_file.hpp"
#include "io/problem_file.hpp"
#include "problem/chain_decoding.hpp"
#include "problem/classical_spectrum.hpp"
#include "problem/embedding.hpp"

using namespace gapwise;

namespace {

// A frustrated antiferromagnetic triangle on a six-qubit ring with one chord:
// chains [0,1], [2,3], [4,5]; ring couplers 1-2 (v0-v1), 3-4 (v1-v2), 5-0
// (v2-v0), and the chord 0-3 which gives v0-v1 a second coupler.
const char* kRingEmbedding =
    "format = \"gapwise-embedding\"\n"
    "chains = [[0, 1], [2, 3], [4, 5]]\n"
    "couplers = [[0, 1], [1, 2], [2, 3], [3, 4], [4, 5], [5, 0], [0, 3]]\n";

IsingProblem triangle() {
  return parse_problem_text("qubits = 3\nfields = [0.3, -0.1, 0.05]\n"
                            "couplings = [[0, 1, 1.0], [1, 2, 1.0], [0, 2, 1.0]]\noffset = 0.25\n",
                            "tri.toml")
      .ising;
}

double coupling_value(const IsingProblem& p, int i, int j) {
  for (const auto& c : p.couplings)
    if (c.i == i && c.j == j) return c.value;
  return 0.0;
}

// The intact physical state whose chains all carry the bits of logical state x.
BasisIndex intact_state(const Embedding& e, BasisIndex x) {
  BasisIndex b = 0;
  for (int v = 0; v < e.logical_qubits(); ++v)
    if ((x >> v) & 1U)
      for (int q : e.chains[static_cast<std::size_t>(v)]) b |= BasisIndex{1} << q;
  return b;
}

IsingProblem random_problem(int n, const std::vector<std::pair<int, int>>& edges, std::mt19937& rng) {
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  IsingProblem p(n);
  for (auto& h : p.h) h = u(rng);
  for (const auto& [i, j] : edges) p.couplings.push_back({i, j, u(rng)});
  return p;
}

struct GroundCheck {
  bool all_intact = true;
  bool all_decode_to_ground = true;
  bool covers_logical_ground = true;
};

// Enumerates every physical basis state: which physical ground states are
// intact, and whether their decoded states are exactly the logical ground set.
GroundCheck check_ground_states(const IsingProblem& logical, const Embedding& e, double chain_coupling) {
  const IsingProblem phys = embed_problem(logical, e, chain_coupling).physical;
  const GroundManifold lg = find_ground_manifold(logical), pg = find_ground_manifold(phys);
  GroundCheck c;
  std::set<BasisIndex> decoded;
  for (BasisIndex b : pg.states) {
    const ChainReadout r = decode_majority(b, e);
    c.all_intact = c.all_intact && r.broken_chains == 0;
    c.all_decode_to_ground = c.all_decode_to_ground && lg.contains(r.logical);
    decoded.insert(r.logical);
  }
  c.covers_logical_ground = decoded == std::set<BasisIndex>(lg.states.begin(), lg.states.end());
  return c;
}

}  // namespace

TEST_CASE("split rules: fields over chain qubits, couplings over inter-chain couplers, ferromagnetic chains") {
  const IsingProblem logical = triangle();
  const Embedding e = parse_embedding_text(kRingEmbedding, "ring.toml");
  check_embedding_serves(e, logical, "tri.toml");
  const EmbeddedProblem ep = embed_problem(logical, e, 2.0);
  const IsingProblem& p = ep.physical;
  REQUIRE(p.qubits == 6);
  CHECK(ep.scale == 1.0);
  CHECK(ep.intra_chain_couplers == 3);
  CHECK(ep.inter_chain_couplers == 4);
  // h_v / |chain| on each qubit of chain v.
  const std::vector<double> h = {0.15, 0.15, -0.05, -0.05, 0.025, 0.025};
  for (int q = 0; q < 6; ++q) CHECK(p.h[static_cast<std::size_t>(q)] == doctest::Approx(h[static_cast<std::size_t>(q)]));
  // J_01 = 1 shared by couplers 1-2 and 0-3; J_12 and J_02 have one coupler each.
  CHECK(coupling_value(p, 1, 2) == doctest::Approx(0.5));
  CHECK(coupling_value(p, 0, 3) == doctest::Approx(0.5));
  CHECK(coupling_value(p, 3, 4) == doctest::Approx(1.0));
  CHECK(coupling_value(p, 0, 5) == doctest::Approx(1.0));
  for (auto [a, b] : {std::pair{0, 1}, std::pair{2, 3}, std::pair{4, 5}}) CHECK(coupling_value(p, a, b) == -2.0);
  CHECK(p.couplings.size() == 7);
  CHECK(p.labels[3] == "q1.1");
  // Offset rule: logical offset plus the chain coupling per intra-chain coupler.
  CHECK(p.offset == doctest::Approx(0.25 + 3 * 2.0));
  // Minor embedding (Choi 2008): an intact state carries exactly the logical energy.
  for (BasisIndex x = 0; x < 8; ++x)
    CHECK(p.energy(intact_state(e, x)) == doctest::Approx(logical.energy(x)).epsilon(1e-14));
  // The physical problem is an ordinary problem file too, and reads back the same.
  const IsingProblem back = parse_problem_text(format_problem_toml(p), "phys.toml").ising;
  for (BasisIndex b = 0; b < 64; ++b) CHECK(back.energy(b) == p.energy(b));
}

TEST_CASE("the term limit scales the whole physical problem, and the logical one under the same limit") {
  const IsingProblem logical = triangle();
  const Embedding e = parse_embedding_text(kRingEmbedding, "ring.toml");
  const EmbeddedProblem ep = embed_problem(logical, e, ChainStrength::relative_to_largest(4.0), 1.0);
  CHECK(ep.chain_coupling == 4.0);
  CHECK(ep.scale == doctest::Approx(0.25));
  CHECK(ep.physical.largest_term() == doctest::Approx(1.0));
  for (BasisIndex x = 0; x < 8; ++x)
    CHECK(ep.physical.energy(intact_state(e, x)) == doctest::Approx(0.25 * logical.energy(x)).epsilon(1e-14));
  double s = 0.0;
  const IsingProblem limited = limit_terms(logical, 0.5, &s);
  CHECK(s == 0.5);
  CHECK(limited.largest_term() == doctest::Approx(0.5));
  CHECK(limit_terms(logical, 3.0, &s).largest_term() == 1.0);  // already within the limit: unchanged
  CHECK(s == 1.0);
  CHECK_THROWS_AS(limit_terms(logical, -1.0), InputError);
}

TEST_CASE("the sufficient chain coupling of the method notes") {
  // Triangle: v0 carries |0.3| + 1 + 1 = 2.3, v1 2.1, v2 2.05.
  CHECK(chain_coupling_bound(triangle()) == doctest::Approx(2.3));
  CHECK(chain_coupling_bound(IsingProblem(2)) == 0.0);
}

TEST_CASE("exhaustively: above the sufficient chain coupling every physical ground state is intact and decodes to "
          "a logical ground state (Choi 2008)") {
  struct Layout {
    const char* name;
    int logical;
    std::vector<std::pair<int, int>> edges;  // logical couplings
    std::string embedding;
  };
  const std::vector<Layout> layouts = {
      {"triangle on a ring with a chord", 3, {{0, 1}, {1, 2}, {0, 2}}, kRingEmbedding},
      {"complete graph K4 on eight qubits", 4, {{0, 1}, {0, 2}, {0, 3}, {1, 2}, {1, 3}, {2, 3}},
       "format = \"gapwise-embedding\"\nchains = [[0, 1], [2, 3], [4, 5], [6, 7]]\n"
       "couplers = [[0, 1], [2, 3], [4, 5], [6, 7], [1, 2], [0, 4], [5, 0], [1, 7], [3, 4], [2, 6], [5, 6]]\n"},
      {"a three-qubit chain written out of order, complete physical graph", 3, {{0, 1}, {0, 2}, {1, 2}},
       "format = \"gapwise-embedding\"\nchains = [[2, 0, 1], [3], [4]]\n"},
      {"a path of length four as a chain", 2, {{0, 1}},
       "format = \"gapwise-embedding\"\nchains = [[0, 1, 2, 3], [4, 5]]\n"
       "couplers = [[0, 1], [1, 2], [2, 3], [3, 4], [4, 5], [0, 5]]\n"},
  };
  std::mt19937 rng(20260702);
  int broken_below = 0, wrong_below = 0, checked = 0;
  for (const auto& layout : layouts) {
    const Embedding e = parse_embedding_text(layout.embedding, "layout.toml");
    for (int trial = 0; trial < 25; ++trial) {
      const IsingProblem logical = random_problem(layout.logical, layout.edges, rng);
      check_embedding_serves(e, logical, "random");
      INFO(layout.name << ", trial " << trial);
      const GroundCheck strong = check_ground_states(logical, e, 1.01 * chain_coupling_bound(logical));
      CHECK(strong.all_intact);
      CHECK(strong.all_decode_to_ground);
      CHECK(strong.covers_logical_ground);
      ++checked;
      // Control: a chain coupling far below the bound (a twentieth of it).
      const GroundCheck weak = check_ground_states(logical, e, 0.05 * chain_coupling_bound(logical));
      broken_below += !weak.all_intact;
      wrong_below += !weak.all_decode_to_ground;
    }
  }
  CHECK(checked == 100);
  // The control shows the exhaustive check can fail: with weak chains some
  // physical ground states are broken, and some decode to a wrong logical state.
  MESSAGE("weak chains: " << broken_below << " of 100 problems have a broken ground state, " << wrong_below
                          << " a wrongly decoded one");
  CHECK(broken_below > 10);
  CHECK(wrong_below > 0);
}
