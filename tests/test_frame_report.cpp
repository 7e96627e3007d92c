// What `anneal --propagator frame` tells the user about its own error control:
// the frame's error estimate described as what it is (grid halving, change of
// p with K, weight outside the kept levels), the leakage indicators, and how
// many pieces ran in the frame and how many fell back to full propagation,
// in the text report, the JSON summary and the HDF5 attributes.
//
// The run: the 8-qubit ring with weak fields (data-samples), linear scales,
// 300 ns, one trace point per piece. Its early stretch is fast for the frame
// (the fallback rule moves it to split4), so the run is a hybrid: both counts
// are non-zero, and the printed p must still agree with the default
// full-space propagator (split-auto) within the tolerance 1e-6.
#include <doctest/doctest.h>

#include <H5Cpp.h>

#include <cmath>
#include <cstdlib>
#include <fstream>
#include <string>

#include "test_support.hpp"

using gapwise::testing::run_gapwise;
using gapwise::testing::source_dir;
using gapwise::testing::TempDir;

namespace {

std::string quoted(const char* rel) { return "'" + (source_dir() / rel).string() + "'"; }

// Value of a top-level key of a JSON text, read with Python's json module.
double json_number(const TempDir& dir, const std::string& json, const std::string& key) {
  const auto f = dir.write("summary-" + key + ".json", json);
  const auto out = dir.path / ("value-" + key + ".txt");
  const std::string cmd = "/usr/bin/python3 -c \"import json,sys; print(float(json.load(open(sys.argv[1]))[sys.argv[2]]))\" '" +
                          f.string() + "' " + key + " > '" + out.string() + "'";
  REQUIRE(std::system(cmd.c_str()) == 0);
  std::ifstream in(out);
  double v = std::nan("");
  in >> v;
  return v;
}

double h5_attribute(const std::string& file, const char* name) {
  H5::H5File f(file, H5F_ACC_RDONLY);
  double v = std::nan("");
  H5::Attribute a = f.openGroup("/anneal").openAttribute(name);
  if (a.getDataType().getClass() == H5T_INTEGER) {
    long long i = 0;
    a.read(H5::PredType::NATIVE_LLONG, &i);
    v = static_cast<double>(i);
  } else {
    a.read(H5::PredType::NATIVE_DOUBLE, &v);
  }
  return v;
}

}  // namespace

TEST_CASE("anneal --propagator frame reports its leakage, K and fallback pieces") {
  TempDir dir;
  const std::string run = "anneal " + quoted("data-samples/weak-field-ring.toml") + " " + quoted("schedules/linear.toml") +
                          " -d 300 --trace-points 1 --no-check -q";
  const auto frame = run_gapwise(run + " --propagator frame --json", dir);
  REQUIRE(frame.exit_code == 0);
  const auto split = run_gapwise(run + " --json", dir);
  REQUIRE(split.exit_code == 0);

  const double p_frame = json_number(dir, frame.out, "ground_probability");
  const double p_split = json_number(dir, split.out, "ground_probability");
  CHECK(std::abs(p_frame - p_split) < 1e-6);

  const double in_frame = json_number(dir, frame.out, "frame_pieces");
  const double fell_back = json_number(dir, frame.out, "frame_fallback_pieces");
  CHECK(in_frame >= 1);
  CHECK(fell_back >= 1);  // the fast start of a 300 ns anneal: said, not hidden
  CHECK(json_number(dir, frame.out, "frame_levels") >= 4);
  const double top = json_number(dir, frame.out, "frame_top_level_population");
  CHECK(top >= 0.0);
  CHECK(top < 1e-3);
  const double dk = json_number(dir, frame.out, "frame_truncation_estimate");
  CHECK(dk >= 0.0);
  CHECK(dk <= json_number(dir, frame.out, "error_estimate"));

  // The text report: the frame's own error description and the piece counts.
  const auto text = run_gapwise(run + " --propagator frame --out '" + (dir.path / "r.h5").string() + "'", dir);
  REQUIRE(text.exit_code == 0);
  CHECK(text.out.find("change of p when K drops") != std::string::npos);
  CHECK(text.out.find("Richardson") == std::string::npos);  // that text is the split methods'
  CHECK(text.out.find("highest kept level") != std::string::npos);
  CHECK(text.out.find("by full propagation (split4)  (hybrid") != std::string::npos);

  const std::string h5 = (dir.path / "r.h5").string();
  CHECK(h5_attribute(h5, "frame_pieces") == in_frame);
  CHECK(h5_attribute(h5, "frame_fallback_pieces") == fell_back);
  CHECK(h5_attribute(h5, "frame_top_level_population") == doctest::Approx(top).epsilon(1e-12));
}
