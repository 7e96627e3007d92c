// The shape commands end to end: refused shapes name their place, gap-path
// writes a schedule the other commands run, pause-map resumes.
#include <doctest/doctest.h>

#include <cstdlib>

#include "test_support.hpp"

using namespace gapwise::testing;

namespace {
std::string src(const std::string& rel) { return "'" + (source_dir() / rel).string() + "'"; }
bool has(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }
}  // namespace

TEST_CASE("bad shapes on the command line and in files are refused with the place named") {
  const TempDir dir;
  auto r = run_gapwise("compare-paths " + src("data-samples/triangle.toml") + " " + src("schedules/linear.toml") +
                           " --pause 1.3:0.2 -d 2",
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
                      " -d 2 --at 0.5 --pause-ns -1 --out " + (dir.path / "p.h5").string(),
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
  r = run_gapwise("anneal " + src("data-samples/triangle.toml") + " '" + out + "' -d 3 --no-check", dir);
  CHECK(r.exit_code == 0);
  r = run_gapwise("compare-paths " + src("data-samples/triangle.toml") + " " + src("schedules/linear.toml") + " '" + out +
                      "' -d 3 --trace-points 8",
                  dir);
  CHECK(r.exit_code == 0);
  CHECK(has(r.out, "gap.toml"));
  const std::string map = (dir.path / "map.h5").string();
  const std::string cmd = "pause-map " + src("data-samples/triangle.toml") + " " + src("schedules/linear.toml") +
                          " -d 2 --at 0.4,0.8 --pause-ns 0,0.5 --out '" + map + "'";
  r = run_gapwise(cmd, dir);
  REQUIRE(r.exit_code == 0);
  CHECK(has(r.out, "3 simulated, 0 read back"));
  const std::string first = r.out.substr(r.out.find("ground-state probability"));
  r = run_gapwise(cmd, dir);
  REQUIRE(r.exit_code == 0);
  CHECK(has(r.out, "0 simulated, 3 read back"));
  CHECK(r.out.substr(r.out.find("ground-state probability")) == first);  // same numbers
}

TEST_CASE("pause-map --json: the grid, the references and the best cell; a pause in an eigenstate changes nothing") {
  // At s = 0 the start state (all spins along x) is the ground state of H(0), so
  // a pause there only multiplies it by a global phase (textbook quantum
  // mechanics: an eigenstate of a constant H is stationary). With --cost added
  // the ramp is the same as without a pause, so p must equal the pause-0 column.
  const TempDir dir;
  const std::string map = (dir.path / "map.h5").string();
  auto r = run_gapwise("pause-map " + src("data-samples/weak-field-ring.toml") + " " + src("schedules/linear.toml") +
                           " -d 3 --at 0,0.55 --pause-ns 0,0.7,2 --cost added --json --out '" + map + "'",
                       dir);
  INFO(r.err);
  REQUIRE(r.exit_code == 0);
  const auto json = dir.write("map.json", r.out);
  const std::string check =
      "import json, sys\n"
      "j = json.load(open(sys.argv[1]))\n"
      "p, ref = j['ground_probability'], j['reference_ground_probability']\n"
      "assert len(p) == 2 and all(len(row) == 3 for row in p), 'grid shape'\n"
      "assert all(abs(x - p[0][0]) < 1e-6 for x in p[0]), ('pause at s = 0 changed p', p[0])\n"
      "assert all(abs(row[0] - ref[0]) < 1e-12 for row in p), 'a pause of 0 ns is no pause'\n"
      "gains = [(p[i][k] - ref[k], i, k) for i in range(2) for k in range(3)]\n"
      "g, i, k = max(gains)\n"
      "b = j['best']\n"
      "assert abs(b['gain'] - g) < 1e-15 and b['pause_s'] == j['pause_s'][i] and b['pause_ns'] == j['pause_ns'][k], b\n"
      "assert j['cost'] == 'added-time' and j['simulated'] == 7, j['simulated']\n";
  const auto script = dir.write("check.py", check);
  CHECK(std::system(("/usr/bin/python3 '" + script.string() + "' '" + json.string() + "'").c_str()) == 0);
}
