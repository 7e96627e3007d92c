// Decoding physical outcomes by majority vote per chain (common practice for
// minor-embedded problems, no single source), with our documented tie rule: a
// tied chain takes the spin of its first qubit as written. Every expected value
// below is worked out by hand from the outcome written beside it.
#include <doctest/doctest.h>

#include <algorithm>
#include <vector>

#include "problem/chain_decoding.hpp"

using namespace gapwise;

namespace {

// Chains of sizes 3, 2 and 1; chain 1 is written [4, 3] so that its first
// qubit (the tie breaker) is qubit 4, not the lower index.
Embedding mixed_chains() {
  Embedding e;
  e.chains = {{0, 1, 2}, {4, 3}, {5}};
  e.physical_qubits = 6;
  return e;
}

// Physical basis index from bits written qubit 0 first, e.g. "110010".
BasisIndex from_bits(const char* bits) {
  BasisIndex b = 0;
  for (int i = 0; bits[i]; ++i)
    if (bits[i] == '1') b |= BasisIndex{1} << i;
  return b;
}

}  // namespace

TEST_CASE("majority vote, ties to the first qubit written, and broken-chain counts on hand-made outcomes") {
  const Embedding e = mixed_chains();
  struct Case {
    const char* physical;  // bits q0..q5
    const char* logical;   // expected decoded bits v0..v2
    int broken, tied;
  };
  const std::vector<Case> cases = {
      {"000000", "000", 0, 0},  // all chains intact, all spin +1
      {"111111", "111", 0, 0},  // all intact, all spin -1
      {"110000", "100", 1, 0},  // chain 0 votes 2:1 for bit 1
      {"100000", "000", 1, 0},  // chain 0 votes 1:2 for bit 0
      {"000100", "000", 1, 1},  // chain 1: q3 = 1, q4 = 0, tie -> first written qubit q4 -> 0
      {"000010", "010", 1, 1},  // chain 1: q3 = 0, q4 = 1, tie -> q4 -> 1
      {"011101", "101", 2, 1},  // chain 0 2:1 -> 1; chain 1 tied -> q4 = 0; chain 2 -> 1
      {"001011", "011", 2, 1},  // chain 0 1:2 -> 0; chain 1 tied -> q4 = 1; chain 2 -> 1
  };
  for (const auto& c : cases) {
    INFO("physical " << c.physical);
    const ChainReadout r = decode_majority(from_bits(c.physical), e);
    CHECK(bits_string(r.logical, 3) == c.logical);
    CHECK(r.broken_chains == c.broken);
    CHECK(r.tied_chains == c.tied);
  }
}

TEST_CASE("decoded statistics of a hand-made distribution") {
  const Embedding e = mixed_chains();
  std::vector<double> p(64, 0.0);
  p[from_bits("000000")] = 0.40;  // intact, decodes 000
  p[from_bits("110000")] = 0.25;  // chain 0 broken, decodes 100
  p[from_bits("000100")] = 0.20;  // chain 1 broken (tie), decodes 000
  p[from_bits("011101")] = 0.15;  // chains 0 and 1 broken (tie in 1), decodes 101
  GroundManifold logical;  // logical ground states 000 and 101
  logical.states = {from_bits("000"), from_bits("101")};
  GroundManifold physical;  // physical ground state: the intact 000000 alone
  physical.states = {from_bits("000000")};
  const DecodedOutcomes d = decode_distribution(p, e, logical, physical);
  CHECK(d.logical_ground_probability == doctest::Approx(0.40 + 0.20 + 0.15).epsilon(1e-14));
  CHECK(d.physical_ground_probability == doctest::Approx(0.40).epsilon(1e-14));
  CHECK(d.mean_broken_fraction == doctest::Approx((0.25 * 1 + 0.20 * 1 + 0.15 * 2) / 3.0).epsilon(1e-14));
  CHECK(d.any_break_probability == doctest::Approx(0.60).epsilon(1e-14));
  CHECK(d.tie_probability == doctest::Approx(0.35).epsilon(1e-14));
  CHECK_THROWS_AS(decode_distribution(std::vector<double>(32, 0.0), e, logical, physical), std::invalid_argument);
}

TEST_CASE("the logical success set is exactly the physical states decoding to a logical ground state") {
  const Embedding e = mixed_chains();
  GroundManifold logical;
  logical.states = {from_bits("010")};
  const auto states = states_decoding_to(e, logical);
  // Chain 0 must decode 0 (at most one of q0..q2 set: 4 ways), chain 1 must
  // decode 1 (q4 = 1 with q3 anything, or both set: the tie rule gives q3 = 1,
  // q4 = 0 to 0, so 2 ways), chain 2 must be 0 (1 way): 4 * 2 * 1 = 8 states.
  CHECK(states.size() == 8);
  for (BasisIndex b : states) CHECK(decode_majority(b, e).logical == from_bits("010"));
  CHECK(std::is_sorted(states.begin(), states.end()));
}
