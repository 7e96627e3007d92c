// `figure` refuses a result file holding a NaN or an infinity where the dataset
// does not declare one (exit 2, the file, the dataset or attribute and the first
// bad entry named) instead of drawing a curve with a silent gap. gapwise writes
// NaN ("not applicable") and +inf (infinite TTS) only in datasets whose
// `nan_meaning` / `inf_meaning` attribute says so, so the files here are written
// by the real tool and then altered with the HDF5 C++ API.
#include <doctest/doctest.h>

#include <H5Cpp.h>

#include <cmath>
#include <filesystem>
#include <limits>
#include <string>
#include <vector>

#include "test_support.hpp"

using gapwise::testing::run_gapwise;
using gapwise::testing::source_dir;
using gapwise::testing::TempDir;

namespace {

std::string src(const std::string& rel) { return "'" + (source_dir() / rel).string() + "'"; }

std::string write_result(const TempDir& dir, const std::string& args, const std::string& name) {
  const std::string h5 = (dir.path / (name + ".h5")).string();
  auto r = run_gapwise(args + " --out '" + h5 + "'", dir);
  INFO(r.err);
  REQUIRE(r.exit_code == 0);
  return h5;
}

// Overwrites entry `index` (row-major) of a numeric dataset with `value`.
void poke_dataset(const std::string& h5, const std::string& dataset, std::size_t index, double value) {
  H5::H5File f(h5, H5F_ACC_RDWR);
  H5::DataSet ds = f.openDataSet(dataset);
  const auto n = static_cast<std::size_t>(ds.getSpace().getSimpleExtentNpoints());
  REQUIRE(index < n);
  std::vector<double> v(n);
  ds.read(v.data(), H5::PredType::NATIVE_DOUBLE);
  v[index] = value;
  ds.write(v.data(), H5::PredType::NATIVE_DOUBLE);
}

void poke_attribute(const std::string& h5, const std::string& group, const std::string& name, double value) {
  H5::H5File f(h5, H5F_ACC_RDWR);
  f.openGroup(group).openAttribute(name).write(H5::PredType::NATIVE_DOUBLE, &value);
}

gapwise::testing::CommandResult draw(const TempDir& dir, const std::string& h5) {
  return run_gapwise("figure '" + h5 + "' --out-dir '" + (dir.path / "figs").string() + "' --format png", dir);
}

}  // namespace

TEST_CASE("figure: a NaN in an anneal trace is refused, naming the file, the dataset and the entry") {
  TempDir dir;
  const auto h5 = write_result(dir, "anneal " + src("data-samples/triangle.toml") + " " + src("schedules/linear.toml") +
                                        " -d 5 --no-check", "run");
  REQUIRE(draw(dir, h5).exit_code == 0);  // the file as written draws
  poke_dataset(h5, "/anneal/trace/ground_probability", 7, std::numeric_limits<double>::quiet_NaN());
  auto f = draw(dir, h5);
  INFO(f.err);
  CHECK(f.exit_code == 2);
  CHECK(f.err.find("run.h5") != std::string::npos);
  CHECK(f.err.find("/anneal/trace/ground_probability") != std::string::npos);
  CHECK(f.err.find("entry 7") != std::string::npos);
  CHECK(f.out.find("wrote") == std::string::npos);
}

TEST_CASE("figure: an infinity in a matrix of levels (gap results) is refused with its row-major entry") {
  TempDir dir;
  const auto h5 = write_result(dir, "gap " + src("data-samples/meeting-slots-qubo.toml") + " " +
                                        src("schedules/linear.toml") + " --points 21", "gap");
  REQUIRE(draw(dir, h5).exit_code == 0);
  poke_dataset(h5, "/gap/curve/energies", 5, std::numeric_limits<double>::infinity());
  auto f = draw(dir, h5);
  INFO(f.err);
  CHECK(f.exit_code == 2);
  CHECK(f.err.find("/gap/curve/energies") != std::string::npos);
  CHECK(f.err.find("entry 5") != std::string::npos);
  CHECK(f.err.find("row-major") != std::string::npos);
}

TEST_CASE("figure: a NaN in an attribute a figure uses is refused, naming the attribute") {
  TempDir dir;
  const auto h5 = write_result(dir, "anneal " + src("data-samples/weak-field-ring.toml") + " " +
                                        src("schedules/linear.toml") + " -d 3 --no-check", "ring");
  poke_attribute(h5, "/anneal", "ground_probability", std::numeric_limits<double>::quiet_NaN());
  auto f = draw(dir, h5);
  INFO(f.err);
  CHECK(f.exit_code == 2);
  CHECK(f.err.find("ring.h5") != std::string::npos);
  CHECK(f.err.find("ground_probability") != std::string::npos);
}

TEST_CASE("figure: a declared NaN (\"not applicable\") is data, not an error") {
  // durations on the triangle with a linear schedule: the Landau-Zener
  // prediction does not apply there and /durations/points/p_landau_zener holds NaN.
  TempDir dir;
  const auto h5 = write_result(dir, "durations " + src("data-samples/triangle.toml") + " " +
                                        src("schedules/linear.toml") + " -d log:0.01:30:4 --no-search --quiet", "dur");
  {
    H5::H5File file(h5, H5F_ACC_RDONLY);
    H5::DataSet ds = file.openDataSet("/durations/points/p_landau_zener");
    std::vector<double> v(static_cast<std::size_t>(ds.getSpace().getSimpleExtentNpoints()));
    ds.read(v.data(), H5::PredType::NATIVE_DOUBLE);
    REQUIRE(!v.empty());
    CHECK(std::isnan(v.front()));  // the NaN is really there, and declared
    CHECK(ds.attrExists("nan_meaning"));
  }
  auto f = draw(dir, h5);
  INFO(f.err);
  CHECK(f.exit_code == 0);
  CHECK(std::filesystem::file_size(dir.path / "figs" / "dur-probability.png") > 1000);
}
