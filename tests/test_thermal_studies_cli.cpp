// `compare-paths --bath` and `diagnose --bath` end to end through the command
// line: result files read back, the thermal pause effect, eta = 0, and the
// refusals of the catalogue's section "h18-studies".
#include <doctest/doctest.h>

#include <cmath>
#include <fstream>
#include <sstream>

#include <fmt/format.h>

#include "io/hdf5_input.hpp"
#include "io/thermal_figures.hpp"
#include "test_support.hpp"

using namespace gapwise;
using testing::run_gapwise;
using testing::TempDir;

namespace {
// Invented demo inputs: two coupled qubits with unequal fields on linear scales A = 5 (1 - s), B = 20 s
// (minimum gap about 1.85 GHz near s = 0.39), and a bath at 40 mK (theta = 0.83 GHz) with eta = 1e-2.
const char* kTwoQubits =
    "format = \"gapwise-problem\"\nformat_version = 1\nkind = \"ising\"\nqubits = 2\n"
    "fields = [0.5, -0.3]\ncouplings = [[0, 1, -1.0]]\n";
const char* kLinear =
    "format = \"gapwise-schedule\"\nformat_version = 1\n[scales]\nkind = \"linear\"\na_max_ghz = 5.0\n"
    "b_max_ghz = 20.0\n[path]\ntime = \"fraction\"\npoints = [[0.0, 0.0], [1.0, 1.0]]\n";
std::string bath_text(double mk, double eta) {
  std::ostringstream s;
  s << "format = \"gapwise-bath\"\nformat_version = 1\ntemperature_mk = " << mk << "\ncoupling = " << eta
    << "\ncutoff_ghz = 8.0\n";
  return s.str();
}
std::string q(const std::filesystem::path& p) { return "'" + p.string() + "'"; }

/// The message column of the catalogue row `id` (notebooks-free-docs/bad-input-catalogue.md).
std::string catalogue_message(const std::string& id) {
  std::ifstream f(testing::source_dir() / "notebooks-free-docs/bad-input-catalogue.md");
  for (std::string line; std::getline(f, line);)
    if (line.rfind("| " + id + " |", 0) == 0) {
      const auto last = line.rfind(" |"), before = line.rfind(" | ", last - 1);
      return line.substr(before + 3, last - before - 3);
    }
  return "<row " + id + " not in the catalogue>";
}
}  // namespace

