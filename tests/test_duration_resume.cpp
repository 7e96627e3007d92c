// `gapwise durations` end to end: a sweep killed half-way (SIGKILL on a real
// child process) leaves a valid HDF5 file, and the rerun of the same command
// gives the same numbers as an uninterrupted run. Also the TTS edge cases in the
// output and the input errors. Common practice (crash-consistent journaling),
// no outside source; the HDF5 file is read back with the HDF5 library.
#include <doctest/doctest.h>

#include <chrono>
#include <csignal>
#include <fstream>
#include <sstream>
#include <thread>

#include <sys/wait.h>
#include <unistd.h>

#include "io/hdf5_input.hpp"
#include "test_support.hpp"

using gapwise::testing::journal_records;
using gapwise::testing::run_gapwise;
using gapwise::testing::source_dir;
using gapwise::testing::TempDir;

namespace {

std::string sample(const char* rel) { return (source_dir() / rel).string(); }

std::string slurp(const std::filesystem::path& p) {
  std::ifstream f(p);
  return std::string((std::istreambuf_iterator<char>(f)), {});
}

// CSV without the wall_seconds column (the only one that depends on the machine's load).
std::string without_wall_time(const std::string& csv) {
  std::istringstream in(csv);
  std::string line, out;
  while (std::getline(in, line)) out += line.substr(0, line.rfind(',')) + "\n";
  return out;
}

const std::vector<std::string> kArgs = {"durations", sample("data-samples/triangle.toml"), sample("schedules/linear.toml"),
                                        "--durations", "20,30,45,65,90,130,180,250", "--resolution", "0.05", "--threads", "1", "--quiet"};

}  // namespace

TEST_CASE("a sweep killed half-way and rerun equals an uninterrupted sweep") {
  TempDir dir;
  std::string args;
  for (const auto& a : kArgs) args += "'" + a + "' ";
  // Uninterrupted reference.
  const auto ref = run_gapwise(args + "--csv '" + (dir.path / "ref.csv").string() + "'", dir);
  REQUIRE(ref.exit_code == 0);
  const std::string ref_csv = slurp(dir.path / "ref.csv");

  // Child process, killed with SIGKILL once three durations are journaled.
  const auto out = dir.path / "run.h5", csv = dir.path / "run.csv", journal = dir.path / "run.h5.journal";
  std::vector<std::string> child_args(kArgs.begin(), kArgs.end());
  child_args.insert(child_args.end(), {"--out", out.string(), "--csv", csv.string()});
  const auto killed =
      gapwise::testing::run_and_kill_when_journaled(child_args, journal, 3, std::chrono::milliseconds(5));
  REQUIRE_FALSE(killed.finished_early);
  REQUIRE(killed.kill_sent);
  REQUIRE(killed.reaped);
  CHECK(WIFSIGNALED(killed.status));
  CHECK(WTERMSIG(killed.status) == SIGKILL);
  const int done_at_kill = journal_records(journal);
  MESSAGE("killed with " << done_at_kill << " of 8 durations journaled");
  CHECK(done_at_kill < 8);

  // The result file left behind is a valid HDF5 file holding the finished points, marked incomplete.
  {
    gapwise::Hdf5Input h5(out.string());
    CHECK(h5.attribute_double("/durations", "complete") == 0.0);
    const auto t = h5.read("/durations/points/duration_ns");
    CHECK(t.size() >= 2);
    CHECK(static_cast<int>(t.size()) <= done_at_kill);
  }

  // Rerun: skips the journaled points, ends with the same numbers.
  std::string again = args + "--out '" + out.string() + "' --csv '" + csv.string() + "'";
  const auto rerun = run_gapwise(again, dir);
  REQUIRE(rerun.exit_code == 0);
  CHECK(rerun.out.find(std::to_string(done_at_kill) + " reused") != std::string::npos);
  CHECK(without_wall_time(slurp(csv)) == without_wall_time(ref_csv));
  gapwise::Hdf5Input h5(out.string());
  CHECK(h5.attribute_double("/durations", "complete") == 1.0);
  CHECK(h5.has("/durations/duration_needed/first_crossing"));
  // A third run simulates nothing.
  const auto third = run_gapwise(again, dir);
  CHECK(third.out.find("0 duration(s) simulated now") != std::string::npos);
}

