// Every input a fuzz target ever broke a parser with, kept under
// tests/fuzz-regressions/<parser>/ and replayed through the same contract the
// fuzz targets check (fuzz/parser_checks.hpp): the parser returns a valid model
// that survives a write/re-read round trip, or throws InputError naming the file.
#include <doctest/doctest.h>

#include <algorithm>
#include <filesystem>
#include <limits>
#include <vector>

#include "io/toml_reader.hpp"
#include "parser_checks.hpp"
#include "test_support.hpp"

namespace fs = std::filesystem;
using namespace gapwise;

namespace {
std::vector<fs::path> inputs_in(const std::string& parser) {
  std::vector<fs::path> out;
  const fs::path dir = testing::source_dir() / "tests" / "fuzz-regressions" / parser;
  for (const auto& e : fs::directory_iterator(dir))
    if (e.is_regular_file() && e.path().filename() != "README.md") out.push_back(e.path());
  std::sort(out.begin(), out.end());
  return out;
}

// Every saved input of `parser` through its contract check.
template <class Check>
void replay(const std::string& parser, Check check) {
  const auto files = inputs_in(parser);
  CHECK(!files.empty());
  for (const auto& f : files) {
    INFO("input: " << f.string());
    const std::string bytes = read_text_file(f.string());
    CHECK_NOTHROW(check(bytes));
  }
}
}  // namespace

TEST_CASE("saved fuzz inputs for the problem parser keep the parser contract") {
  replay("problem", [](const std::string& b) { fuzzing::check_problem_input(b); });
}

TEST_CASE("saved fuzz inputs for the schedule parser keep the parser contract") {
  replay("schedule", [](const std::string& b) { fuzzing::check_schedule_input(b); });
}

TEST_CASE("saved fuzz inputs for the embedding parser keep the parser contract") {
  replay("embedding", [](const std::string& b) { fuzzing::check_embedding_input(b); });
}

TEST_CASE("saved fuzz inputs for the instance-set reader keep the reader contract") {
  // Each file is a fuzz input: its first byte picks raw (even) or re-sealed (odd).
  replay("instance-set", [](const std::string& b) { fuzzing::check_instance_set_input(b); });
}

TEST_CASE("saved fuzz inputs for the result journal reader keep the reader contract") {
  // First byte: 0 mod 3 raw, 1 header + recomputed checksums, 2 header + raw lines.
  replay("journal", [](const std::string& b) { fuzzing::check_journal_input(b); });
}

TEST_CASE("the contract check itself catches a broken round trip and a foreign exception") {
  // A check that cannot fail is no check: feed the checker models that break it.
  IsingProblem bad(2);
  bad.h[0] = std::numeric_limits<double>::infinity();
  CHECK_THROWS_AS(fuzzing::check_problem_model(bad), std::logic_error);
  IsingProblem disordered(3);
  disordered.couplings.push_back({2, 1, 1.0});
  CHECK_THROWS_AS(fuzzing::check_problem_model(disordered), std::logic_error);
  // Valid input passes.
  CHECK_NOTHROW(fuzzing::check_problem_input("qubits = 2\ncouplings = [[0, 1, -1.0]]\n"));
  CHECK_NOTHROW(fuzzing::check_schedule_input("[path]\nduration_ns = 10\n"));
}