TEST_CASE("compare-paths --bath: a pause after the minimum gap raises p_bath with its length; eta = 0 is closed") {
  // Qualitative check of Marshall, Venturelli, Hen & Rieffel, Phys. Rev. Applied 11, 044083 (2019) (from memory):
  // with the temperature comparable to the gap, a pause after the minimum gap lets thermally excited population
  // relax back, so p rises with the pause length, while the closed system gains nothing (it is adiabatic here).
  // At equal total duration the ramps get faster as the pause grows, which only works against the effect.
  TempDir dir;
  const auto prob = dir.write("two.toml", kTwoQubits), sch = dir.write("lin.toml", kLinear);
  const auto bath = dir.write("bath.toml", bath_text(40, 1e-2));
  const auto out = dir.path / "c.h5", csv = dir.path / "c.csv";
  const auto r = run_gapwise("compare-paths " + q(prob) + " " + q(sch) +
                                 " --pause 0.6:0.3 --pause 0.6:0.6 --pause 0.6:0.9 -d 60 -q --bath " + q(bath) +
                                 " --out " + q(out) + " --csv " + q(csv),
                             dir);
  INFO(r.err);
  REQUIRE(r.exit_code == 0);
  CHECK(r.out.find("with the bath") != std::string::npos);
  const Hdf5Input in(out.string());
  const auto closed = in.read("/compare/ground_probability"), open = in.read("/compare/bath/ground_probability");
  REQUIRE(open.size() == 4);
  for (double p : closed) CHECK(p > 0.999);
  INFO("p with the bath, no pause and pauses of 30, 60, 90 %: " << open[0] << " " << open[1] << " " << open[2] << " "
                                                                << open[3]);
  CHECK(open[0] < open[1]);
  CHECK(open[1] < open[2]);
  CHECK(open[2] < open[3]);
  CHECK(open[3] - open[0] > 0.01);
  CHECK(open[0] < closed[0] - 0.01);  // the bath costs p without a pause
  CHECK(in.read_strings("/compare/bath/best_path_with_bath").at(0) == "pause s=0.6 for 90%");
  CHECK(in.attribute_double("/compare/bath", "theta_ghz") == doctest::Approx(0.04 * 20.836619).epsilon(1e-9));
  for (double x : in.read("/compare/bath/max_trace_deviation")) CHECK(x < 1e-9);
  for (double x : in.read("/compare/bath/min_eigenvalue")) CHECK(x > -1e-9);
  // The CSV carries the same p_bath (8 significant digits) in its own column.
  std::ifstream c(csv);
  std::string header, first;
  std::getline(c, header);
  std::getline(c, first);
  CHECK(header.find("p_bath") != std::string::npos);
  CHECK(first.find(fmt::format("{:.8g}", open[0]).substr(0, 8)) != std::string::npos);

  // eta = 0 (Albash, Boixo, Lidar & Zanardi, New J. Phys. 14, 123016 (2012)): the open runs are the closed ones.
  const auto none = dir.write("none.toml", bath_text(40, 0.0));
  const auto out0 = dir.path / "c0.h5";
  const auto r0 = run_gapwise("compare-paths " + q(prob) + " " + q(sch) + " --pause 0.6:0.6 -d 0.5 -q --bath " + q(none) +
                                  " --out " + q(out0),
                              dir);
  REQUIRE(r0.exit_code == 0);
  const Hdf5Input in0(out0.string());
  const auto c0 = in0.read("/compare/ground_probability"), o0 = in0.read("/compare/bath/ground_probability");
  REQUIRE(c0.size() == 2);
  CHECK(c0[0] < 0.99);  // short enough that the closed system loses population
  for (std::size_t k = 0; k < 2; ++k) CHECK(o0[k] == doctest::Approx(c0[k]).epsilon(2e-6));
}

