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
#include <vector>

#include "io/problem_file.hpp"
#include "io/result_journal.hpp"
#include "schedule/schedule.hpp"
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
  CHECK(dims[0] >= 26);  // the default coarse grid, plus subdivision and refinement
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

namespace {
// One point of /gap/eigenvectors: s, A, B, energies and the levels x 2^n matrix.
struct StoredVectors {
  double s = 0, a = 0, b = 0;
  std::vector<double> energies, vectors;
  hsize_t rows = 0, cols = 0;
};

StoredVectors read_vectors(const H5::H5File& f, int i) {
  StoredVectors v;
  const std::string P = "/gap/eigenvectors/" + std::to_string(i);
  const H5::Group g = f.openGroup(P);
  g.openAttribute("s").read(H5::PredType::NATIVE_DOUBLE, &v.s);
  g.openAttribute("a_ghz").read(H5::PredType::NATIVE_DOUBLE, &v.a);
  g.openAttribute("b_ghz").read(H5::PredType::NATIVE_DOUBLE, &v.b);
  const H5::DataSet e = f.openDataSet(P + "/energies");
  hsize_t n = 0;
  e.getSpace().getSimpleExtentDims(&n);
  v.energies.resize(n);
  e.read(v.energies.data(), H5::PredType::NATIVE_DOUBLE);
  const H5::DataSet m = f.openDataSet(P + "/vectors");
  hsize_t dims[2] = {0, 0};
  m.getSpace().getSimpleExtentDims(dims);
  v.rows = dims[0];
  v.cols = dims[1];
  v.vectors.resize(dims[0] * dims[1]);
  m.read(v.vectors.data(), H5::PredType::NATIVE_DOUBLE);
  return v;
}

// Checks each stored row against the definition of an eigenvector: with the
// library's full-space kernel (TransverseIsingHamiltonian::apply, not the sector
// operator the vectors were computed with), ||H v - E v|| <= 1e-9 (1 + |E|) and
// ||v|| = 1 to 1e-12. Returns the rows for further checks.
StoredVectors check_eigenpairs(const H5::H5File& f, int i, const TransverseIsingHamiltonian& H) {
  const StoredVectors v = read_vectors(f, i);
  REQUIRE(v.cols == H.dim());
  REQUIRE(v.rows == v.energies.size());
  std::vector<double> y(H.dim());
  for (hsize_t j = 0; j < v.rows; ++j) {
    const double* x = v.vectors.data() + j * v.cols;
    H.apply(v.a, v.b, x, y.data());
    double res = 0, norm = 0;
    for (std::size_t k = 0; k < H.dim(); ++k) {
      res += (y[k] - v.energies[j] * x[k]) * (y[k] - v.energies[j] * x[k]);
      norm += x[k] * x[k];
    }
    INFO("point " << i << ", level " << j << ", s = " << v.s);
    CHECK(std::sqrt(res) <= 1e-9 * (1.0 + std::abs(v.energies[j])));
    CHECK(std::abs(std::sqrt(norm) - 1.0) <= 1e-12);
  }
  return v;
}
}  // namespace

TEST_CASE("gap --vectors-at: written eigenvectors satisfy H v = E v in the full basis and are normalised") {
  TempDir dir;
  const auto h5 = dir.path / "v.h5";
  SUBCASE("no fields: even sector, expanded to the full basis") {
    const std::string prob = (source_dir() / "data-samples/spin-glass-8.toml").string();
    const auto r = run_gapwise("gap '" + prob + "' --points 41 --vectors-at star,0.2,0.9 --vector-levels 3 --out '" +
                                   h5.string() + "' --json",
                               dir);
    INFO(r.err);
    REQUIRE(r.exit_code == 0);
    const IsingProblem p = read_problem_file(prob);
    const TransverseIsingHamiltonian H(p);
    H5::H5File f(h5.string(), H5F_ACC_RDONLY);
    double s_star = 0;
    f.openGroup("/gap").openAttribute("s_star").read(H5::PredType::NATIVE_DOUBLE, &s_star);
    std::string sector;
    const H5::Attribute sa = f.openGroup("/gap/eigenvectors").openAttribute("sector");
    sa.read(sa.getStrType(), sector);
    CHECK(sector == "even");
    const double want_s[3] = {s_star, 0.2, 0.9};
    for (int i = 0; i < 3; ++i) {
      const StoredVectors v = check_eigenpairs(f, i, H);
      CHECK(v.s == want_s[i]);
      CHECK(v.rows == 3);
      // Default scales (linear, 5 GHz): A = 5 (1 - s), B = 5 s.
      CHECK(std::abs(v.a - 5.0 * (1.0 - v.s)) <= 1e-12);
      CHECK(std::abs(v.b - 5.0 * v.s) <= 1e-12);
      // Even under the global spin flip: v[b] = v[~b] (the documented expansion).
      const std::size_t top = H.dim() - 1;
      double asym = 0;
      for (hsize_t j = 0; j < v.rows; ++j)
        for (std::size_t b = 0; b < H.dim(); ++b)
          asym = std::max(asym, std::abs(v.vectors[j * v.cols + b] - v.vectors[j * v.cols + (top - b)]));
      CHECK(asym <= 1e-14);
    }
  }
  SUBCASE("fields: full space; the ground vector at s = 1 is the classical ground state") {
    const std::string prob = (source_dir() / "data-samples/weak-field-ring.toml").string();
    const auto r = run_gapwise("gap '" + prob + "' --points 41 --vectors-at 0.5,1 --out '" + h5.string() + "' --json", dir);
    INFO(r.err);
    REQUIRE(r.exit_code == 0);
    const IsingProblem p = read_problem_file(prob);
    const TransverseIsingHamiltonian H(p);
    H5::H5File f(h5.string(), H5F_ACC_RDONLY);
    check_eigenpairs(f, 0, H);
    const StoredVectors end = check_eigenpairs(f, 1, H);
    // At s = 1 (A = 0) H is diagonal; the field h_0 = -0.05 favours spin +1 on
    // qubit 0, so the ground state is all bits 0 (basis index 0), weight 1.
    CHECK(std::abs(std::abs(end.vectors[0]) - 1.0) <= 1e-12);
  }
}

TEST_CASE("gap --vectors-at: refused without --out and outside the s range") {
  TempDir dir;
  const auto prob = dir.write("one.toml", kOneQubit);
  auto r = run_gapwise("gap '" + prob.string() + "' --vectors-at star", dir);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("--out") != std::string::npos);
  r = run_gapwise("gap '" + prob.string() + "' --vectors-at 1.5 --out '" + (dir.path / "x.h5").string() + "'", dir);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("outside [0, 1]") != std::string::npos);
}
