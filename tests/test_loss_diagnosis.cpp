// The failure-mode diagnosis end to end: Landau-Zener at a sharpening crossing,
// sigma = 0 against the unperturbed numbers, input checks, the command line.
#include <doctest/doctest.h>

#include <cmath>

#include "io/input_error.hpp"
#include "io/schedule_file.hpp"
#include "late_crossing_instance.hpp"
#include "studies/loss_diagnosis.hpp"
#include "test_support.hpp"

using namespace gapwise;
using gapwise::testing::core_and_leaves;

// The instance and why it has a late crossing: late_crossing_instance.hpp.

TEST_CASE("the diagnosis names a sharpening crossing and its Landau-Zener loss matches the simulated transfer") {
  // Zener, Proc. R. Soc. A 137, 696 (1932): an isolated two-level crossing
  // passed at sweep rate v loses exp(-pi^2 Delta^2 / v) (units of the
  // conventions: H in GHz, t in ns). Durations chosen so that the predicted
  // loss is near 1/2, where a wrong Delta or v would show most. Tolerance 0.02:
  // the crossing is only approximately two-level and the sweep is finite
  // (Vitanov & Garraway, Phys. Rev. A 53, 4288 (1996)); measured differences
  // were below 0.006.
  const Schedule sch;  // linear 5 GHz scales, forward path
  struct Case { int k; double duration_ns; };
  for (const Case c : {Case{3, 5.0}, Case{4, 20.0}}) {
    CAPTURE(c.k);
    DiagnosisOptions o;
    o.durations_ns = {c.duration_ns};
    const Diagnosis d = diagnose_anneal(core_and_leaves(c.k, 0.5), sch, o);
    REQUIRE(d.crossings.size() == 1);
    const AvoidedCrossing& x = d.crossings[0];
    REQUIRE(x.late_crossing.has_value());
    const CrossingPassage& ps = x.passages[0];
    CHECK(ps.landau_zener_loss > 0.4);
    CHECK(ps.landau_zener_loss < 0.7);
    CHECK(std::abs(ps.transferred - ps.landau_zener_loss) < 0.02);
    // The late crossing is the gap minimum: the overlap switches at s*.
    CHECK(std::abs(d.overlap.late_crossings[*x.late_crossing].s_switch - x.minimum.s) < 0.01);
    // It limits p: ranked first, and the transfer accounts for the loss.
    const DurationDiagnosis& run = d.runs[0];
    CHECK(run.channels.front().kind == ChannelKind::LateCrossing);
    CHECK(std::abs((1 - run.anneal.ground_probability) - ps.transferred) < 0.01);
    // The lost probability sits on the excited manifold delta above the ground state.
    REQUIRE(!run.outcome.sink_levels.empty());
    CHECK(run.outcome.sink_levels[0].energy == doctest::Approx(d.ground.energy + 0.5));
    CHECK(run.outcome.sink_levels[0].states == (std::size_t{1} << c.k));
  }
}

TEST_CASE("sigma = 0 reproduces the unperturbed numbers exactly") {
  // Common practice, no source: with no error drawn the ensemble must repeat
  // the unperturbed computation bit for bit.
  const Schedule sch;
  DiagnosisOptions o;
  o.durations_ns = {5.0, 12.0};
  ControlEnsembleOptions c;
  c.model = {0.0, 0.0, false};
  c.samples = 3;
  c.seed = 42;
  o.control = c;
  const Diagnosis d = diagnose_anneal(core_and_leaves(3, 0.5), sch, o);
  REQUIRE(d.control.has_value());
  CHECK(d.control->ground_change_rate == 0.0);
  for (const ControlSample& s : d.control->samples) {
    CHECK(s.delta_min_ghz == d.gap.gap_ghz);
    CHECK(s.s_star == d.gap.s_star);
    REQUIRE(s.p_intended.size() == 2);
    CHECK(s.p_intended[0] == d.runs[0].anneal.ground_probability);
    CHECK(s.p_intended[1] == d.runs[1].anneal.ground_probability);
    CHECK(s.classical_margin == doctest::Approx(d.ground.first_excited_energy - d.ground.energy));
  }
  bool listed = false;
  for (const Channel& ch : d.runs[0].channels) listed = listed || ch.kind == ChannelKind::ControlErrors;
  CHECK(listed);
}

