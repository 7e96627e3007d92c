// The bad-input catalogue (notebooks-free-docs/bad-input-catalogue.md), end to
// end: each row here feeds the real command line one class of bad input; the
// test checks exit code 2, that nothing is printed on stdout, and that stderr is
// exactly the message in the catalogue row of the same id (the temporary
// folder shown as DIR), so the docs cannot drift from the tool.
// GAPWISE_CATALOGUE_DUMP=1 prints the messages the tool gives (to update the docs).
#include <doctest/doctest.h>

#include <algorithm>
#include <atomic>
#include <cstdlib>
#include <deque>
#include <thread>
#include <fstream>
#include <iostream>
#include <string>
#include <vector>

#include "io/toml_reader.hpp"
#include "test_support.hpp"

using namespace gapwise;
using testing::TempDir;

namespace {

struct Row {
  std::string id;        ///< row id in the catalogue
  std::string file;      ///< name of the bad file written into DIR ("" = none)
  std::string text;      ///< its content
  std::string command;   ///< arguments; DIR, TRIANGLE and LINEAR are replaced
};

std::string replace_all(std::string s, const std::string& from, const std::string& to) {
  for (std::size_t k = s.find(from); k != std::string::npos; k = s.find(from, k + to.size())) s.replace(k, from.size(), to);
  return s;
}

// "k.k.k...": a dotted key of n parts.
std::string deep_key(int n) {
  std::string s = "k";
  for (int i = 1; i < n; ++i) s += ".k";
  return s;
}

const std::string kScheduleHead = "format = \"gapwise-schedule\"\n[scales]\nkind = \"linear\"\n";
const std::string kBathHead = "format = \"gapwise-bath\"\n";

// The last cell of the catalogue row "| id | ... | message |".
std::string catalogued_message(const std::string& doc, const std::string& id) {
  const std::size_t at = doc.find("\n| " + id + " |");
  if (at == std::string::npos) return "<row " + id + " is missing from the catalogue>";
  const std::size_t end = doc.find('\n', at + 1);
  std::string line = doc.substr(at + 1, end - at - 1);
  if (line.size() >= 2 && line.compare(line.size() - 2, 2, " |") == 0) line.resize(line.size() - 2);
  const std::size_t cell = line.rfind(" | ");
  return cell == std::string::npos ? line : line.substr(cell + 3);
}

std::vector<Row> rows() {
  return {
      // --- problem files ---
      {"P1", "p.toml", "qubits = 3\ncouplings = [[0, 1, 1.0]\n", "inspect DIR/p.toml"},
      {"P2", "p.toml", "qubits = \"three\"\n", "inspect DIR/p.toml"},
      {"P3", "p.toml", "qubits = 3\nfields = [0.1, \"x\", 0.2]\n", "inspect DIR/p.toml"},
      {"P4", "p.toml", "qubits = 3\ncouplings = [[0, 5, 1.0]]\n", "inspect DIR/p.toml"},
      {"P5", "p.toml", "qubits = 0\n", "inspect DIR/p.toml"},
      {"P6", "p.toml", "qubits = 2\nfields = [nan, 0.0]\n", "inspect DIR/p.toml"},
      {"P7", "p.toml", "qubits = 2\ncouplings = [[0, 1, inf]]\n", "inspect DIR/p.toml"},
      {"P8", "p.toml", "qubits = 3\nfields = [0.1, 0.2]\n", "inspect DIR/p.toml"},
      {"P9", "p.toml", "qubits = 3\nlabels = [\"a\", \"b\"]\n", "inspect DIR/p.toml"},
      {"P10", "p.toml", "qubits = 3\ncouplings = [[0, 1, 1.0], [1, 0, 0.5]]\n", "inspect DIR/p.toml"},
      {"P11", "p.toml", "qubits = 3\ncoupling = [[0, 1, 1.0]]\n", "inspect DIR/p.toml"},
      {"P12", "p.toml", "qubits = 40\n", "inspect DIR/p.toml"},
      {"P13", "p.toml", "qubits = 2\nfields = [1e12, 0.0]\n", "inspect DIR/p.toml"},
      {"P14", "p.toml", "", "inspect DIR/p.toml"},
      {"P15", "p.toml", "kind = \"qubo\"\nqubits = 2\nfields = [1.0, 0.0]\n", "inspect DIR/p.toml"},
      // --- schedule files ---
      {"S1", "s.toml", "[path\n", "inspect TRIANGLE DIR/s.toml"},
      {"S2", "s.toml", kScheduleHead + "a_max_ghz = \"5\"\nb_max_ghz = 5.0\n", "inspect TRIANGLE DIR/s.toml"},
      {"S3", "s.toml", "[path]\nduration_ns = 10\npoints = [[0, 0], [1, 1.5]]\n", "inspect TRIANGLE DIR/s.toml"},
      {"S4", "s.toml", kScheduleHead + "a_max_ghz = nan\nb_max_ghz = 5.0\n", "inspect TRIANGLE DIR/s.toml"},
      {"S5", "s.toml", "[scales]\nkind = \"table\"\ns = [0, 0.5, 1]\na_ghz = [5, 2]\nb_ghz = [0, 2, 5]\n",
       "inspect TRIANGLE DIR/s.toml"},
      {"S6", "s.toml", "[path]\ntime = \"ns\"\npoints = [[0, 0], [20, 0.5], [10, 1]]\n", "inspect TRIANGLE DIR/s.toml"},
      {"S7", "s.toml", kScheduleHead + "a_max_ghz = 5.0\nb_max_ghz = 5e6\n", "inspect TRIANGLE DIR/s.toml"},
      {"S8", "s.toml", "[path]\nduration_ns = 1e12\n", "inspect TRIANGLE DIR/s.toml"},
      {"S9", "s.toml", "[path]\nduration_ns = -3\n", "inspect TRIANGLE DIR/s.toml"},
      {"S10", "s.toml", "[path]\nstart = \"classical\"\nstart_bits = [0, 1]\npoints = [[0, 1], [1, 0.5]]\nduration_ns = 5\n",
       "anneal TRIANGLE DIR/s.toml"},
      // --- paths ---
      {"F1", "", "", "inspect DIR/missing.toml"},
      {"F2", "", "", "inspect DIR"},
      {"F3", "", "", "inspect /proc/self/mem"},
      // --- outputs ---
      {"O1", "", "", "anneal TRIANGLE LINEAR --out DIR"},
      {"O2", "", "", "anneal TRIANGLE LINEAR --out DIR/no-such-folder/run.h5"},
      {"O3", "", "", "anneal TRIANGLE LINEAR --out /proc/self/run.h5"},
      {"O4", "", "", "anneal TRIANGLE LINEAR --csv DIR"},
      // --- options ---
      {"C1", "", "", "anneal TRIANGLE LINEAR --tolerance 0.5"},
      {"C2", "", "", "anneal TRIANGLE LINEAR -d 0"},
      {"C3", "", "", "anneal TRIANGLE LINEAR -d twenty"},
      // --- round two: outputs never replace inputs or special files; journals and interrupts ---
      {"R2C1", "p.toml", "qubits = 2\ncouplings = [[0, 1, -1.0]]\nfields = [0.25, 0.0]\n",
       "anneal DIR/p.toml LINEAR -d 5 --csv DIR/p.toml"},
      {"R2C2", "", "", "anneal TRIANGLE LINEAR -d 5 --out DIR/x.h5 --csv DIR/x.h5"},
      {"R2C3", "", "", "durations TRIANGLE LINEAR --durations 5 --out DIR/x.h5 --csv DIR/x.h5.journal"},
      {"R2C4", "s.toml", "[path]\nduration_ns = 20\n", "gap-path TRIANGLE DIR/s.toml --out DIR/s.toml"},
      {"R2C5", "", "", "anneal TRIANGLE LINEAR -d 5 --out ''"},
      {"R2C6", "", "", "durations TRIANGLE LINEAR --durations 5 --csv ''"},
      // --- round two: numbers that were silently wrong; messages that help ---
      {"R2D3", "", "", "durations TRIANGLE LINEAR --durations 0"},
      {"R2D4", "p.toml", "qubits = 100000\n", "inspect DIR/p.toml"},
      {"R2D5", "", "", "anneall TRIANGLE LINEAR"},
      {"R2D6", "", "", "inspect DIR/" + std::string(260, 'n') + ".toml"},
      {"R2D7", "", "", "inspect DIR/no-such-folder/p.toml"},
      {"R2D8", "b.toml", "qubits = 25\n", "ensemble DIR LINEAR -d 5 -q --out DIR/study.h5"},
      {"R2D9", "p.toml", "qubits = 2\nlabels = [\"x\\u001b[2J\", \"x\\u001b[2J\"]\n", "inspect DIR/p.toml"},
      // --- round two: crashes, lost results, paths kept as written ---
      {"R2A2", "", "", "anneal TRIANGLE PAUSE -d 5e-324"},
      {"R2A4", "p.toml", "qubits = 2\n[" + deep_key(100) + "]\n", "inspect DIR/p.toml"},
      {"R2A6", "s.toml", kScheduleHead + "a_max_ghz = 5.0\nb_max_ghz = 0\n", "inspect TRIANGLE DIR/s.toml"},
      {"R2A7", "s.toml", "[scales]\nkind = \"table\"\ns = [0, 1]\na_ghz = [5, 0]\nb_ghz = [0, 0]\n", "inspect TRIANGLE DIR/s.toml"},
      {"R2A8", "s.toml", "[path]\nduration_ns = 10\nstart_bits = [0, 1, 1]\n", "anneal TRIANGLE DIR/s.toml"},
      {"R2A9", "", "", "gap-path TRIANGLE LINEAR --durations=-5 --out DIR/g.toml"},
      // --- Round two: bad input is exit 2; runs that would never finish (one shared check per kind) ---
      {"R2B1", "", "", "pause-map TRIANGLE LINEAR -d 30 --target 2 --out DIR/m.h5"},
      {"R2B2", "", "", "pause-map TRIANGLE LINEAR -d 30 --tolerance 0.5 --out DIR/m.h5"},
      {"R2B3", "", "", "diagnose TRIANGLE LINEAR -d 10 --sigma-h nan"},
      {"R2B4", "", "", "embed-cost TRIANGLE SRC/data-samples/triangle-ring-embedding.toml LINEAR --strengths 1e308 --absolute"},
      {"R2B5", "", "", "pause-map TRIANGLE LINEAR -d 30 --threads -1 --out DIR/m.h5"},
      {"R2B6", "", "", "durations TRIANGLE LINEAR --threads 100000"},
      {"R2B7", "", "", "anneal TRIANGLE LINEAR --trace-points 100000000"},
      {"R2B8", "p.toml", "qubits = 1\nfields = [0.5]\n", "anneal DIR/p.toml LINEAR -d 10 --observe-s 0.5 --levels 4"},
      {"R2B9", "", "", "anneal TRIANGLE LINEAR -d 1e9"},
      {"R2B10", "p.toml", "qubits = 3\nfields = [1e6, 0, 0]\ncouplings = [[0, 1, 1.0], [1, 2, 1.0], [0, 2, 1.0]]\n",
       "anneal DIR/p.toml LINEAR -d 1000"},
      {"R2B11", "", "", "pause-map TRIANGLE LINEAR -d 10 --cost added --pause-ns 1e12 --out DIR/m.h5"},
      {"R2B12", "", "", "diagnose TRIANGLE LINEAR -d 10 --sigma-h 1e12"},
      {"R2B13", "", "", "durations TRIANGLE LINEAR -d log:1:100:10000000"},
      {"R2B14", "", "", "gap TRIANGLE LINEAR --points 1000000000"},
      {"R2B15", "", "", "generate --count 2000000000 --out DIR/g.h5"},
      // --- Round two, finished: each command names its own option; paths that stay at one s ---
      {"R2K1", "", "", "gap-path TRIANGLE LINEAR --coarse 5000 --out DIR/g.toml"},
      {"R2K2", "", "", "ensemble SRC/data-samples/ring-chords-glasses LINEAR --gap-points 5000 --out DIR/e.h5"},
      {"R2K3", "p.toml", "qubits = 1\nfields = [0.5]\n", "compare-paths DIR/p.toml LINEAR -d 5 --levels 4"},
      {"R2K4", "s.toml", kScheduleHead + "a_max_ghz = 5.0\nb_max_ghz = 5.0\n[path]\ntime = \"ns\"\n"
                   "points = [[0.0, 1.0], [10.0, 1.0]]\nstart = \"classical\"\nstart_bits = [0, 1, 1]\n",
       "durations TRIANGLE DIR/s.toml"},
      {"R2K5", "s.toml", kScheduleHead + "a_max_ghz = 5.0\nb_max_ghz = 5.0\n[path]\ntime = \"ns\"\n"
                   "points = [[0.0, 0.5], [10.0, 0.5]]\nstart = \"ground\"\n",
       "diagnose TRIANGLE DIR/s.toml -d 10"},
      // --- thermal bath files (anneal --bath) ---
      {"TB1", "b.toml", kBathHead + "temperature_mk = -12\n", "anneal TRIANGLE LINEAR -d 5 --bath DIR/b.toml"},
      {"TB2", "b.toml", kBathHead + "coupling = -1e-3\n", "anneal TRIANGLE LINEAR -d 5 --bath DIR/b.toml"},
      {"TB3", "b.toml", kBathHead + "cutoff_ghz = 0\n", "anneal TRIANGLE LINEAR -d 5 --bath DIR/b.toml"},
      {"TB4", "b.toml", kBathHead + "temperature_K = 0.012\n", "anneal TRIANGLE LINEAR -d 5 --bath DIR/b.toml"},
      {"TB5", "b.toml", "temperature_mk = 12\n", "anneal TRIANGLE LINEAR -d 5 --bath DIR/b.toml"},
      {"TB6", "b.toml", kBathHead + "coupling = 5\n", "anneal TRIANGLE LINEAR -d 5 --bath DIR/b.toml"},
      {"TB7", "b.toml", kBathHead + "temperature_mk = nan\n", "anneal TRIANGLE LINEAR -d 5 --bath DIR/b.toml"},
      {"TB8", "b.toml", kBathHead + "temperature_mk = \"12 mK\"\n", "anneal TRIANGLE LINEAR -d 5 --bath DIR/b.toml"},
      {"TB10", "", "", "anneal TRIANGLE LINEAR -d 5 --bath DIR/no-bath.toml"},
      // --- One command-line grammar: lists, ranges, single durations, numbers a double cannot hold ---
      {"G1", "", "", "pause-map TRIANGLE LINEAR -d 5 --at 1:1000:4 --out DIR/m.h5"},
      {"G2", "", "", "durations TRIANGLE LINEAR -d log:0:10:3"},
      {"G3", "", "", "durations TRIANGLE LINEAR -d 5e-324"},
      {"G4", "", "", "pause-map TRIANGLE LINEAR -d 5 --pause-ns 0,1e400 --out DIR/m.h5"},
      {"G5", "", "", "anneal TRIANGLE LINEAR -d 20 --observe-s 0.5,1e-400"},
      {"G6", "", "", "anneal TRIANGLE LINEAR -d 5,10"},
      {"G7", "", "", "pause-map TRIANGLE LINEAR -d lin:5:10:2 --out DIR/m.h5"},
      {"G8", "", "", "generate --sizes 6-14:2 --out DIR/g.h5"},
      {"G9", "", "", "ensemble SRC/data-samples/ring-chords-glasses LINEAR -d 1,2,x --out DIR/e.h5"},
      {"G10", "", "", "durations TRIANGLE LINEAR -d 1,,2"},
      {"G11", "s.toml", kScheduleHead + "a_max_ghz = 5.0\nb_max_ghz = 5.0\n[path]\ntime = \"fraction\"\n"
                        "duration_ns = 5e-324\npoints = [[0.0, 0.0], [0.3, 0.5], [1.0, 1.0]]\n", "anneal TRIANGLE DIR/s.toml"},
      // --- h19-polish: limits shared by the command line and the Python module ---
      {"H19L1", "", "", "gap TRIANGLE LINEAR --levels 1"},
      {"H19L2", "", "", "diagnose TRIANGLE LINEAR -d 5 --levels 65"},
      {"H19L3", "", "", "diagnose TRIANGLE LINEAR -d 5 --window 0"},
      {"H19L4", "", "", "diagnose TRIANGLE LINEAR -d 5 --samples 2000000"},
      {"H19L5", "", "", "durations TRIANGLE LINEAR --probes 65"},

      // --- h18-outputs: fixed levels of the open-system anneal ---
      {"HO1", "", "", "anneal TRIANGLE LINEAR -d 5 --bath-levels 8"},
      {"HO2", "b.toml", kBathHead, "anneal TRIANGLE LINEAR -d 5 --bath DIR/b.toml --bath-levels 9"},
  };
}

}  // namespace

