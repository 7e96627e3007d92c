// `gapwise gap` end to end: summary, JSON, CSV and HDF5 outputs, refusals with
// exit code 2, and resuming a search from recorded points. The numbers are
// checked in test_gap_search; here the outputs must agree with the library and
// with the hand-derived single-qubit minimum.
#include <doctest/doctest.h>

#include <H5Cpp.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>

#include "io/result_journal.hpp"
#include "spectrum/gap_search.hpp"
#include "test_support.hpp"

using gapwise::testing::run_gapwise;
using gapwise::testing::source_dir;
using gapwise::testing::TempDir;
using namespace gapwise;

namespace {
std::string sample(const char* rel) { return "'" + (source_dir() / rel).string() + "'"; }

const char* kOneQubit = R"(format = "gapwise-problem"
format_version = 1
kind = "ising"
qubits = 1
fields = [0.35]
)";
}  // namespace

TEST_CASE("gap: one qubit, summary and files agree with the closed form") {
  // Linear 5 GHz ramps (the default scales): s* = 25 / (25 + 25 h^2), Delta_min = 25 h / sqrt(25 + 25 h^2).
  TempDir dir;
  const auto prob = dir.write("one.toml", kOneQubit);
  const auto h5 = dir.path / "g.h5", csv = dir.path / "g.csv";
  const auto r = run_gapwise("gap '" + prob.string() + "' --s-tolerance 1e-7 --out '" + h5.string() + "' --csv '" +
                                 csv.string() + "'",
                             dir);
  INFO(r.err);
  REQUIRE(r.exit_code == 0);
  CHECK(r.out.find("minimum gap  Delta_min = ") != std::string::npos);
  CHECK(r.out.find("defined as E_1 - E_0") != std::string::npos);
  CHECK(r.out.find("full space") != std::string::npos);
  CHECK(r.out.find("t_ad = max_s") != std::string::npos);
  const double h = 0.35, s_star = 1.0 / (1.0 + h * h), gap = 5.0 * h / std::sqrt(1.0 + h * h);
  H5::H5File f(h5.string(), H5F_ACC_RDONLY);
  auto attr = [&](const char* name) {
    double v = 0;
    f.openGroup("/gap").openAttribute(name).read(H5::PredType::NATIVE_DOUBLE, &v);
    return v;
  };
  CHECK(std::abs(attr("s_star") - s_star) <= attr("s_star_uncertainty") + 1e-12);
  CHECK(std::abs(attr("gap_ghz") - gap) <= attr("gap_uncertainty_ghz") + 1e-12);
  const H5::DataSet e = f.openDataSet("/gap/curve/energies");
  hsize_t dims[2] = {0, 0};
  e.getSpace().getSimpleExtentDims(dims);
  CHECK(dims[1] == 2);  // a single qubit has two levels
  CHECK(dims[0] >= 101);
  CHECK_FALSE(std::filesystem::exists(journal_path_for(h5.string())));  // removed once the result is complete
  std::ifstream in(csv);
  std::string header;
  std::getline(in, header);
  CHECK(header == "s,a_ghz,b_ghz,e0_ghz,e1_ghz,gap_Eg_E0_ghz,gap_E1_E0_ghz,m_g0_ghz,m_10_ghz,error_bound_ghz,origin");
}

TEST_CASE("gap: the spin glass sample runs in the even sector with g = 2 and says so") {
  TempDir dir;
  const auto r = run_gapwise("gap " + sample("data-samples/spin-glass-8.toml") + " " +
                                 sample("schedules/hardware-like.toml") + " --points 41 --json",
                             dir);
  INFO(r.err);
  REQUIRE(r.exit_code == 0);
  CHECK(r.out.find("\"sector\" : \"even\"") != std::string::npos);
  CHECK(r.out.find("\"ground_degeneracy_in_sector\" : 2") != std::string::npos);
  CHECK(r.out.find("E_2 - E_0") != std::string::npos);
  CHECK(r.out.find("E_1 - E_0 closes") != std::string::npos);
}

TEST_CASE("gap: impossible requests exit with 2 and name the fix") {
  TempDir dir;
  const auto prob = dir.write("one.toml", kOneQubit);
  auto r = run_gapwise("gap '" + prob.string() + "' --sector even", dir);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("--sector") != std::string::npos);
  std::ostringstream big;
  big << "format = \"gapwise-problem\"\nformat_version = 1\nkind = \"ising\"\nqubits = 21\ncouplings = [";
  for (int i = 0; i + 1 < 21; ++i) big << (i ? ", " : "") << "[" << i << ", " << i + 1 << ", -1.0]";
  big << "]\n";
  const auto bigp = dir.write("big.toml", big.str());
  r = run_gapwise("gap '" + bigp.string() + "'", dir);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("at most 20") != std::string::npos);
  CHECK(r.err.find("big.toml") != std::string::npos);
}

TEST_CASE("a search resumed from recorded points gives the same answer without recomputing them") {
  IsingProblem p(4);
  p.h = {0.1, -0.2, 0.0, 0.05};
  p.couplings = {{0, 1, 1.0}, {1, 2, -0.7}, {2, 3, 0.9}, {0, 3, 0.4}};
  const TransverseIsingHamiltonian H(p);
  const EnergyScales sc = EnergyScales::linear(5.0, 5.0);
  std::map<double, std::vector<double>> store;
  GapSearchOptions o;
  o.coarse_points = 31;
  o.record = [&](const SpectrumPoint& pt) { store[pt.s] = spectrum_point_values(pt); };
  const MinimumGapReport first = find_minimum_gap(H, sc, o);
  REQUIRE(store.size() == first.evaluations);
  GapSearchOptions again = o;
  int recomputed = 0;
  again.record = [&](const SpectrumPoint&) { ++recomputed; };
  again.lookup = [&](double s) -> std::optional<SpectrumPoint> {
    auto it = store.find(s);
    if (it == store.end()) return std::nullopt;
    return spectrum_point_from_values(s, it->second, first.levels);
  };
  const MinimumGapReport second = find_minimum_gap(H, sc, again);
  CHECK(recomputed == 0);
  CHECK(second.resumed_points == first.evaluations);
  CHECK(second.gap_ghz == first.gap_ghz);
  CHECK(second.s_star == first.s_star);
}
