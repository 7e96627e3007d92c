// The one loader of input files (cli/input_loading): every command that reads
// a problem, schedule, embedding or bath refuses a bad one with the same words
// (file, line and key, then the fix), before any work and before any output
// file exists; and the one check of outputs against every input, whatever the
// input's role. The expected behaviour is the project's own contract (user
// guide, "Bad input"), not a physics source; the refusals checked are those of
// the readers in src/io, which have their own unit tests.
#include <doctest/doctest.h>

#include <filesystem>
#include <fstream>
#include <set>
#include <string>
#include <vector>

#include "test_support.hpp"

using namespace gapwise::testing;

namespace {

std::string sample(const std::string& rel) { return "'" + (source_dir() / rel).string() + "'"; }

void write(const std::filesystem::path& p, const std::string& text) { std::ofstream(p) << text; }

bool has(const std::string& s, const std::string& part) { return s.find(part) != std::string::npos; }

/// Runs every command line, each must exit 2 with one line on stderr; returns the set of distinct messages.
std::set<std::string> refusals(const std::vector<std::string>& commands, const TempDir& dir) {
  std::set<std::string> messages;
  for (const auto& c : commands) {
    INFO(c);
    const auto r = run_gapwise(c, dir);
    INFO(r.err);
    CHECK(r.exit_code == 2);
    CHECK(r.out.empty());  // refused before anything is printed
    CHECK(!std::filesystem::exists(dir.path / "out.h5"));
    // The memory still free is read at the moment of each refusal and moves
    // between runs (seen under ASan): compare the messages without it.
    std::string m = r.err;
    const std::size_t only = m.find("but only "), avail = m.find(" is available");
    if (only != std::string::npos && avail != std::string::npos && avail > only) m.replace(only, avail - only, "but only AVAIL");
    messages.insert(m);
  }
  return messages;
}

}  // namespace

TEST_CASE("every command refuses the same bad problem file with the same words, naming file, line and key") {
  TempDir dir;
  const std::filesystem::path bad = dir.path / "bad-problem.toml";
  // A QUBO with a misspelt key on line 5 (`term` for `terms`).
  write(bad, "format = \"gapwise-problem\"\nformat_version = 1\nkind = \"qubo\"\nqubits = 2\nterm = [[0, 1, 1.5]]\n");
  const std::string p = "'" + bad.string() + "'", lin = sample("schedules/linear.toml");
  const std::string out = " --out '" + (dir.path / "out.h5").string() + "'";
  const auto messages = refusals(
      {"anneal " + p + " " + lin + out, "durations " + p + " " + lin + " -d 1,2" + out, "gap " + p + out,
       "gap " + p + " " + lin + out, "gap-path " + p + " " + lin + " --out '" + (dir.path / "out.toml").string() + "'",
       "pause-map " + p + " " + lin + " -d 3" + out, "reverse-map " + p + " " + sample("schedules/reverse.toml") + out,
       "compare-paths " + p + " " + lin + " -d 1" + out, "diagnose " + p + " " + lin + " -d 3" + out,
       "inspect " + p + " " + lin,
       "embed-cost " + p + " " + sample("data-samples/triangle-ring-embedding.toml") + " " + lin + out},
      dir);
  REQUIRE(messages.size() == 1);
  const std::string& m = *messages.begin();
  CHECK(has(m, bad.string() + ":5:1: key 'term': unknown key"));
  CHECK(has(m, "Fix: "));
}

TEST_CASE("every command refuses the same bad schedule file with the same words") {
  TempDir dir;
  const std::filesystem::path bad = dir.path / "bad-schedule.toml";
  // `duration` for `duration_ns` on line 4.
  write(bad, "format = \"gapwise-schedule\"\nformat_version = 1\n[path]\nduration = 5\n");
  const std::string s = "'" + bad.string() + "'", tri = sample("data-samples/triangle.toml");
  const std::string out = " --out '" + (dir.path / "out.h5").string() + "'";
  const auto messages = refusals(
      {"anneal " + tri + " " + s + out, "durations " + tri + " " + s + " -d 1,2" + out, "gap " + tri + " " + s + out,
       "gap-path " + tri + " " + s + " --out '" + (dir.path / "out.toml").string() + "'",
       "pause-map " + tri + " " + s + " -d 3" + out, "reverse-map " + tri + " " + s + out,
       "diagnose " + tri + " " + s + " -d 3" + out, "inspect " + tri + " " + s,
       "embed-cost " + tri + " " + sample("data-samples/triangle-ring-embedding.toml") + " " + s + out,
       "ensemble " + sample("data-samples/ring-chords-glasses") + " " + s + out},
      dir);
  REQUIRE(messages.size() == 1);
  CHECK(has(*messages.begin(), bad.string() + ":4:1: key 'path.duration'"));
}

