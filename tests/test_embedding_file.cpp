// The embedding file and every validation error it can raise. What a valid
// minor embedding is comes from its definition (Choi, Quantum Inf. Process. 7,
// 193 (2008)): chains are disjoint, each chain is connected in the physical
// graph, and every logical edge is served by at least one physical edge
// between the two chains. The other checks (format, keys, numbers) are the
// project's own input contract: each error must name the file, the line, the
// key and a fix.
#include <doctest/doctest.h>

#include <string>

#include "io/embedding_file.hpp"
#include "test_support.hpp"
#include "io/problem_file.hpp"
#include "problem/embedding.hpp"

using namespace gapwise;

namespace {

const std::string kHeader = "format = \"gapwise-embedding\"\nformat_version = 1\n";

void check_error(const std::string& text, const std::string& key, int line, const std::string& words) {
  const auto err = testing::input_error_of([&] { parse_embedding_text(text, "emb.toml"); });
  REQUIRE_MESSAGE(err, "expected an InputError for:\n" << text);
  const InputError& e = *err;
  INFO("message: " << e.what());
  CHECK(e.place().file == "emb.toml");
  CHECK(e.place().key == key);
  CHECK(e.place().line == line);
  CHECK(e.problem().find(words) != std::string::npos);
  CHECK_FALSE(e.fix().empty());
}

const char* kTriangle =
    "format = \"gapwise-problem\"\nqubits = 3\nfields = [0.3, -0.1, 0.05]\n"
    "couplings = [[0, 1, 1.0], [1, 2, 1.0], [0, 2, 1.0]]\n";

}  // namespace

TEST_CASE("a valid embedding file is read with every key") {
  const Embedding e = parse_embedding_text(kHeader +
                                               "description = \"ring\"\n"
                                               "physical_qubits = 6\n"
                                               "chains = [[0, 1], [2, 3], [4, 5]]\n"
                                               "couplers = [[0, 1], [2, 1], [2, 3], [3, 4], [4, 5], [5, 0]]\n"
                                               "chain_strength_relative = 2.5\n"
                                               "term_limit = 1.0\n",
                                           "emb.toml");
  CHECK(e.description == "ring");
  CHECK(e.physical_qubits == 6);
  REQUIRE(e.logical_qubits() == 3);
  CHECK(e.chains[1] == std::vector<int>{2, 3});
  CHECK(e.couplers_given);
  REQUIRE(e.couplers.size() == 6);
  CHECK(e.couplers[1] == std::pair<int, int>{1, 2});  // stored in order
  CHECK(e.couplers[5] == std::pair<int, int>{0, 5});
  REQUIRE(e.chain_strength);
  CHECK(e.chain_strength->relative);
  CHECK(e.chain_strength->value == 2.5);
  REQUIRE(e.term_limit);
  CHECK(*e.term_limit == 1.0);
  CHECK(e.chain_place(2).line == 5);
  CHECK(e.coupler_place(3).line == 6);
  // The owner map and the coupler queries follow from the lists.
  CHECK(e.owner_of_qubits() == std::vector<int>{0, 0, 1, 1, 2, 2});
  CHECK(e.couplers_within(0) == std::vector<std::pair<int, int>>{{0, 1}});
  CHECK(e.couplers_between(0, 2) == std::vector<std::pair<int, int>>{{0, 5}});
  CHECK(e.coupler_available(5, 0));
  CHECK_FALSE(e.coupler_available(0, 3));
}

TEST_CASE("without a coupler list every physical pair is available") {
  const Embedding e = parse_embedding_text(kHeader + "chains = [[0, 2, 1], [3]]\nchain_strength = 1.5\n", "emb.toml");
  CHECK_FALSE(e.couplers_given);
  CHECK(e.physical_qubits == 4);
  CHECK(e.couplers_within(0) == std::vector<std::pair<int, int>>{{0, 1}, {0, 2}, {1, 2}});
  CHECK(e.couplers_between(0, 1).size() == 3);
  REQUIRE(e.chain_strength);
  CHECK_FALSE(e.chain_strength->relative);
  CHECK(e.chain_strength->value == 1.5);
}

