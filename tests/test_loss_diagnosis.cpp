// The failure-mode diagnosis end to end: Landau-Zener at a sharpening crossing,
// sigma = 0 against the unperturbed numbers, input checks, the command line.
#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>
#include <numbers>

#include <fmt/format.h>

#include "io/hdf5_input.hpp"
#include "io/input_error.hpp"
#include "io/problem_file.hpp"
#include "io/schedule_file.hpp"
#include "perturbative_crossing_instance.hpp"
#include "studies/loss_diagnosis.hpp"
#include "test_support.hpp"

using namespace gapwise;
using gapwise::testing::core_and_leaves;

// The instance and why it has a perturbative crossing: perturbative_crossing_instance.hpp.

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
    REQUIRE(x.perturbative_crossing.has_value());
    const CrossingPassage& ps = x.passages[0];
    CHECK(ps.landau_zener_loss > 0.4);
    CHECK(ps.landau_zener_loss < 0.7);
    CHECK(std::abs(ps.transferred - ps.landau_zener_loss) < 0.02);
    // The perturbative crossing is the gap minimum: the overlap switches at s*.
    CHECK(std::abs(d.overlap.perturbative_crossings[*x.perturbative_crossing].s_switch - x.minimum.s) < 0.01);
    // It limits p: ranked first, and the transfer accounts for the loss.
    const DurationDiagnosis& run = d.runs[0];
    CHECK(run.channels.front().kind == ChannelKind::PerturbativeCrossing);
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
  // Frustrated triangle with small fields (sample-like, invented): at s = 1 the
  // gap equals B(1) times half the classical gap (two-level limit A = 0;
  // conventions' single-qubit formula); the minimum lies just before s = 1,
  // a little lower (second-order shift by A(s) > 0; the value itself is checked
  // against a dense diagonalisation in test_gap_end_refinement.cpp), and the
  // gap does not reopen before the end: an end gap, not a crossing.
  IsingProblem tri(3);
  tri.h = {0.30, -0.10, 0.05};
  tri.couplings = {{0, 1, 1.0}, {1, 2, 1.0}, {0, 2, 1.0}};
  DiagnosisOptions o;
  o.durations_ns = {5.0};
  const Diagnosis d = diagnose_anneal(tri, Schedule{}, o);
  REQUIRE(d.crossings.size() == 1);
  CHECK(d.crossings[0].at_end_point);
  const double end_gap = 5.0 * (d.ground.first_excited_energy - d.ground.energy) / 2;
  CHECK(d.crossings[0].minimum.gap_ghz < end_gap);
  CHECK(d.crossings[0].minimum.gap_ghz > 0.99 * end_gap);
  CHECK(d.crossings[0].minimum.s > 0.99);
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

// Sums the channels that account for 1 - p (crossings and elsewhere).
static double accounted_loss(const DurationDiagnosis& run) {
  double sum = 0;
  for (const Channel& ch : run.channels)
    if (ch.kind != ChannelKind::ControlErrors && ch.kind != ChannelKind::UnfairSampling) sum += ch.loss - ch.regained;
  return sum;
}

TEST_CASE("loss bookkeeping: no negative loss, population regained is reported as such and the rows add up to 1 - p") {
  // Common practice, no source: probability is conserved, so the population
  // moved at the crossings plus the rest must equal 1 - p exactly, and a
  // return of population is a gain, not a negative loss. The hub-and-leaves
  // sample at 100 ns loses more across its perturbative-crossing window than it ends
  // with (part comes back after the window), so the remainder is a gain.
  using namespace gapwise::testing;
  const IsingProblem hub = read_problem_file((source_dir() / "data-samples" / "hub-and-leaves.toml").string());
  DiagnosisOptions o;
  o.durations_ns = {10.0, 100.0};
  o.check_max_ns = 0;  // the Landau-Zener check is tested below
  const Diagnosis d = diagnose_anneal(hub, Schedule{}, o);
  bool some_gain = false;
  for (const DurationDiagnosis& run : d.runs) {
    CAPTURE(run.duration_ns);
    for (const Channel& ch : run.channels) {
      CHECK(ch.loss >= 0.0);
      CHECK(ch.regained >= 0.0);
      CHECK((ch.loss == 0.0 || ch.regained == 0.0));
      some_gain = some_gain || ch.regained > 0;
    }
    CHECK(std::abs(accounted_loss(run) - (1 - run.anneal.ground_probability)) < 1e-12);
  }
  CHECK(some_gain);  // the case this test is about does occur at 100 ns

  TempDir dir;
  const CommandResult r = run_gapwise("diagnose '" + (source_dir() / "data-samples" / "hub-and-leaves.toml").string() +
                                          "' '" + (source_dir() / "schedules" / "linear.toml").string() +
                                          "' -d 100 --samples 0 --check-max-ns 0 -q",
                                      dir);
  CHECK(r.exit_code == 0);
  CHECK(r.out.find("loss -") == std::string::npos);
  CHECK(r.out.find("elsewhere             gain") != std::string::npos);
  CHECK(r.out.find("the losses add up:") != std::string::npos);
}

