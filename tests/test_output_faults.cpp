// Faults while writing results: a full disk (simulated with a file-size limit,
// RLIMIT_FSIZE via `ulimit -f`, in a child that ignores SIGXFSZ so writes fail
// with EFBIG as they would on a full disk) gives a clear error and a non-zero
// exit, leaves no partial file behind, keeps the previous result file byte for
// byte, and keeps the outputs that were complete before the failure.
// The same for HDF5 results (plain and sealed): Hdf5Output builds the file in
// memory and writes it with checked I/O, so HDF5 itself never meets the full
// disk (HDF5 1.10 segfaulted at exit after a failed flush, exit 139).
// HDF5 errors are reported with the file named and exit 1, never terminate().
#include <doctest/doctest.h>

#include <filesystem>
#include <fstream>

#include "io/hdf5_input.hpp"
#include "io/hdf5_output.hpp"
#include "io/hdf5_seal.hpp"
#include "io/instance_set_file.hpp"

#include "io/toml_reader.hpp"
#include "test_support.hpp"

using namespace gapwise;
namespace fs = std::filesystem;

namespace {
testing::CommandResult run_limited(const std::string& args, const testing::TempDir& dir, int limit_kib) {
  const auto script = dir.write("limited.sh", "trap '' XFSZ\nulimit -f " + std::to_string(limit_kib) + "\nexec '" +
                                                  testing::gapwise_exe() + "' " + args + "\n");
  const auto out = dir.path / "limited.out", err = dir.path / "limited.err";
  const std::string cmd = "bash '" + script.string() + "' >'" + out.string() + "' 2>'" + err.string() + "'";
  const int rc = std::system(cmd.c_str());
  return {WIFEXITED(rc) ? WEXITSTATUS(rc) : -1, read_text_file(out.string()), read_text_file(err.string())};
}
}  // namespace

TEST_CASE("a full disk while writing the CSV: clear error, nothing partial under the final name") {
  testing::TempDir dir;
  const auto src = testing::source_dir();
  const std::string csv = (dir.path / "trace.csv").string();
  const auto r = run_limited("anneal '" + (src / "data-samples/triangle.toml").string() + "' '" +
                                 (src / "schedules/linear.toml").string() +
                                 "' -d 5 --no-check --trace-points 400 --csv '" + csv + "'",
                             dir, 4);
  CHECK(r.exit_code == 1);
  CHECK(r.err.find("cannot write '" + csv + "': File too large") != std::string::npos);
  CHECK(!fs::exists(csv));
  for (const auto& e : fs::directory_iterator(dir.path))
    CHECK(e.path().filename().string().find(".tmp-") == std::string::npos);
}

namespace {
void check_no_temporaries(const testing::TempDir& dir) {
  for (const auto& e : fs::directory_iterator(dir.path)) {
    CHECK(e.path().filename().string().find(".tmp-") == std::string::npos);
    CHECK(e.path().filename().string().find(".probe-") == std::string::npos);
  }
}
std::string triangle_anneal(const std::string& h5) {
  const auto src = testing::source_dir();
  return "anneal '" + (src / "data-samples/triangle.toml").string() + "' '" + (src / "schedules/linear.toml").string() +
         "' -d 20 --trace-points 400 --out '" + h5 + "'";
}
}  // namespace

TEST_CASE("a full disk while writing an HDF5 result: exit 1 naming the file, no crash, old result kept") {
  testing::TempDir dir;
  const std::string h5 = (dir.path / "run.h5").string();
  // A finished result from before, which the failed run must not damage.
  const auto first = run_limited(triangle_anneal(h5), dir, 1 << 20);
  REQUIRE(first.exit_code == 0);
  const std::string before = read_text_file(h5);
  REQUIRE(before.size() > 8 * 1024);
  for (int limit_kib : {1, 4, 8}) {
    CAPTURE(limit_kib);
    const auto r = run_limited(triangle_anneal(h5), dir, limit_kib);
    CHECK(r.exit_code == 1);  // not 139 (SIGSEGV) or 134 (terminate)
    CHECK(r.err.find("cannot write '" + h5 + "': File too large") != std::string::npos);
    CHECK(r.err.find("H5") == std::string::npos);  // no HDF5 error stack or destructor chatter
    CHECK(read_text_file(h5) == before);
    check_no_temporaries(dir);
  }
}

TEST_CASE("a full disk while writing a sealed instance set: nothing under the final name, and a good write is sealed") {
  testing::TempDir dir;
  const std::string set = (dir.path / "set.h5").string();
  const std::string args = "generate --sizes 6,8 --count 6 --seed 3 --out '" + set + "'";
  const auto r = run_limited(args, dir, 4);
  CHECK(r.exit_code == 1);
  CHECK(r.err.find("cannot write '" + set + "': File too large") != std::string::npos);
  CHECK(!fs::exists(set));
  check_no_temporaries(dir);
  // Without the limit the same command writes a whole, sealed file (the seal
  // header at 0, the HDF5 signature at 512) that reads back.
  const auto ok = run_limited(args, dir, 1 << 20);
  REQUIRE(ok.exit_code == 0);
  const std::string bytes = read_text_file(set);
  REQUIRE(bytes.size() > kSealBytes + 8);
  CHECK(bytes.rfind("gapwise-sealed-hdf5 1\n", 0) == 0);
  CHECK(bytes.substr(kSealBytes, 4) == "\x89HDF");
  CHECK_NOTHROW(check_hdf5_seal(bytes, set, "gapwise-instance-set"));
  CHECK(read_instance_set(set).instances.size() == 12);
}