TEST_CASE("a bath too large for the open-system run is refused the same way by every command that takes --bath") {
  TempDir dir;
  // 26 qubits: the truncated master equation's vectors (about 290 GiB) exceed
  // any memory this runs with, so the shared size check of --bath refuses.
  std::string ring = "format = \"gapwise-problem\"\nformat_version = 1\nkind = \"ising\"\nqubits = 26\ncouplings = [";
  for (int i = 0; i < 26; ++i) ring += (i ? ", " : "") + std::string("[") + std::to_string(i) + ", " + std::to_string((i + 1) % 26) + ", 1.0]";
  ring += "]\n";
  write(dir.path / "ring26.toml", ring);
  const std::string big = "'" + (dir.path / "ring26.toml").string() + "'", lin = sample("schedules/linear.toml");
  const std::string bath = " --bath " + sample("data-samples/bath-12mk.toml");
  const std::string out = " --out '" + (dir.path / "out.h5").string() + "'";
  const auto messages = refusals({"anneal " + big + " " + lin + bath + out,
                                  "durations " + big + " " + lin + " -d 1,2" + bath + out,
                                  "pause-map " + big + " " + lin + " -d 3" + bath + out},
                                 dir);
  REQUIRE(messages.size() == 1);
  CHECK(has(*messages.begin(), "--bath: the problem has 26 qubits"));
}

TEST_CASE("an output that is one of the inputs is refused whatever the input's role") {
  TempDir dir;
  // Copies, so that a failure of the check could never destroy a sample file.
  for (const char* f : {"data-samples/triangle.toml", "data-samples/triangle-ring-embedding.toml", "schedules/linear.toml",
                        "schedules/hardware-like.toml"})
    std::filesystem::copy_file(source_dir() / f, dir.path / std::filesystem::path(f).filename());
  const auto q = [&](const char* name) { return "'" + (dir.path / name).string() + "'"; };
  struct Case { std::string args, role; };
  const Case cases[] = {
      {"anneal " + q("triangle.toml") + " " + q("linear.toml") + " --csv " + q("linear.toml"), "schedule"},
      {"gap " + q("triangle.toml") + " " + q("linear.toml") + " --out " + q("triangle.toml"), "problem"},
      // the candidate schedules of compare-paths, which the command reads itself
      {"compare-paths " + q("triangle.toml") + " " + q("linear.toml") + " " + q("hardware-like.toml") +
           " -d 1 --csv " + q("hardware-like.toml"),
       "schedule"},
      {"embed-cost " + q("triangle.toml") + " " + q("triangle-ring-embedding.toml") + " " + q("linear.toml") +
           " --write-physical " + q("triangle-ring-embedding.toml"),
       "embedding"},
      {"embed-cost " + q("triangle.toml") + " " + q("triangle-ring-embedding.toml") + " " + q("linear.toml") +
           " --out " + q("triangle.toml"),
       "logical problem"},
  };
  for (const Case& c : cases) {
    INFO(c.args);
    const auto before = std::filesystem::file_size(dir.path / "triangle.toml") +
                        std::filesystem::file_size(dir.path / "linear.toml") +
                        std::filesystem::file_size(dir.path / "hardware-like.toml") +
                        std::filesystem::file_size(dir.path / "triangle-ring-embedding.toml");
    const auto r = run_gapwise(c.args, dir);
    INFO(r.err);
    CHECK(r.exit_code == 2);
    CHECK(has(r.err, "is the same file as the " + c.role + " input"));
    CHECK(has(r.err, "writing it would destroy the input"));
    const auto after = std::filesystem::file_size(dir.path / "triangle.toml") +
                       std::filesystem::file_size(dir.path / "linear.toml") +
                       std::filesystem::file_size(dir.path / "hardware-like.toml") +
                       std::filesystem::file_size(dir.path / "triangle-ring-embedding.toml");
    CHECK(after == before);
  }
}
