// `gapwise pause-map` and `gapwise reverse-map` end to end: a map killed
// half-way (SIGKILL on a real child process, so nothing runs at exit) and rerun
// with the same command gives a result file whose maps are bit for bit those of
// an uninterrupted run, and the rerun reads the journaled points back instead
// of simulating them. Common practice (crash-consistent journaling), no outside
// source; the HDF5 files are read back with the HDF5 library.
#include <doctest/doctest.h>

#include <chrono>
#include <csignal>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <thread>

#include <sys/wait.h>
#include <unistd.h>

#include <fmt/format.h>

#include "io/hdf5_input.hpp"
#include "test_support.hpp"

using gapwise::testing::journal_records;
using gapwise::testing::run_gapwise;
using gapwise::testing::source_dir;
using gapwise::testing::TempDir;

namespace {

std::string sample(const char* rel) { return (source_dir() / rel).string(); }

std::string quoted(const std::vector<std::string>& args) {
  std::string s;
  for (const auto& a : args) s += "'" + a + "' ";
  return s;
}

bool same_bits(const std::vector<double>& a, const std::vector<double>& b) {
  return a.size() == b.size() && std::memcmp(a.data(), b.data(), a.size() * sizeof(double)) == 0;
}

// Runs `args --out ref.h5` to the end, then `args --out run.h5` in a child
// killed once `kill_after` points are journaled, then the same command again;
// the maps in `datasets` must agree bit for bit with the uninterrupted run.
void check_kill_and_resume(const std::vector<std::string>& args, const std::vector<std::string>& datasets) {
  TempDir dir;
  const auto ref = dir.path / "ref.h5", out = dir.path / "run.h5";
  const auto journal = dir.path / "run.h5.journal";
  REQUIRE(run_gapwise(quoted(args) + "--out '" + ref.string() + "'", dir).exit_code == 0);
  const int total = journal_records(dir.path / "ref.h5.journal");
  REQUIRE(total >= 6);
  const int kill_after = total / 2;

  std::vector<std::string> child_args = args;
  child_args.insert(child_args.end(), {"--out", out.string()});
  const auto killed =
      gapwise::testing::run_and_kill_when_journaled(child_args, journal, kill_after, std::chrono::milliseconds(2));
  REQUIRE_FALSE(killed.finished_early);
  REQUIRE(killed.kill_sent);
  REQUIRE(killed.reaped);
  CHECK(WIFSIGNALED(killed.status));
  CHECK(WTERMSIG(killed.status) == SIGKILL);
  const int done_at_kill = journal_records(journal);
  MESSAGE("killed with " << done_at_kill << " of " << total << " points journaled");
  REQUIRE(done_at_kill >= kill_after);
  CHECK(done_at_kill < total);

  const auto rerun = run_gapwise(quoted(args) + "--out '" + out.string() + "'", dir);
  REQUIRE(rerun.exit_code == 0);
  CHECK(rerun.out.find(fmt::format("{} simulated, {} read back", total - done_at_kill, done_at_kill)) !=
        std::string::npos);
  CHECK(journal_records(journal) == total);
  const gapwise::Hdf5Input a(ref.string()), b(out.string());
  for (const auto& d : datasets) {
    INFO("dataset " << d);
    CHECK(same_bits(a.read(d), b.read(d)));
  }
}

}  // namespace

TEST_CASE("a pause map killed half-way and rerun equals an uninterrupted map") {
  check_kill_and_resume({"pause-map", sample("data-samples/weak-field-ring.toml"), sample("schedules/linear.toml"),
                         "-d", "300", "--at", "lin:0.2:0.8:4", "--pause-ns", "0,50,100", "--threads", "1"},
                        {"/pause_map/ground_probability", "/pause_map/tts_ns", "/pause_map/norm_drift",
                         "/pause_map/total_ns", "/pause_map/reference_ground_probability", "/pause_map/pause_s",
                         "/pause_map/pause_ns"});
}

TEST_CASE("a reverse map killed half-way and rerun equals an uninterrupted map") {
  check_kill_and_resume({"reverse-map", sample("data-samples/meeting-slots-qubo.toml"),
                         sample("schedules/reverse-dwell.toml"), "--turn", "lin:0.3:0.9:4", "--dwell-ns", "0,100,200",
                         "--ramp-ns", "1000", "--threads", "1"},
                        {"/reverse_map/ground_probability", "/reverse_map/start_probability", "/reverse_map/tts_ns",
                         "/reverse_map/total_ns", "/reverse_map/turn_s", "/reverse_map/dwell_ns"});
}

TEST_CASE("--fresh discards a map's journal written for other inputs, which is refused without it") {
  // Every journaled command takes --fresh (user guide, command-line grammar); the refusal points to it.
  TempDir dir;
  const std::string out = (dir.path / "map.h5").string();
  for (const std::string& cmd :
       {"pause-map '" + sample("data-samples/triangle.toml") + "' '" + sample("schedules/linear.toml") +
            "' -d 2 --at 0.5 --pause-ns 0,0.5 --threads 1 -q --out '" + out + "'",
        "reverse-map '" + sample("data-samples/meeting-slots-qubo.toml") + "' '" + sample("schedules/reverse-dwell.toml") +
            "' --turn 0.5 --dwell-ns 0,1 --ramp-ns 2 --threads 1 -q --out '" + out + "'"}) {
    INFO(cmd);
    std::filesystem::remove(out + ".journal");
    REQUIRE(run_gapwise(cmd, dir).exit_code == 0);
    REQUIRE(std::filesystem::exists(out + ".journal"));
    const auto other = run_gapwise(cmd + " --tolerance 1e-7", dir);
    CHECK(other.exit_code == 2);
    CHECK(other.err.find("written for other inputs") != std::string::npos);
    CHECK(other.err.find("--fresh") != std::string::npos);
    const auto fresh = run_gapwise(cmd + " --tolerance 1e-7 --fresh", dir);
    CHECK(fresh.exit_code == 0);
    CHECK(fresh.out.find("0 read back") != std::string::npos);
    CHECK(fresh.err.empty());  // -q: no counter, no notice
  }
}