TEST_CASE("control errors are compared like with like and default sigmas are named as illustrative") {
  // Gaussian tail (common practice): a single field h = 0.02 with sigma_h = 0.03
  // changes the sign of the field, and so the ground state, in
  // erfc(0.02 / (0.03 sqrt 2)) / 2 = 0.25 of the samples, so at a duration where
  // the unperturbed anneal keeps p near 1 the errors dominate the loss.
  using namespace gapwise::testing;
  TempDir dir;
  const auto prob = dir.write("weak.toml", R"toml(format = "gapwise-problem"
format_version = 1
kind = "ising"
qubits = 2
description = "two coupled qubits, a weak field decides (test)"
fields = [0.02, 0.0]
couplings = [[0, 1, -1.0]]
)toml");
  const std::string sch = (source_dir() / "schedules" / "linear.toml").string();
  const std::string base = "diagnose '" + prob.string() + "' '" + sch + "' -d 200 --samples 40 --seed 5 --check-max-ns 0 -q";
  CommandResult r = run_gapwise(base, dir);
  REQUIRE(r.exit_code == 0);
  INFO(r.out);
  const auto at = r.out.find("limited by: control errors (they lower the mean p from ");
  REQUIRE(at != std::string::npos);
  double p0 = 0, mean = 0, further = 0, total = 0;
  REQUIRE(std::sscanf(r.out.c_str() + at, "limited by: control errors (they lower the mean p from %lf to %lf: a further "
                                          "%lf lost, %lf in all with them",
                      &p0, &mean, &further, &total) == 4);
  CHECK(further == doctest::Approx(p0 - mean).epsilon(2e-4));
  CHECK(total == doctest::Approx(1 - mean).epsilon(2e-4));
  CHECK(further > 0.05);
  CHECK(r.out.find("the illustrative defaults, not measured device values") != std::string::npos);
  CHECK(r.out.find("\nwithout control errors") != std::string::npos);
  // The old comparison of that loss with the loss without errors is gone.
  CHECK(r.out.find("limited by: control errors (loss") == std::string::npos);
  // Sigmas the user gave are not called defaults; one left out still is.
  r = run_gapwise(base + " --sigma-h 0.03 --sigma-j 0.03", dir);
  CHECK(r.out.find("illustrative default") == std::string::npos);
  r = run_gapwise(base + " --sigma-h 0.03", dir);
  CHECK(r.out.find("sigma_J the illustrative default") != std::string::npos);
}

TEST_CASE("the Landau-Zener duration of a crossing is checked by one simulated anneal there") {
  // Zener, Proc. R. Soc. A 137, 696 (1932): at an isolated crossing the
  // extrapolated duration t = t_f v ln(1/eps) / (pi^2 Delta^2) should lose about
  // eps there; the check anneal must be a real simulation at that duration
  // (compared with an independent anneal) and its loss near eps = 0.01
  // (tolerance 0.005: the crossing is only approximately two-level, see the
  // first test case).
  const Schedule sch;
  DiagnosisOptions o;
  o.durations_ns = {5.0};
  o.target_loss = 0.01;
  const IsingProblem prob = core_and_leaves(3, 0.5);
  const Diagnosis d = diagnose_anneal(prob, sch, o);
  REQUIRE(d.crossings.size() == 1);
  const AvoidedCrossing& x = d.crossings[0];
  REQUIRE(std::isfinite(x.landau_zener_duration_ns));
  const CrossingPassage& ps = x.passages[0];
  const double expected = 5.0 * ps.sweep_rate_ghz_per_ns * std::log(100.0) /
                          (std::numbers::pi * std::numbers::pi * x.minimum.gap_ghz * x.minimum.gap_ghz);
  CHECK(x.landau_zener_duration_ns == doctest::Approx(expected));
  REQUIRE(x.check.has_value());
  CHECK(x.check->duration_ns == x.landau_zener_duration_ns);
  CHECK(std::abs(x.check->transferred - 0.01) < 0.005);
  // Independent anneal at the same duration.
  const TransverseIsingHamiltonian H(prob);
  const GroundManifold gm = find_ground_manifold(prob, H.diagonal());
  const AnnealPath path = sch.path_for(x.landau_zener_duration_ns);
  const double p = simulate_anneal(H, gm, sch.scales, path, initial_state(H, sch, path), SimulationOptions{}).ground_probability;
  CHECK(x.check_ground_probability == doctest::Approx(p).epsilon(1e-5));
  // The verdict says what the number is and shows the simulated value.
  bool said = false;
  for (const Channel& ch : d.runs[0].channels)
    if (ch.kind == ChannelKind::PerturbativeCrossing)
      said = ch.verdict.find("Landau-Zener extrapolation") != std::string::npos &&
             ch.verdict.find(fmt::format("p = {:.4f}", x.check_ground_probability)) != std::string::npos;
  CHECK(said);
  // Above --check-max-ns no anneal is run, and the verdict says so.
  o.check_max_ns = 0.5 * x.landau_zener_duration_ns;
  const Diagnosis skipped = diagnose_anneal(prob, sch, o);
  CHECK_FALSE(skipped.crossings[0].check.has_value());

  // The command line carries it to JSON and HDF5.
  using namespace gapwise::testing;
  TempDir dir;
  const auto h5 = dir.path / "lz.h5";
  const CommandResult r = run_gapwise("diagnose '" + (source_dir() / "data-samples" / "hub-and-leaves.toml").string() +
                                          "' '" + (source_dir() / "schedules" / "linear.toml").string() +
                                          "' -d 10 --samples 0 -q --json --out '" + h5.string() + "'",
                                      dir);
  REQUIRE(r.exit_code == 0);
  CHECK(r.out.find("\"landau_zener_duration_ns\"") != std::string::npos);
  CHECK(r.out.find("\"check\"") != std::string::npos);
  const Hdf5Input in(h5.string());
  const std::vector<double> cp = in.read_list("/diagnosis/crossings/check_ground_probability");
  REQUIRE(!cp.empty());
  CHECK(cp[0] > 0.9);  // the perturbative crossing of this sample: 0.99 targeted
  CHECK(in.read_list("/diagnosis/crossings/landau_zener_duration").size() == cp.size());
}