TEST_CASE("HDF5 trouble is an error message with the file named, never an abort") {
  testing::TempDir dir;
  const std::string h5 = (dir.path / "run.h5").string();
  REQUIRE(testing::run_gapwise(triangle_anneal(h5), dir).exit_code == 0);
  const std::string whole = read_text_file(h5);
  SUBCASE("a truncated result given to figure") {
    for (std::size_t keep : {std::size_t{0}, std::size_t{100}, whole.size() / 2, whole.size() - 1}) {
      CAPTURE(keep);
      const auto cut = dir.write("cut.h5", whole.substr(0, keep));
      const auto r = testing::run_gapwise("figure '" + cut.string() + "' --out-dir '" + (dir.path / "figs").string() + "'", dir);
      CHECK(r.exit_code == 2);
      CHECK(r.err.rfind("gapwise: error: " + cut.string() + ":", 0) == 0);
      CHECK(r.err.find("Fix:") != std::string::npos);
      CHECK(r.err.find("HDF5-DIAG") == std::string::npos);
    }
  }
  SUBCASE("damaged bytes in a result given to figure") {
    // Every 97th byte flipped from the middle on: either a clear input error
    // naming the file, or (where HDF5 did not read the damaged bytes) figures.
    std::string bad = whole;
    for (std::size_t k = bad.size() / 2; k < bad.size(); k += 97) bad[k] = static_cast<char>(~bad[k]);
    const auto path = dir.write("bad.h5", bad);
    const auto r = testing::run_gapwise("figure '" + path.string() + "' --out-dir '" + (dir.path / "figs").string() + "'", dir);
    CHECK((r.exit_code == 0 || r.exit_code == 2));
    if (r.exit_code == 2) CHECK(r.err.rfind("gapwise: error: " + path.string() + ":", 0) == 0);
    CHECK(r.err.find("HDF5-DIAG") == std::string::npos);
  }
  SUBCASE("a directory as the HDF5 output") {
    fs::create_directory(dir.path / "out.h5");
    const auto r = testing::run_gapwise(triangle_anneal((dir.path / "out.h5").string()), dir);
    CHECK(r.exit_code == 2);
    CHECK(r.err.find("the output path is a directory") != std::string::npos);
  }
  SUBCASE("a library misuse inside HDF5 (a dataset written twice) names the file and the dataset") {
    const std::string path = (dir.path / "twice.h5").string();
    Hdf5Output out(path);
    out.write("/a/x", std::vector<double>{1.0}, "1");
    std::string message;
    try {
      out.write("/a/x", std::vector<double>{2.0}, "1");
    } catch (const std::runtime_error& e) {
      message = e.what();
    }
    CHECK(message.find("cannot write dataset '/a/x' into '" + path + "'") != std::string::npos);
    out.commit();
    CHECK(Hdf5Input(path).read("/a/x") == std::vector<double>{1.0});
  }
}

// PLplot's cairo drivers do not report a failed write: before, `figure` said
// "wrote" for a cut-off or empty image and renamed it over the previous one.
TEST_CASE("a full disk while drawing figures: exit non-zero naming the image, no cut-off image, the old one kept") {
  testing::TempDir dir;
  const std::string h5 = (dir.path / "run.h5").string(), figs = (dir.path / "figs").string();
  REQUIRE(run_limited(triangle_anneal(h5), dir, 1 << 20).exit_code == 0);
  const std::string draw = "figure '" + h5 + "' --out-dir '" + figs + "'";
  REQUIRE(run_limited(draw, dir, 1 << 20).exit_code == 0);  // complete figures from before
  const std::string svg = figs + "/run-anneal-trace.svg", png = figs + "/run-anneal-trace.png";
  const std::string svg_before = read_text_file(svg), png_before = read_text_file(png);
  REQUIRE(svg_before.size() > 8 * 1024);
  REQUIRE(png_before.size() > 8 * 1024);
  for (int limit_kib : {1, 4}) {  // both images are larger than this: each is cut off
    CAPTURE(limit_kib);
    const auto r = run_limited(draw, dir, limit_kib);
    CHECK(r.exit_code == 1);
    CHECK(r.out.find("wrote") == std::string::npos);
    CHECK(r.err.find("cannot write '" + svg + "': the image came out incomplete") != std::string::npos);
    CHECK(read_text_file(svg) == svg_before);
    CHECK(read_text_file(png) == png_before);
    for (const auto& e : fs::directory_iterator(figs)) CHECK(e.path().filename().string().find(".tmp-") == std::string::npos);
  }
  // A PNG cut off alone (SVG not asked for) is caught by its missing IEND chunk.
  const auto r = run_limited(draw + " --format png", dir, 4);
  CHECK(r.exit_code == 1);
  CHECK(r.err.find("cannot write '" + png + "': the image came out incomplete") != std::string::npos);
  CHECK(read_text_file(png) == png_before);
}