TEST_CASE("format, version, syntax and unknown keys") {
  check_error("format = \"gapwise-embedding\"\nchains = [[0]\n", "", 2, "TOML syntax error");
  check_error("chains = [[0]]\n", "format", 1, "required key is missing");
  check_error("format = \"gapwise-problem\"\nchains = [[0]]\n", "format", 1, "not a gapwise embedding file");
  check_error("format = \"gapwise-embedding\"\nformat_version = 7\nchains = [[0]]\n", "format_version", 2,
              "format_version 7");
  check_error(kHeader + "chains = [[0]]\nchain_strenght = 2\n", "chain_strenght", 4, "unknown key");
}

TEST_CASE("chain list errors name the chain and its line") {
  check_error(kHeader + "description = \"x\"\n", "chains", 1, "required key is missing");
  check_error(kHeader + "chains = []\n", "chains", 3, "chain list is empty");
  check_error(kHeader + "chains = [[0], 1]\n", "chains[1]", 3, "expected a list of physical qubit indices");
  check_error(kHeader + "chains = [\n  [0, 1],\n  [],\n]\n", "chains[1]", 5, "chain 1 is empty");
  check_error(kHeader + "chains = [[0, -1]]\n", "chains[0][1]", 3, "negative");
  check_error(kHeader + "chains = [[0, 1.5]]\n", "chains[0][1]", 3, "expected an integer");
  check_error(kHeader + "chains = [[0, 64]]\n", "chains[0][1]", 3, "beyond what gapwise can simulate");
}

TEST_CASE("chains must be disjoint, cover every physical qubit and be connected (Choi 2008)") {
  // A qubit in two chains.
  check_error(kHeader + "chains = [\n  [0, 1],\n  [1, 2],\n]\n", "chains[1]", 5, "chains must be disjoint");
  // A qubit twice in one chain.
  check_error(kHeader + "chains = [[0, 0], [1]]\n", "chains[0]", 3, "appears twice in chain 0");
  // An idle physical qubit (qubit 2 is in no chain).
  check_error(kHeader + "chains = [[0, 1], [3]]\n", "chains", 3, "physical qubit 2 belongs to no chain");
  // physical_qubits is only a check, and it must agree.
  check_error(kHeader + "physical_qubits = 5\nchains = [[0, 1], [2]]\n", "physical_qubits", 3,
              "physical_qubits = 5");
  // A chain that falls apart under the coupler list: 0-1 joined, 2 alone.
  check_error(kHeader + "chains = [\n  [0, 1, 2],\n  [3],\n]\ncouplers = [[0, 1], [2, 3]]\n", "chains[0]", 4,
              "not connected under the couplers");
}

TEST_CASE("coupler list errors name the coupler and its line") {
  check_error(kHeader + "chains = [[0], [1]]\ncouplers = [[0, 1], 3]\n", "couplers[1]", 4, "expected a pair");
  check_error(kHeader + "chains = [[0], [1]]\ncouplers = [[0, 1, 2]]\n", "couplers[0]", 4, "must be a pair");
  check_error(kHeader + "chains = [[0], [1]]\ncouplers = [\n  [0, 1],\n  [1, 1],\n]\n", "couplers[1]", 6,
              "joins a qubit to itself");
  check_error(kHeader + "chains = [[0], [1]]\ncouplers = [\n  [0, 1],\n  [1, 0],\n]\n", "couplers[1]", 6,
              "listed twice");
  check_error(kHeader + "chains = [[0], [1]]\ncouplers = [[0, 2]]\n", "couplers[0]", 4, "out of range");
}

TEST_CASE("chain strength and term limit errors") {
  check_error(kHeader + "chains = [[0]]\nchain_strength = 1.0\nchain_strength_relative = 2.0\n",
              "chain_strength_relative", 5, "both chain_strength and chain_strength_relative");
  check_error(kHeader + "chains = [[0]]\nchain_strength = -1.0\n", "chain_strength", 4, "not positive");
  check_error(kHeader + "chains = [[0]]\nchain_strength_relative = 0\n", "chain_strength_relative", 4,
              "not positive");
  check_error(kHeader + "chains = [[0]]\nterm_limit = 0.0\n", "term_limit", 4, "not positive");
  check_error(kHeader + "chains = [[0]]\nterm_limit = \"big\"\n", "term_limit", 4, "expected a number");
}