TEST_CASE("diagnose --help lists every channel") {
  using namespace gapwise::testing;
  TempDir dir;
  const CommandResult r = run_gapwise("diagnose --help", dir);
  CHECK(r.exit_code == 0);
  for (ChannelKind k : {ChannelKind::AvoidedCrossing, ChannelKind::PerturbativeCrossing, ChannelKind::EndGap,
                        ChannelKind::Elsewhere, ChannelKind::UnfairSampling, ChannelKind::ControlErrors}) {
    CAPTURE(channel_kind_name(k));
    CHECK(r.out.find(std::string("  ") + channel_kind_name(k) + " ") != std::string::npos);
  }
}

TEST_CASE("a reverse anneal is refused at the key and line that make it one, with the fix") {
  using namespace gapwise::testing;
  // Shape table: [path.reverse] (line 20 of the sample).
  const std::string rev = (source_dir() / "schedules" / "reverse-dwell.toml").string();
  const Schedule sch = read_schedule_file(rev);
  IsingProblem p(3);
  p.h = {0.1, -0.2, 0.3};
  DiagnosisOptions o;
  o.durations_ns = {20.0};
  const auto e = input_error_of([&] { diagnose_anneal(p, sch, o); });
  REQUIRE(e.has_value());
  CHECK(e->place().key == "path.reverse");
  CHECK(e->place().line == 20);
  CHECK(e->fix().find("gapwise anneal") != std::string::npos);
  // Waypoints that go back: path.points, at its line.
  const Schedule pts = parse_schedule_text("format = \"gapwise-schedule\"\n[path]\ntime = \"ns\"\n"
                                           "points = [[0.0, 0.0], [5.0, 0.7], [10.0, 0.4], [15.0, 1.0]]\n",
                                           "back.toml");
  const auto e2 = input_error_of([&] { diagnose_anneal(p, pts, o); });
  REQUIRE(e2.has_value());
  CHECK(e2->place().key == "path.points");
  CHECK(e2->place().line == 4);
  // A forward path with a classical start: the start key, at its line.
  const Schedule cls = parse_schedule_text("format = \"gapwise-schedule\"\n[path]\nstart = \"classical\"\n"
                                           "start_bits = [0, 1, 0]\n",
                                           "cls.toml");
  const auto e3 = input_error_of([&] { diagnose_anneal(p, cls, o); });
  REQUIRE(e3.has_value());
  CHECK(e3->place().key == "path.start");
  CHECK(e3->place().line == 3);
  // The command line prints the file, line and key.
  TempDir dir;
  const CommandResult r = run_gapwise("diagnose '" + (source_dir() / "data-samples" / "triangle.toml").string() + "' '" +
                                          rev + "' -d 20 -q",
                                      dir);
  CHECK(r.exit_code == 2);
  CHECK(r.err.find("reverse-dwell.toml:20") != std::string::npos);
  CHECK(r.err.find("path.reverse") != std::string::npos);
}
