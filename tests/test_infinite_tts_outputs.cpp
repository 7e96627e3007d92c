// Results with p = 0 are results: an infinite time to solution (no number of
// repetitions reaches the target when each run fails for sure; TTS =
// t_f ln(1-p*)/ln(1-p), common practice in annealing benchmarks) is written the
// same way by every writer (io/infinite_tts.hpp: IEEE +inf in HDF5 with an
// `inf_meaning` attribute saying why, "inf" in tables and CSV, the key left out
// of JSON), never aborting the write. A reverse anneal that turns
// at s = 1 never leaves the classical problem Hamiltonian, so a start state
// outside the ground manifold ends there with p = 0 exactly.
#include <doctest/doctest.h>

#include <cmath>
#include <limits>
#include <string>

#include "io/hdf5_input.hpp"
#include "io/infinite_tts.hpp"
#include "io/toml_reader.hpp"
#include "test_support.hpp"

using namespace gapwise;
using testing::TempDir;

namespace {
std::string sample(const std::string& rel) { return "'" + (testing::source_dir() / rel).string() + "' "; }
const double kInf = std::numeric_limits<double>::infinity();
}  // namespace

TEST_CASE("the one convention for an infinite TTS, and its inverse") {
  CHECK(stored_tts(kInf) == kInf);
  CHECK(stored_tts(12.5) == 12.5);
  CHECK(tts_text(kInf) == "inf");
  CHECK(tts_text(2087.7, 6) == "2087.7");
  CHECK(tts_meaning("ns").units == "ns");
  CHECK(tts_meaning("ns").inf_meaning.find("p = 0") != std::string::npos);
  CHECK(not_applicable("1", "end gap").nan_meaning == "not applicable: end gap");
  toml::table j;
  put_tts(j, "tts_ns", kInf);
  put_tts(j, "reference_tts_ns", 5.0);
  CHECK(!j.contains("tts_ns"));
  CHECK(j["reference_tts_ns"].value<double>() == 5.0);
}

TEST_CASE("reverse-map with a turn at s = 1 writes the whole map, p = 0 cells with TTS +inf") {
  TempDir dir;
  const std::string out = (dir.path / "rev.h5").string();
  const auto r = testing::run_gapwise("reverse-map " + sample("data-samples/triangle.toml") + sample("schedules/reverse.toml") +
                                          "--turn 0.5,1 --dwell-ns 0,2 --ramp-ns 2 --out '" + out + "'",
                                      dir);
  INFO(r.err);
  REQUIRE(r.exit_code == 0);
  const Hdf5Input h5(out);
  const auto p = h5.read("/reverse_map/ground_probability");
  const auto tts = h5.read("/reverse_map/tts_ns");
  REQUIRE(p.size() == 4);
  REQUIRE(tts.size() == 4);
  // Row 0 (turn 0.5) leaves s = 1 and can find the ground state; row 1 (turn 1) cannot.
  CHECK(p[0] > 0.0);
  CHECK(tts[0] > 0.0);
  CHECK(p[2] == 0.0);
  CHECK(p[3] == 0.0);
  CHECK(tts[2] == kInf);
  CHECK(tts[3] == kInf);
  CHECK(h5.attribute_string("/reverse_map/tts_ns", "units") == "ns");
  CHECK(h5.has_attribute("/reverse_map/tts_ns", "inf_meaning"));
  CHECK(h5.read_finite("/reverse_map/tts_ns")[3] == kInf);  // declared, so readers take it
}

TEST_CASE("compare-paths on a path that never leaves s = 1 writes HDF5 and CSV, TTS as +inf and inf") {
  TempDir dir;
  dir.write("stay.toml",
            "format = \"gapwise-schedule\"\n[path]\ntime = \"ns\"\nstart = \"classical\"\nstart_bits = [0, 1, 1]\n"
            "[path.reverse]\nturn_s = 1\ndown = 2\ndwell = 1\n");
  const std::string out = (dir.path / "c.h5").string(), csv = (dir.path / "c.csv").string();
  const auto r = testing::run_gapwise("compare-paths " + sample("data-samples/triangle.toml") + "'" +
                                          (dir.path / "stay.toml").string() + "' -d 5 --out '" + out + "' --csv '" + csv + "'",
                                      dir);
  INFO(r.err);
  REQUIRE(r.exit_code == 0);
  const Hdf5Input h5(out);
  CHECK(h5.read("/compare/ground_probability") == std::vector<double>{0.0});
  CHECK(h5.read("/compare/tts_ns") == std::vector<double>{kInf});
  CHECK(h5.attribute_string("/compare/tts_ns", "units") == "ns");
  const std::string text = read_text_file(csv);
  CHECK(text.find(",0,inf,") != std::string::npos);
}