TEST_CASE("an embedding must fit its logical problem: chain count and served couplings (Choi 2008)") {
  const IsingProblem triangle = parse_problem_text(kTriangle, "tri.toml").ising;
  // Two chains for three logical qubits.
  const Embedding two = parse_embedding_text(kHeader + "chains = [[0, 1], [2]]\n", "emb.toml");
  const auto count = testing::input_error_of([&] { check_embedding_serves(two, triangle, "tri.toml"); });
  REQUIRE(count);
  CHECK(count->place().key == "chains");
  CHECK(count->place().line == 3);
  CHECK(count->problem().find("2 chains but the problem tri.toml has 3 logical qubits") != std::string::npos);
  // A six-qubit ring with chains of two: the logical coupling (0, 2) needs the
  // ring coupler 5-0; leave it out and the coupling is not served.
  const std::string chains = "chains = [[0, 1], [2, 3], [4, 5]]\n";
  const Embedding open_ring = parse_embedding_text(
      kHeader + chains + "couplers = [[0, 1], [1, 2], [2, 3], [3, 4], [4, 5]]\n", "emb.toml");
  const auto unserved = testing::input_error_of([&] { check_embedding_serves(open_ring, triangle, "tri.toml"); });
  REQUIRE(unserved);
  INFO(unserved->what());
  CHECK(unserved->place().key == "couplers");
  CHECK(unserved->place().line == 4);
  CHECK(unserved->problem().find("logical coupling 2 (q0, q2) of tri.toml has no physical coupler between chain 0 "
                                 "[0, 1] and chain 2 [4, 5]") != std::string::npos);
  CHECK(unserved->fix().find("add a coupler") != std::string::npos);
  const Embedding ring = parse_embedding_text(
      kHeader + chains + "couplers = [[0, 1], [1, 2], [2, 3], [3, 4], [4, 5], [5, 0]]\n", "emb.toml");
  CHECK_NOTHROW(check_embedding_serves(ring, triangle, "tri.toml"));
  // A zero logical coupling needs no service.
  IsingProblem weak = triangle;
  weak.couplings[2].value = 0.0;
  CHECK_NOTHROW(check_embedding_serves(open_ring, weak, "tri.toml"));
}

TEST_CASE("a relative chain strength needs a logical term; an absolute one must be positive") {
  const IsingProblem empty(2);
  const SourcePlace where{"emb.toml", 4, 1, "chain_strength_relative"};
  const auto relative = testing::input_error_of([&] { ChainStrength::relative_to_largest(2.0).resolve(empty, where); });
  REQUIRE(relative);
  CHECK(relative->place().line == 4);
  CHECK(relative->fix().find("absolute") != std::string::npos);
  CHECK_THROWS_AS(ChainStrength::absolute(0.0).resolve(empty, where), InputError);
  CHECK(ChainStrength::absolute(1.25).resolve(empty, where) == 1.25);
  const IsingProblem triangle = parse_problem_text(kTriangle, "tri.toml").ising;
  CHECK(ChainStrength::relative_to_largest(2.0).resolve(triangle) == 2.0);
}

TEST_CASE("embeddings built in code are validated the same way") {
  Embedding e;
  e.chains = {{0, 1}, {2}};
  e.physical_qubits = 3;
  e.couplers_given = true;
  e.couplers = {{1, 0}};
  CHECK_THROWS_WITH_AS(validate_embedding(e), doctest::Contains("not stored in order"), InputError);
  e.couplers = {{0, 1}, {1, 2}};
  CHECK_NOTHROW(validate_embedding(e));
  e.chains = {};
  CHECK_THROWS_WITH_AS(validate_embedding(e), doctest::Contains("no chains"), InputError);
}
