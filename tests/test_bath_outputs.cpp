// Thermal-bath outputs of durations and anneal, end to end (branch h18-outputs):
// the HDF5 datasets of `durations --bath` read back, eta = 0 reproducing the
// closed system, and `--bath-levels K` honoured and reported as not checked.
#include <doctest/doctest.h>

#include <cmath>
#include <fstream>
#include <string>

#include <H5Cpp.h>
#include <hdf5_hl.h>

#include "io/hdf5_input.hpp"
#include "test_support.hpp"

using gapwise::testing::run_gapwise;
using gapwise::testing::source_dir;
using gapwise::testing::TempDir;

namespace {
std::string sample(const char* rel) { return "'" + (source_dir() / rel).string() + "'"; }

std::string write_bath(const TempDir& dir, double eta) {
  const auto p = dir.path / "bath.toml";
  std::ofstream(p) << "format = \"gapwise-bath\"\ntemperature_mk = 12.0\ncoupling = " << eta << "\ncutoff_ghz = 8.0\n";
  return "'" + p.string() + "'";
}

std::string slurp(const std::filesystem::path& p) {
  std::ifstream f(p);
  return std::string((std::istreambuf_iterator<char>(f)), {});
}
}  // namespace

TEST_CASE("durations --bath with eta = 0 gives p_bath = p_closed, read back from the HDF5 file and the CSV") {
  // Albash, Boixo, Lidar & Zanardi, New J. Phys. 14, 123016 (2012): with the
  // coupling off the adiabatic master equation is the von Neumann equation, so
  // p with the bath equals the closed system's p (each to its tolerance 1e-6).
  TempDir dir;
  const auto out = dir.path / "d.h5", csv = dir.path / "d.csv";
  const auto r = run_gapwise("durations " + sample("data-samples/triangle.toml") + " " + sample("schedules/hardware-like.toml") +
                                 " -d 2,20 --no-search --no-predictions -q --bath " + write_bath(dir, 0.0) + " --out '" +
                                 out.string() + "' --csv '" + csv.string() + "'",
                             dir);
  REQUIRE_MESSAGE(r.exit_code == 0, r.err);
  gapwise::Hdf5Input h5(out.string());
  const std::string g = "/durations/open_system";
  const auto t = h5.read_finite(g + "/duration_ns");
  const auto pb = h5.read_finite(g + "/ground_probability");
  const auto pc = h5.read_finite(g + "/closed_ground_probability");
  REQUIRE(t.size() == 2);
  CHECK(t[0] == 2.0);
  CHECK(t[1] == 20.0);
  for (std::size_t k = 0; k < 2; ++k) {
    INFO("t_f = " << t[k] << ": p_bath " << pb[k] << ", p_closed " << pc[k]);
    CHECK(std::abs(pb[k] - pc[k]) < 1e-5);
  }
  CHECK(pc[0] < 0.99);  // a non-trivial p at 2 ns, so the comparison means something
  CHECK(h5.attribute_string(g, "levels_choice") == "all levels");
  CHECK(h5.attribute_double(g, "coupling") == 0.0);
  // Units on every dataset, the duration axis attached as dimension scale.
  H5::H5File f(out.string(), H5F_ACC_RDONLY);
  for (const char* name : {"ground_probability", "closed_ground_probability", "tts_ns", "closed_tts_ns",
                           "max_trace_deviation", "min_eigenvalue", "truncation_estimate", "levels", "steps"}) {
    INFO(name);
    H5::DataSet ds = f.openDataSet(g + "/" + name);
    CHECK(ds.attrExists("units"));
    H5::DataSet axis = f.openDataSet(g + "/duration_ns");
    CHECK(H5DSis_attached(ds.getId(), axis.getId(), 0) > 0);
  }
  // truncation_estimate: NaN (all levels kept), documented by nan_meaning.
  const auto est = h5.read(g + "/truncation_estimate");
  CHECK(std::isnan(est[0]));
  CHECK(f.openDataSet(g + "/truncation_estimate").attrExists("nan_meaning"));
  // Beside every point, and in the CSV.
  const auto pp = h5.read(std::string("/durations/points/p_bath"));
  REQUIRE(pp.size() == 2);
  CHECK(pp[0] == pb[0]);
  const std::string text = slurp(csv);
  CHECK(text.find("p_bath,tts_bath_ns") != std::string::npos);
}

TEST_CASE("--bath-levels K runs the truncated master equation at exactly K and says it is not checked") {
  TempDir dir;
  const std::string args = "anneal " + sample("data-samples/triangle.toml") + " " + sample("schedules/hardware-like.toml") +
                           " -d 20 -q --bath " + write_bath(dir, 1e-3) + " --bath-levels 4";
  const auto j = run_gapwise(args + " --json", dir);
  REQUIRE_MESSAGE(j.exit_code == 0, j.err);
  CHECK(j.out.find("\"levels\" : 4") != std::string::npos);
  CHECK(j.out.find("\"levels_choice\" : \"fixed, not checked\"") != std::string::npos);
  CHECK(j.out.find("\"propagator\" : \"ame-truncated\"") != std::string::npos);
  CHECK(j.out.find("truncation_estimate") == std::string::npos);  // the check is not run
  const auto txt = run_gapwise(args, dir);
  REQUIRE(txt.exit_code == 0);
  CHECK(txt.out.find("K = 4 lowest levels, fixed by --bath-levels, not checked") != std::string::npos);
  // Without the option the same 3-qubit run keeps all levels (ame-full).
  const auto full = run_gapwise("anneal " + sample("data-samples/triangle.toml") + " " + sample("schedules/hardware-like.toml") +
                                    " -d 20 -q --json --bath " + write_bath(dir, 1e-3),
                                dir);
  REQUIRE(full.exit_code == 0);
  CHECK(full.out.find("\"levels_choice\" : \"all levels\"") != std::string::npos);
}
