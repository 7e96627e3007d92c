// The shape commands end to end: refused shapes name their place, gap-path
// writes a schedule the other commands run, pause-map resumes.
#include <doctest/doctest.h>

#include "test_support.hpp"

using namespace gapwise::testing;

namespace {
std::string src(const std::string& rel) { return "'" + (source_dir() / rel).string() + "'"; }
bool has(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }
}  // namespace

TEST_CASE("bad shapes on the command line and in files are refused with the place named") {
  const TempDir dir;
  auto r = run_gapwise("compare-paths " + src("data-samples/triangle.toml") + " " + src("schedules/linear.toml") +
                           " --pause 1.3:0.2 --duration-ns 2",
                       dir);
  CHECK(r.exit_code == 2);
  CHECK(has(r.err, "--pause"));
  CHECK(has(r.err, "pause.s"));
  CHECK(has(r.err, "outside [0, 1]"));
  r = run_gapwise("reverse-map " + src("data-samples/triangle.toml") + " " + src("schedules/linear.toml") + " --out " +
                      (dir.path / "r.h5").string(),
                  dir);
  CHECK(r.exit_code == 2);
  CHECK(has(r.err, "start_bits"));
  r = run_gapwise("pause-map " + src("data-samples/triangle.toml") + " " + src("schedules/linear.toml") +
                      " --duration-ns 2 --at 0.5 --pause-ns -1 --out " + (dir.path / "p.h5").string(),
                  dir);
  CHECK(r.exit_code == 2);
  CHECK(has(r.err, "--pause-ns"));
  const auto bad = dir.write("bad.toml",
                             "format = \"gapwise-schedule\"\nformat_version = 1\n[path]\nduration_ns = 5\n[path.reverse]\n"
                             "turn_s = 0.5\ndown = 0.4\ndwell = -0.2\nup = 0.4\n");
  r = run_gapwise("anneal " + src("data-samples/triangle.toml") + " '" + bad.string() + "'", dir);
  CHECK(r.exit_code == 2);
  CHECK(has(r.err, "bad.toml:"));
  CHECK(has(r.err, "path.reverse"));
}

TEST_CASE("gap-path writes a schedule that anneal and compare-paths run; pause-map resumes") {
  const TempDir dir;
  const std::string out = (dir.path / "gap.toml").string();
  auto r = run_gapwise("gap-path " + src("data-samples/triangle.toml") + " " + src("schedules/linear.toml") + " --out '" +
                           out + "' --waypoints 60",
                       dir);
  REQUIRE(r.exit_code == 0);
  CHECK(has(r.out, "minimum gap"));
  r = run_gapwise("anneal " + src("data-samples/triangle.toml") + " '" + out + "' --duration-ns 3 --no-check", dir);
  CHECK(r.exit_code == 0);
  r = run_gapwise("compare-paths " + src("data-samples/triangle.toml") + " " + src("schedules/linear.toml") + " '" + out +
                      "' --duration-ns 3 --points 8",
                  dir);
  CHECK(r.exit_code == 0);
  CHECK(has(r.out, "gap.toml"));
  const std::string map = (dir.path / "map.h5").string();
  const std::string cmd = "pause-map " + src("data-samples/triangle.toml") + " " + src("schedules/linear.toml") +
                          " --duration-ns 2 --at 0.4,0.8 --pause-ns 0,0.5 --out '" + map + "'";
  r = run_gapwise(cmd, dir);
  REQUIRE(r.exit_code == 0);
  CHECK(has(r.out, "3 simulated, 0 read back"));
  const std::string first = r.out.substr(r.out.find("ground-state probability"));
  r = run_gapwise(cmd, dir);
  REQUIRE(r.exit_code == 0);
  CHECK(has(r.out, "0 simulated, 3 read back"));
  CHECK(r.out.substr(r.out.find("ground-state probability")) == first);  // same numbers
}
