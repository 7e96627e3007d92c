// `durations --bath` journals its open-system points (branch h18-ensemble): a
// run stopped after its first bath point resumes without simulating that point
// again and ends with the same numbers, bit for bit, as an uninterrupted run;
// the work estimate names the anneals still to run and those from the journal.
#include <doctest/doctest.h>

#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include "io/hdf5_input.hpp"
#include "test_support.hpp"

using gapwise::testing::run_gapwise;
using gapwise::testing::source_dir;
using gapwise::testing::TempDir;

namespace {
std::string sample(const char* rel) { return "'" + (source_dir() / rel).string() + "'"; }

std::vector<std::string> lines_of(const std::filesystem::path& p) {
  std::ifstream f(p);
  std::vector<std::string> v;
  for (std::string l; std::getline(f, l);) v.push_back(l);
  return v;
}
}  // namespace

TEST_CASE("durations --bath: bath points are journaled; a resumed run reuses them and gives identical results") {
  TempDir dir;
  const auto bath = dir.path / "bath.toml";
  // Illustrative bath (invented numbers): 40 mK, weak coupling.
  std::ofstream(bath) << "format = \"gapwise-bath\"\ntemperature_mk = 40.0\ncoupling = 1e-3\ncutoff_ghz = 8.0\n";
  const auto out = dir.path / "d.h5";
  const std::string cmd = "durations " + sample("data-samples/triangle.toml") + " " +
                          sample("schedules/hardware-like.toml") +
                          " -d 2,20 --no-search --no-predictions --bath '" + bath.string() + "' --out '" +
                          out.string() + "'";
  const auto first = run_gapwise(cmd, dir);
  REQUIRE_MESSAGE(first.exit_code == 0, first.err);
  CHECK(first.err.find("with the bath: 2 open-system anneal(s) (0 from the journal") != std::string::npos);
  CHECK(first.err.find("the first open-system anneal (2 ns) took") != std::string::npos);
  const auto journal = std::filesystem::path(out.string() + ".bath.journal");
  REQUIRE(std::filesystem::exists(journal));
  const auto lines = lines_of(journal);
  REQUIRE(lines.size() == 4);  // two header lines, two points
  gapwise::Hdf5Input h5a(out.string());
  const auto pa = h5a.read_finite("/durations/open_system/ground_probability");
  REQUIRE(pa.size() == 2);
  CHECK(pa[0] < 0.99);  // a p that the bath and the duration move: the comparison means something

  // A run killed after its first bath point left the header and one record.
  {
    std::ofstream f(journal, std::ios::trunc);
    for (int i = 0; i < 3; ++i) f << lines[i] << "\n";
  }
  std::filesystem::remove(out);
  const auto resumed = run_gapwise(cmd, dir);
  REQUIRE_MESSAGE(resumed.exit_code == 0, resumed.err);
  CHECK(resumed.err.find("with the bath: 1 open-system anneal(s) (1 from the journal") != std::string::npos);
  gapwise::Hdf5Input h5b(out.string());
  const auto pb = h5b.read_finite("/durations/open_system/ground_probability");
  REQUIRE(pb.size() == 2);
  CHECK(pb[0] == pa[0]);
  CHECK(pb[1] == pa[1]);
  CHECK(lines_of(journal).size() == 4);

  // Everything journaled: nothing is simulated again.
  const auto again = run_gapwise(cmd, dir);
  REQUIRE_MESSAGE(again.exit_code == 0, again.err);
  CHECK(again.err.find("with the bath: 0 open-system anneal(s) (2 from the journal") != std::string::npos);
  CHECK(again.err.find("the first open-system anneal") == std::string::npos);

  // Another bath is other inputs: the journal is refused, naming what to do.
  std::ofstream(bath) << "format = \"gapwise-bath\"\ntemperature_mk = 20.0\ncoupling = 1e-3\ncutoff_ghz = 8.0\n";
  const auto other = run_gapwise(cmd, dir);
  CHECK(other.exit_code != 0);
  CHECK(other.err.find(journal.filename().string()) != std::string::npos);
  // --fresh discards it and runs both points again.
  const auto fresh = run_gapwise(cmd + " --fresh", dir);
  REQUIRE_MESSAGE(fresh.exit_code == 0, fresh.err);
  CHECK(fresh.err.find("with the bath: 2 open-system anneal(s) (0 from the journal") != std::string::npos);
}

TEST_CASE("durations --bath: an output named like the bath journal is refused before any work") {
  TempDir dir;
  const auto bath = dir.path / "bath.toml";
  std::ofstream(bath) << "format = \"gapwise-bath\"\ntemperature_mk = 40.0\ncoupling = 1e-3\ncutoff_ghz = 8.0\n";
  const auto out = dir.path / "z.h5";
  const auto r = run_gapwise("durations " + sample("data-samples/triangle.toml") + " " +
                                 sample("schedules/hardware-like.toml") + " -d 5 --no-search --bath '" +
                                 bath.string() + "' --out '" + out.string() + "' --csv '" + out.string() +
                                 ".bath.journal'",
                             dir);
  CHECK(r.exit_code == 2);
  CHECK(r.out.empty());
  CHECK(r.err.find("z.h5.bath.journal: key 'journal': --csv") != std::string::npos);
  CHECK(r.err.find("are the same file") != std::string::npos);
  CHECK(!std::filesystem::exists(out));
}