TEST_CASE("an end gap and a degenerate manifold get their own channels") {
  // Frustrated triangle with small fields (sample-like, invented): the gap is
  // smallest at s = 1, where it equals B(1) times half the classical gap
  // (two-level limit A = 0; conventions' single-qubit formula).
  IsingProblem tri(3);
  tri.h = {0.30, -0.10, 0.05};
  tri.couplings = {{0, 1, 1.0}, {1, 2, 1.0}, {0, 2, 1.0}};
  DiagnosisOptions o;
  o.durations_ns = {5.0};
  const Diagnosis d = diagnose_anneal(tri, Schedule{}, o);
  REQUIRE(d.crossings.size() == 1);
  CHECK(d.crossings[0].at_end_point);
  CHECK(d.crossings[0].minimum.gap_ghz == doctest::Approx(5.0 * (d.ground.first_excited_energy - d.ground.energy) / 2));
  CHECK(std::isnan(d.crossings[0].passages[0].landau_zener_loss));
  CHECK(d.runs[0].channels.front().kind == ChannelKind::EndGap);

  // The unfair triple of test_outcome_analysis.cpp: three ground states.
  IsingProblem u(3);
  u.h = {-1.0, -1.0, 0.0};
  u.couplings = {{0, 1, 1.0}, {1, 2, 1.0}};
  const Diagnosis du = diagnose_anneal(u, Schedule{}, o);
  bool unfair = false;
  for (const Channel& ch : du.runs[0].channels)
    if (ch.kind == ChannelKind::UnfairSampling) {
      unfair = true;
      CHECK(ch.loss == 0.0);
    }
  CHECK(unfair);
  double p = 0;
  for (const GroundStateShare& g : du.runs[0].outcome.ground) p += g.probability;
  CHECK(p == doctest::Approx(du.runs[0].anneal.ground_probability).epsilon(1e-13));
}

TEST_CASE("the diagnosis refuses what it cannot follow") {
  const Schedule reverse = parse_schedule_text(R"(format = "gapwise-schedule"
format_version = 1
[scales]
kind = "linear"
a_max_ghz = 5.0
b_max_ghz = 5.0
[path]
time = "ns"
points = [[0.0, 1.0], [5.0, 0.55], [10.0, 1.0]]
start = "classical"
start_bits = [0, 1]
)", "reverse.toml");
  IsingProblem p(2);
  p.h = {0.1, -0.2};
  DiagnosisOptions o;
  o.durations_ns = {10.0};
  CHECK_THROWS_AS(diagnose_anneal(p, reverse, o), InputError);
  o.durations_ns = {};
  CHECK_THROWS_AS(diagnose_anneal(p, Schedule{}, o), InputError);
  o.durations_ns = {-1.0};
  CHECK_THROWS_AS(diagnose_anneal(p, Schedule{}, o), InputError);
}

TEST_CASE("gapwise diagnose: report, JSON and HDF5 from the command line") {
  using namespace gapwise::testing;
  TempDir dir;
  const std::string prob = (source_dir() / "data-samples" / "triangle.toml").string();
  const std::string sch = (source_dir() / "schedules" / "linear.toml").string();
  const auto h5 = dir.path / "why.h5";
  CommandResult r = run_gapwise("diagnose '" + prob + "' '" + sch + "' -d 5 --samples 8 --seed 3 -q --out '" +
                                    h5.string() + "'",
                                dir);
  CHECK(r.exit_code == 0);
  CHECK(r.out.find("1. end gap") != std::string::npos);
  CHECK(r.out.find("control errors: 8 samples, seed 3") != std::string::npos);
  CHECK(std::filesystem::exists(h5));
  r = run_gapwise("diagnose '" + prob + "' '" + sch + "' -d 5 --samples 0 -q --json", dir);
  CHECK(r.exit_code == 0);
  CHECK(r.out.find("\"channels\"") != std::string::npos);
  r = run_gapwise("diagnose '" + prob + "' '" + sch + "' -d 5 --sigma-h -1 -q", dir);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("--sigma-h") != std::string::npos);
}
