// compare-paths follows the populations of the lowest --levels instantaneous
// levels. A space of n qubits has 2^n states, and the even spin-flip sector of a
// field-free problem 2^(n-1) (the global flip commutes with H; common practice,
// e.g. Sachdev, Quantum Phase Transitions, CUP 2011, ch. 5): more levels than that
// do not exist. The default --levels 4 must still work on 1-qubit problems
// (lowered, with a note), and a --levels the user typed that does not fit is
// refused (exit 2, naming --levels and the largest value that fits).
#include <doctest/doctest.h>

#include <string>

#include "io/hdf5_input.hpp"
#include "test_support.hpp"

using namespace gapwise;
using testing::TempDir;

namespace {
std::string src(const std::string& rel) { return "'" + (testing::source_dir() / rel).string() + "'"; }
}  // namespace

TEST_CASE("compare-paths on one qubit: the default --levels is lowered to the 2 states, with a note") {
  TempDir dir;
  dir.write("one.toml", "qubits = 1\nfields = [0.5]\n");
  const std::string out = (dir.path / "cmp.h5").string();
  const auto r = testing::run_gapwise("compare-paths '" + (dir.path / "one.toml").string() + "' " +
                                          src("schedules/linear.toml") + " -d 5 --out '" + out + "'",
                                      dir);
  REQUIRE(r.exit_code == 0);
  CHECK(r.err.find("note: --levels lowered from the default 4 to 2, the number of states of the full space") !=
        std::string::npos);
  const Hdf5Input h5(out);
  const auto shape = h5.shape("/compare/path_0/duration_0/level_population");
  REQUIRE(shape.size() == 2);
  CHECK(shape[1] == 2);
  // Both levels are resolved and the populations of the two states add up to 1
  // (the state is normalised; the two levels span the whole space).
  const auto pop = h5.read("/compare/path_0/duration_0/level_population");
  const auto resolved = h5.read("/compare/path_0/duration_0/level_resolved");
  for (std::size_t i = 0; i < shape[0]; ++i) {
    CHECK(resolved[2 * i] == 1.0);
    CHECK(resolved[2 * i + 1] == 1.0);
    CHECK(pop[2 * i] + pop[2 * i + 1] == doctest::Approx(1.0).epsilon(1e-6));
  }
}

TEST_CASE("compare-paths: a field-free 1-qubit problem keeps one level of the even sector; a typed --levels 2 is refused") {
  TempDir dir;
  dir.write("free.toml", "qubits = 1\n");
  const std::string problem = "'" + (dir.path / "free.toml").string() + "' " + src("schedules/linear.toml");
  auto r = testing::run_gapwise("compare-paths " + problem + " -d 5", dir);
  CHECK(r.exit_code == 0);
  CHECK(r.err.find("lowered from the default 4 to 1, the number of states of the even spin-flip sector") !=
        std::string::npos);
  r = testing::run_gapwise("compare-paths " + problem + " -d 5 --levels 2", dir);
  CHECK(r.exit_code == 2);
  CHECK(r.out.empty());
  CHECK(r.err.find("--levels: 2 levels asked for, but the even spin-flip sector (P = +1) has only 1 state. Fix: give "
                   "at most 1 levels") != std::string::npos);
}