TEST_CASE("diagnose --bath: /thermal read back, p equal to anneal --bath's, refusals as catalogued") {
  TempDir dir;
  const std::string src = testing::source_dir().string();
  const std::string tri = q(src + "/data-samples/triangle.toml"), hw = q(src + "/schedules/hardware-like.toml");
  const std::string bath = q(src + "/data-samples/bath-12mk.toml");
  const auto out = dir.path / "d.h5", an = dir.path / "a.h5";
  const auto r = run_gapwise("diagnose " + tri + " " + hw + " -d 100 --samples 0 -q --bath " + bath + " --out " + q(out), dir);
  INFO(r.err);
  REQUIRE(r.exit_code == 0);
  CHECK(r.out.find("thermal channel") != std::string::npos);
  CHECK(r.out.find("freeze-out") != std::string::npos);
  const auto a = run_gapwise("anneal " + tri + " " + hw + " -d 100 -q --bath " + bath + " --out " + q(an), dir);
  REQUIRE(a.exit_code == 0);
  const Hdf5Input d(out.string()), x(an.string());
  // The piecewise run of the thermal channel against anneal's own open run (one piece per waypoint there).
  const double p_anneal = x.attribute_double("/anneal/open_system", "ground_probability");
  CHECK(d.read("/thermal/ground_probability").at(0) == doctest::Approx(p_anneal).epsilon(1e-5));
  CHECK(d.attribute_double("/thermal", "theta_ghz") == doctest::Approx(0.012 * 20.836619).epsilon(1e-9));
  const auto s = d.read("/thermal/duration_0/s"), grp = d.read("/thermal/duration_0/ground_group_population");
  const auto n = d.read("/thermal/duration_0/remaining_relaxations");
  REQUIRE(s.size() >= 41);
  CHECK(s.front() == 0.0);
  CHECK(s.back() == 1.0);
  CHECK(grp.front() == doctest::Approx(1.0).epsilon(1e-12));
  for (std::size_t k = 1; k < n.size(); ++k) CHECK(n[k] <= n[k - 1]);
  const double fs = d.read("/thermal/freeze_out_s").at(0);
  const double total = d.read("/thermal/total_relaxations").at(0);
  if (total >= 1) {
    // N at the observations brackets the freeze-out point: >= 1 before it, < 1 after it.
    for (std::size_t k = 0; k < s.size(); ++k) {
      if (s[k] < fs - 1e-9) CHECK(n[k] >= 1.0);
      if (s[k] > fs + 1e-9) CHECK(n[k] < 1.0);
    }
  } else {
    CHECK(std::isnan(fs));
  }
  const auto shape = d.shape("/thermal/duration_0/level_population");
  CHECK(shape.at(0) == s.size());
  CHECK(shape.at(1) == 4);

  // Refusals (catalogue section "h18-studies").
  const auto p10 = dir.write("p10.toml", "format = \"gapwise-problem\"\nformat_version = 1\nkind = \"ising\"\n"
                                         "qubits = 10\ncouplings = [[0, 1, -1.0]]\n");
  const std::string lin = q(src + "/schedules/linear.toml");
  const struct {
    const char* id;
    std::string args;
  } rows[] = {
      {"TS1", "diagnose " + tri + " " + lin + " -d 5 --samples 0 --thermal-points 41"},
      {"TS2", "diagnose " + q(p10) + " " + lin + " -d 5 --bath " + bath},
  };
  for (const auto& row : rows) {
    const auto e = run_gapwise(row.args, dir);
    INFO(row.id << ": " << e.err);
    CHECK(e.exit_code == 2);
    CHECK(e.out.empty());
    CHECK(e.err == catalogue_message(row.id) + "\n");
  }
}

TEST_CASE("diagnose --bath figures: the notes explain the dashed gap = theta lines only when some are drawn") {
  // kTwoQubits has its minimum gap of about 1.85 GHz: at 12 mK (theta = 0.25 GHz) the gap never falls
  // to theta, at 200 mK (theta = 4.17 GHz; theta = k_B T / h = 20.8366 GHz/K x T, CODATA) it does.
  TempDir dir;
  const auto prob = dir.path / "two.toml", sched = dir.path / "linear.toml";
  std::ofstream(prob) << kTwoQubits;
  std::ofstream(sched) << kLinear;
  for (const double mk : {12.0, 200.0}) {
    CAPTURE(mk);
    const auto bath = dir.path / fmt::format("bath-{}.toml", mk), out = dir.path / fmt::format("d-{}.h5", mk);
    std::ofstream(bath) << bath_text(mk, 1e-3);
    const auto r = run_gapwise("diagnose " + q(prob) + " " + q(sched) + " -d 5 --samples 0 -q --bath " + q(bath) +
                                   " --out " + q(out),
                               dir);
    INFO(r.err);
    REQUIRE(r.exit_code == 0);
    const Hdf5Input in(out.string());
    const auto cross = in.read("/thermal/gap_theta_crossings_s");
    const bool lines = !cross.empty() && std::isfinite(cross.front());
    CHECK(lines == (mk > 100));  // the two baths straddle the minimum gap
    const auto plots = thermal_channel_plots(in);
    REQUIRE(plots.size() == 2);
    for (const auto& [kind, plot] : plots) {
      CAPTURE(kind);
      CHECK(plot.vertical_lines.size() == cross.size());
      CHECK((plot.note.find("dashed vertical lines") != std::string::npos) == lines);
    }
  }
}
