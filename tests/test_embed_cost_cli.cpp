// `gapwise embed-cost` end to end on the sample embedding: the report, the
// written physical problem, and the input errors (exit code 2, message naming
// the file and key). The physics of the numbers is checked in
// test_chain_strength_scan.cpp; here the check is that the command reports what
// the library computes and that the written problem is the embedded one
// (intact states carry the logical energies, scaled by the term limit: minor
// embedding, Choi, Quantum Inf. Process. 7, 193 (2008)).
#include <doctest/doctest.h>

#include <fstream>

#include "io/embedding_file.hpp"
#include "io/problem_file.hpp"
#include "problem/embedding.hpp"
#include "test_support.hpp"

using namespace gapwise;
using namespace gapwise::testing;

namespace {

std::string sample(const char* name) { return "'" + (source_dir() / "data-samples" / name).string() + "'"; }
std::string schedule(const char* name) { return "'" + (source_dir() / "schedules" / name).string() + "'"; }

std::string quick(const char* range = "log:2:16:3") {
  return std::string(" --search-durations ") + range + " --resolution 0.05 --threads 1 -q";
}

}  // namespace

TEST_CASE("embed-cost on the sample: JSON report, CSV, HDF5 and the physical problem file") {
  TempDir dir;
  const std::string phys = (dir.path / "phys.toml").string(), csv = (dir.path / "scan.csv").string(),
                    h5 = (dir.path / "scan.h5").string();
  const auto r = run_gapwise("embed-cost " + sample("triangle.toml") + " " + sample("triangle-ring-embedding.toml") +
                                 " " + schedule("linear.toml") + " --strengths 1,3 -d 8 --json" + quick() +
                                 " --write-physical '" + phys + "' --csv '" + csv + "' --out '" + h5 + "'",
                             dir);
  INFO(r.err);
  REQUIRE(r.exit_code == 0);
  for (const char* key : {"\"price_of_embedding\"", "\"best_chain_coupling\"", "\"p_logical\"", "\"min_gap_ghz\"",
                          "\"broken_chain_share\"", "\"needed_ns\"", "\"logical\""})
    CHECK(r.out.find(key) != std::string::npos);
  // Strengths 1x and 3x from the command line plus the file's own 2x.
  std::ifstream c(csv);
  std::string line;
  int rows = 0;
  while (std::getline(c, line)) ++rows;
  CHECK(rows == 4);  // header + three strengths
  CHECK(std::filesystem::exists(h5));

  const IsingProblem written = parse_problem_file(phys).ising;
  const IsingProblem logical = read_problem_file((source_dir() / "data-samples" / "triangle.toml").string());
  const Embedding e = read_embedding_file((source_dir() / "data-samples" / "triangle-ring-embedding.toml").string());
  REQUIRE(written.qubits == 6);
  CHECK(written.largest_term() <= 1.0 + 1e-12);  // the sample's term limit
  // Intact states: the logical energy times one common scale factor.
  double ratio = 0.0;
  for (BasisIndex x = 0; x < 8; ++x) {
    BasisIndex b = 0;
    for (int v = 0; v < 3; ++v)
      if ((x >> v) & 1U)
        for (int q : e.chains[static_cast<std::size_t>(v)]) b |= BasisIndex{1} << q;
    if (logical.energy(x) == 0.0) continue;
    const double rx = written.energy(b) / logical.energy(x);
    if (ratio == 0.0) ratio = rx;
    CHECK(rx == doctest::Approx(ratio).epsilon(1e-12));
  }
  CHECK(ratio > 0.0);
  CHECK(ratio <= 1.0);
}

TEST_CASE("embed-cost text report names the best strength and the price of embedding") {
  TempDir dir;
  const auto r = run_gapwise("embed-cost " + sample("triangle.toml") + " " + sample("triangle-ring-embedding.toml") +
                                 " " + schedule("linear.toml") + " --strengths 2 -d 8" + quick(),
                             dir);
  INFO(r.err);
  REQUIRE(r.exit_code == 0);
  CHECK(r.out.find("best chain strength") != std::string::npos);
  CHECK(r.out.find("price of embedding") != std::string::npos);
  CHECK(r.out.find("chain bound  2.3") != std::string::npos);
  CHECK(r.out.find("<- best") != std::string::npos);
}

TEST_CASE("embed-cost input errors exit with 2 and name the file and key") {
  TempDir dir;
  const auto bad = dir.write("open-ring.toml",
                             "format = \"gapwise-embedding\"\nchains = [[0, 1], [2, 3], [4, 5]]\n"
                             "couplers = [[0, 1], [1, 2], [2, 3], [3, 4], [4, 5]]\n");
  const auto r = run_gapwise("embed-cost " + sample("triangle.toml") + " '" + bad.string() + "' " +
                                 schedule("linear.toml") + quick(),
                             dir);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("open-ring.toml:3") != std::string::npos);
  CHECK(r.err.find("key 'couplers'") != std::string::npos);
  CHECK(r.err.find("has no physical coupler between chain 0 [0, 1] and chain 2 [4, 5]") != std::string::npos);

  const auto s = run_gapwise("embed-cost " + sample("triangle.toml") + " " + sample("triangle-ring-embedding.toml") +
                                 " " + schedule("linear.toml") + " --strengths 1,-2" + quick(),
                             dir);
  CHECK(s.exit_code == 2);
  CHECK(s.err.find("--strengths") != std::string::npos);

  const auto t = run_gapwise("embed-cost " + sample("triangle.toml") + " " + sample("triangle-ring-embedding.toml") +
                                 " " + schedule("linear.toml") + quick("10:1"),
                             dir);
  CHECK(t.exit_code == 2);
  CHECK(t.err.find("log:FIRST:LAST:COUNT") != std::string::npos);
}
