// The figure command turns result files into non-empty, valid SVG and PNG
// files. Validity is checked with outside references: the PNG signature of the
// PNG specification (ISO/IEC 15948), and Python's XML parser for the SVG.
#include <doctest/doctest.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>

#include "test_support.hpp"

using gapwise::testing::run_gapwise;
using gapwise::testing::source_dir;
using gapwise::testing::TempDir;

namespace gapwise::testing {

/// Asserts that `path` is a non-empty PNG (signature) or a well-formed SVG document.
inline void check_figure_file(const std::filesystem::path& path) {
  INFO(path.string());
  REQUIRE(std::filesystem::exists(path));
  CHECK(std::filesystem::file_size(path) > 1000);
  if (path.extension() == ".png") {
    std::ifstream f(path, std::ios::binary);
    unsigned char sig[8] = {};
    f.read(reinterpret_cast<char*>(sig), 8);
    const unsigned char expect[8] = {0x89, 'P', 'N', 'G', '\r', '\n', 0x1a, '\n'};
    CHECK(std::equal(sig, sig + 8, expect));
  } else {
    const std::string cmd = "/usr/bin/python3 -c \"import sys, xml.etree.ElementTree as E; "
                            "r = E.parse(sys.argv[1]).getroot(); sys.exit(0 if r.tag.endswith('svg') else 1)\" '" +
                            path.string() + "'";
    CHECK(std::system(cmd.c_str()) == 0);
  }
}

}  // namespace gapwise::testing

TEST_CASE("figure: an anneal result gives a valid SVG and PNG trace figure") {
  TempDir dir;
  const std::string h5 = (dir.path / "run.h5").string();
  auto a = run_gapwise("anneal '" + (source_dir() / "data-samples/triangle.toml").string() + "' '" +
                           (source_dir() / "schedules/pause.toml").string() + "' --duration-ns 5 --no-check --out '" + h5 + "'",
                       dir);
  REQUIRE(a.exit_code == 0);
  auto f = run_gapwise("figure '" + h5 + "' --out-dir '" + (dir.path / "figs").string() + "'", dir);
  INFO(f.err);
  REQUIRE(f.exit_code == 0);
  gapwise::testing::check_figure_file(dir.path / "figs" / "run-anneal-trace.svg");
  gapwise::testing::check_figure_file(dir.path / "figs" / "run-anneal-trace.png");
}

TEST_CASE("figure: a file that is not a result is refused with exit code 2") {
  TempDir dir;
  const auto junk = dir.write("junk.h5", "not hdf5 at all");
  auto f = run_gapwise("figure '" + junk.string() + "' --out-dir '" + (dir.path / "figs").string() + "'", dir);
  CHECK(f.exit_code == 2);
  CHECK(f.err.find("junk.h5") != std::string::npos);
}

TEST_CASE("figure: a gap result gives the spectrum and gap figures") {
  TempDir dir;
  const std::string h5 = (dir.path / "gap.h5").string();
  auto g = run_gapwise("gap '" + (source_dir() / "data-samples/triangle.toml").string() + "' '" +
                           (source_dir() / "schedules/linear.toml").string() + "' --points 31 --out '" + h5 + "'",
                       dir);
  INFO(g.err);
  REQUIRE(g.exit_code == 0);
  auto f = run_gapwise("figure '" + h5 + "' --out-dir '" + (dir.path / "figs").string() + "'", dir);
  INFO(f.err);
  REQUIRE(f.exit_code == 0);
  for (const char* name : {"gap-spectrum.svg", "gap-spectrum.png", "gap-gap.svg", "gap-gap.png"})
    gapwise::testing::check_figure_file(dir.path / "figs" / name);
}

TEST_CASE("figure: pause maps and path comparisons give heat-map and population figures") {
  TempDir dir;
  const std::string tri = "'" + (source_dir() / "data-samples/triangle.toml").string() + "'";
  const std::string lin = "'" + (source_dir() / "schedules/linear.toml").string() + "'";
  const std::string pm = (dir.path / "pm.h5").string(), cmp = (dir.path / "cmp.h5").string();
  auto a = run_gapwise("pause-map " + tri + " " + lin + " --duration-ns 2 --at 0.3,0.6 --pause-ns 0,0.5,1.5 --out '" + pm + "'", dir);
  INFO(a.err);
  REQUIRE(a.exit_code == 0);
  auto b = run_gapwise("compare-paths " + tri + " " + lin + " --pause 0.5:0.2 --duration-ns 2 --out '" + cmp + "'", dir);
  INFO(b.err);
  REQUIRE(b.exit_code == 0);
  auto f = run_gapwise("figure '" + pm + "' '" + cmp + "' --out-dir '" + (dir.path / "figs").string() + "'", dir);
  INFO(f.err);
  REQUIRE(f.exit_code == 0);
  gapwise::testing::check_figure_file(dir.path / "figs" / "pm-pause-map.svg");
  gapwise::testing::check_figure_file(dir.path / "figs" / "pm-pause-map.png");
  gapwise::testing::check_figure_file(dir.path / "figs" / "cmp-populations-linear-toml-0.png");
}

TEST_CASE("figure: an ensemble result gives the TTS-against-size and gap-against-size figures") {
  TempDir dir;
  const auto p = [&](const char* f) { return (dir.path / f).string(); };
  REQUIRE(run_gapwise("generate --graph ring-chords --couplings gaussian --sizes 3-5 --count 3 --seed 4 -q --out " + p("set.h5"), dir)
              .exit_code == 0);
  auto e = run_gapwise("ensemble " + p("set.h5") + " '" + (source_dir() / "schedules/linear.toml").string() +
                           "' -d 0.3,1,3 --gap-points 21 --resamples 200 -q --threads 1 --out " + p("study.h5"),
                       dir);
  INFO(e.err);
  REQUIRE(e.exit_code == 0);
  auto f = run_gapwise("figure " + p("study.h5") + " --out-dir '" + p("figs") + "'", dir);
  INFO(f.err);
  REQUIRE(f.exit_code == 0);
  for (const char* name : {"study-ensemble-tts.svg", "study-ensemble-tts.png", "study-ensemble-gap.svg", "study-ensemble-gap.png"})
    gapwise::testing::check_figure_file(dir.path / "figs" / name);
}
