// The problem file: what it accepts, and every validation error naming the
// file, the line and the key, with a fix.
#include <doctest/doctest.h>

#include <string>

#include "io/input_error.hpp"
#include "io/problem_file.hpp"
#include "test_support.hpp"

using namespace gapwise;

namespace {

const char* kHeader = "format = \"gapwise-problem\"\nformat_version = 1\n";

// Parses `body` and returns the InputError it must raise.
InputError error_of(const std::string& body) {
  try {
    parse_problem_text(std::string(kHeader) + body, "bad.toml");
  } catch (const InputError& e) {
    return e;
  }
  FAIL("no InputError for:\n" << body);
  throw;  // unreachable
}

void check_error(const std::string& body, int line, const std::string& key, const std::string& words) {
  const InputError e = error_of(body);
  INFO(e.what());
  CHECK(e.place().file == "bad.toml");
  CHECK(e.place().line == line);
  CHECK(e.place().key == key);
  CHECK(std::string(e.what()).find(words) != std::string::npos);
  CHECK(std::string(e.what()).find("bad.toml:" + std::to_string(line)) == 0);
  CHECK(!e.fix().empty());
}

}  // namespace

TEST_CASE("A valid Ising file reads as written") {
  const ProblemFile f = parse_problem_text(std::string(kHeader) +
                                               "qubits = 3\nfields = [0.5, 0, -1]\ncouplings = [[0, 2, -1.5], [2, 1, 0.25]]\n"
                                               "offset = 2\nlabels = [\"x\", \"y\", \"z\"]\n",
                                           "ok.toml");
  const IsingProblem& p = f.ising;
  CHECK(p.qubits == 3);
  CHECK(p.h == std::vector<double>{0.5, 0.0, -1.0});
  REQUIRE(p.couplings.size() == 2);
  CHECK(p.couplings[1].i == 1);  // (2, 1) is stored as (1, 2)
  CHECK(p.couplings[1].j == 2);
  CHECK(p.offset == 2.0);
  CHECK(p.label(1) == "y");
  // E(bits 101): s = (-1, +1, -1): h.s = -0.5 + 0 + 1 = 0.5; J02 s0 s2 = -1.5; J12 s1 s2 = -0.25; + 2
  CHECK(p.energy(0b101) == doctest::Approx(0.5 - 1.5 - 0.25 + 2.0));
}

TEST_CASE("Sparse fields and a QUBO file") {
  const ProblemFile f = parse_problem_text(std::string(kHeader) + "qubits = 4\nfields = [[3, 0.2], [0, -0.1]]\n", "s.toml");
  CHECK(f.ising.h == std::vector<double>{-0.1, 0.0, 0.0, 0.2});
  const ProblemFile q = parse_problem_text(std::string(kHeader) + "kind = \"qubo\"\nqubits = 2\nterms = [[0, 0, 1], [0, 1, -2]]\n", "q.toml");
  CHECK(q.kind == "qubo");
  for (BasisIndex b = 0; b < 4; ++b) CHECK(q.ising.energy(b) == doctest::Approx(q.qubo.energy(b)));
}

TEST_CASE("Every validation error names file, line and key") {
  check_error("qubits = 2\ncolor = 3\n", 4, "color", "unknown key");
  check_error("qubits = 3\ncouplings = [[0, 1, 1.0],\n  [1, 0, 2.0]]\n", 5, "couplings[1]", "duplicate");
  check_error("qubits = 3\ncouplings = [[1, 1, 1.0]]\n", 4, "couplings[0]", "self-coupling");
  check_error("qubits = 3\ncouplings = [[0, 3, 1.0]]\n", 4, "couplings[0]", "out of range");
  check_error("qubits = 3\nfields = [[-1, 0.5]]\n", 4, "fields[0]", "out of range");
  check_error("qubits = 2\nfields = [0.5, nan]\n", 4, "fields[1]", "not finite");
  check_error("qubits = 2\ncouplings = [[0, 1, inf]]\n", 4, "couplings[0]", "not finite");
  check_error("fields = [0.5]\n", 1, "qubits", "missing");
  check_error("qubits = 0\n", 3, "qubits", "at least 1");
  check_error("qubits = 2\nfields = [1.0]\n", 4, "fields", "one per qubit");
  check_error("qubits = 2\nkind = \"qbo\"\n", 4, "kind", "unknown kind");
  check_error("qubits = \"three\"\n", 3, "qubits", "expected an integer");
  check_error("qubits = 2\ncouplings = [[0, 1]]\n", 4, "couplings[0]", "[i, j, value]");
}

TEST_CASE("A problem larger than memory allows is refused with the estimate") {
  const InputError e = error_of("qubits = 40\n");
  INFO(e.what());
  CHECK(e.place().key == "qubits");
  CHECK(e.place().line == 3);
  CHECK(std::string(e.what()).find("TiB") != std::string::npos);  // 2^40 amplitudes: tens of TiB
}

TEST_CASE("Syntax errors and unreadable files name the place") {
  try {
    parse_problem_text("qubits = = 3\n", "syn.toml");
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(e.place().line == 1);
    CHECK(std::string(e.what()).find("syn.toml:1") == 0);
  }
  gapwise::testing::TempDir dir;
  try {
    parse_problem_file((dir.path / "missing.toml").string());
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()).find("missing.toml") != std::string::npos);
    CHECK(std::string(e.what()).find("no such file (ENOENT)") != std::string::npos);
  }
}

TEST_CASE("format_problem_toml round-trips") {
  IsingProblem p(3);
  p.h = {0.1, -0.2, 0.3};
  p.couplings = {{0, 1, -1.0}, {1, 2, 0.5}};
  p.offset = 1.25;
  p.description = "round \"trip\" \\ with\nnewline";
  const IsingProblem q = parse_problem_text(format_problem_toml(p), "rt.toml").ising;
  for (BasisIndex b = 0; b < 8; ++b) CHECK(q.energy(b) == doctest::Approx(p.energy(b)));
  CHECK(q.description == p.description);
}