TEST_CASE("a journal written for other inputs is refused with a fix") {
  TempDir dir;
  const auto out = (dir.path / "a.csv").string();
  const std::string base = "durations '" + sample("data-samples/triangle.toml") + "' '" + sample("schedules/linear.toml") +
                           "' --durations 1,2 --no-search --no-predictions --quiet --csv '" + out + "'";
  REQUIRE(run_gapwise(base, dir).exit_code == 0);
  const auto r = run_gapwise(base + " --tolerance 1e-7", dir);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("other inputs") != std::string::npos);
  CHECK(r.err.find("a.csv.journal") != std::string::npos);
  CHECK(run_gapwise(base + " --tolerance 1e-7 --fresh", dir).exit_code == 0);
  // --p-only changes the accuracy contract: a journal of the other choice is refused too.
  const auto p_only = run_gapwise(base + " --tolerance 1e-7 --p-only", dir);
  CHECK(p_only.exit_code == 2);
  CHECK(p_only.err.find("other inputs") != std::string::npos);
  CHECK(run_gapwise(base + " --tolerance 1e-7 --p-only --fresh", dir).exit_code == 0);
}

TEST_CASE("input errors name the option and the fix") {
  TempDir dir;
  const std::string base =
      "durations '" + sample("data-samples/triangle.toml") + "' '" + sample("schedules/linear.toml") + "' --quiet ";
  // A range that does not say its spacing: both spellings in the fix (command-line grammar, user guide).
  auto r = run_gapwise(base + "-d 10:1:3", dir);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("lin:10:1:3") != std::string::npos);
  CHECK(r.err.find("log:10:1:3") != std::string::npos);
  r = run_gapwise(base + "-d 1-10", dir);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("--durations") != std::string::npos);
  r = run_gapwise(base + "--target 1.0", dir);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("--target") != std::string::npos);
  r = run_gapwise(base + "--durations 0,5", dir);
  CHECK(r.exit_code == 2);
}

TEST_CASE("TTS edge cases in the output: p >= p* gives TTS = t_f, one run") {
  // The triangle at 550 ns reaches p > 0.999 (simulated by hand: 0.99955 at 300 ns); with p* = 0.5
  // every point from 5 ns on is a single run (Ronnow et al., Science 345, 420 (2014)).
  TempDir dir;
  const auto r = run_gapwise("durations '" + sample("data-samples/triangle.toml") + "' '" +
                                 sample("schedules/linear.toml") +
                                 "' --durations 5,550 --target 0.5 --no-predictions --quiet --csv '" +
                                 (dir.path / "e.csv").string() + "'",
                             dir);
  REQUIRE(r.exit_code == 0);
  const std::string csv = slurp(dir.path / "e.csv");
  CHECK(csv.find("\n550,grid,") != std::string::npos);
  CHECK(csv.find(",550,1,single run,") != std::string::npos);
}

TEST_CASE("the triangle's TTS falls toward the shortest durations: the random-guess limit is said, not hidden") {
  // The frustrated triangle has one ground state of 2^3 (data-samples/triangle.toml), so
  // p -> 1/8 as t_f -> 0 (sudden limit of |+>^3; common practice) and TTS -> 0. The
  // default grid is extended downwards until p at its shortest point is within a factor 2
  // (in repetitions) of guessing, then the report says why no optimum can be bracketed.
  TempDir dir;
  const auto out = (dir.path / "tri.h5").string();
  const auto r = run_gapwise("durations '" + sample("data-samples/triangle.toml") + "' '" +
                                 sample("schedules/linear.toml") + "' --no-search --quiet --json --threads 1 --out '" +
                                 out + "'",
                             dir);
  REQUIRE(r.exit_code == 0);
  CHECK(r.out.find("\"random_guess_limited\" : true") != std::string::npos);
  CHECK(r.out.find("\"random_guess_probability\" : 0.125") != std::string::npos);  // 0.12500000000000003
  CHECK(r.out.find("minimum anneal time") != std::string::npos);
  CHECK(r.out.find("\"near_from_ns\"") != std::string::npos);
  gapwise::Hdf5Input h5(out);
  CHECK(h5.attribute_double("/durations/tts_optimum", "random_guess_limited") == 1.0);
  CHECK(h5.attribute_double("/durations/tts_optimum", "random_guess_probability") == doctest::Approx(0.125));
  CHECK(h5.attribute_double("/durations/tts_optimum", "grid_extended_below") > 0);
  CHECK(h5.attribute_double("/durations/tts_optimum", "near_count") >= 1);
  // The text report says it in words.
  const auto text = run_gapwise("durations '" + sample("data-samples/triangle.toml") + "' '" +
                                    sample("schedules/linear.toml") + "' --no-search --quiet --threads 1",
                                dir);
  CHECK(text.out.find("TTS keeps falling toward the shortest durations") != std::string::npos);
  CHECK(text.out.find("within 5 % of the best TTS") != std::string::npos);
}