TEST_CASE("every row of the bad-input catalogue: exit code 2 and the catalogued message naming file, line and key") {
  const auto src = testing::source_dir();
  const std::string doc = read_text_file((src / "notebooks-free-docs/bad-input-catalogue.md").string());
  const bool dump = std::getenv("GAPWISE_CATALOGUE_DUMP") != nullptr;
  // The rows run side by side (each in its own folder; the commands are
  // independent processes), then are checked one by one: doctest's checks are
  // not thread-safe. Serially the catalogue took about 32 s.
  const std::vector<Row> all = rows();
  std::deque<TempDir> dirs;
  std::vector<std::string> commands;
  for (const Row& row : all) {
    const TempDir& dir = dirs.emplace_back();
    if (!row.file.empty()) dir.write(row.file, row.text);
    std::string args = replace_all(row.command, "DIR", dir.path.string());
    args = replace_all(args, "TRIANGLE", (src / "data-samples/triangle.toml").string());
    args = replace_all(args, "SRC", src.string());
    args = replace_all(args, "LINEAR", (src / "schedules/linear.toml").string());
    commands.push_back(replace_all(args, "PAUSE", (src / "schedules/pause.toml").string()));
  }
  std::vector<testing::CommandResult> results(all.size());
  std::atomic<std::size_t> next{0};
  std::vector<std::thread> workers;
  for (unsigned t = 0; t < std::max(4u, std::thread::hardware_concurrency()); ++t)
    workers.emplace_back([&] {
      for (std::size_t i; (i = next++) < all.size();) results[i] = testing::run_gapwise(commands[i], dirs[i]);
    });
  for (auto& w : workers) w.join();
  for (std::size_t i = 0; i < all.size(); ++i) {
    const Row& row = all[i];
    const TempDir& dir = dirs[i];
    const testing::CommandResult& r = results[i];
    std::string err = replace_all(r.err, dir.path.string(), "DIR");
    err = replace_all(err, src.string(), "SRC");
    err = err.substr(0, err.find('\n'));  // the message line (CLI11 adds a "Run with --help" line)
    if (dump) std::cout << row.id << "\t" << err << "\n";
    INFO("row " << row.id << ": gapwise " << row.command);
    CHECK(r.exit_code == 2);
    CHECK(r.out.empty());  // nothing that looks like a result
    CHECK(err == catalogued_message(doc, row.id));
    // The message names the place: the file (or option) it is about.
    CHECK((err.find("DIR") != std::string::npos || err.find("/proc/self") != std::string::npos || err.find("SRC") != std::string::npos ||
           err.find("--") != std::string::npos));
  }
}

TEST_CASE("an oversized input file is refused before it is parsed") {
  TempDir dir;
  {
    std::ofstream f(dir.path / "big.toml");
    const std::string line(1023, '#');
    for (int k = 0; k < 65 * 1024 + 1; ++k) f << line << '\n';
  }
  const auto r = testing::run_gapwise("inspect '" + (dir.path / "big.toml").string() + "'", dir);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("big.toml: the file is larger than 64 MiB") != std::string::npos);
}
