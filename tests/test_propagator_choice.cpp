// The automatic choice between split-auto and the frame ("auto",
// src/dynamics/propagator_choice.hpp) and its record, propagator_used.
//
// The choice is a cost decision, so the tests check (1) that it picks split
// where the frame cannot pay (a short anneal) and the frame where the model's
// inputs say it is cheaper (ledger timings set so), (2) that a forced crossover
// switches at the stated duration, (3) that the frame run it picks agrees with
// full-space split propagation within the tolerance (both are checked
// propagators; agreement with the tolerance is the project's acceptance rule),
// and (4) that propagator_used reaches the anneal JSON and HDF5 and the
// durations CSV, JSON and HDF5, read back with h5py. The problem: the 8-qubit
// ring with weak fields (data-samples), where the frame is cheap at long
// durations (method notes, "Choosing between split and frame").
#include <doctest/doctest.h>

#include <cmath>
#include <cstdlib>
#include <fstream>
#include <string>

#include "studies/ensemble_study.hpp"
#include "dynamics/anneal_simulation.hpp"
#include "dynamics/propagator_choice.hpp"
#include "io/problem_file.hpp"
#include "io/schedule_file.hpp"
#include "test_support.hpp"

using namespace gapwise;
using gapwise::testing::run_gapwise;
using gapwise::testing::source_dir;
using gapwise::testing::TempDir;

namespace {

std::string quoted(const char* rel) { return "'" + (source_dir() / rel).string() + "'"; }

std::string slurp(const std::filesystem::path& p) {
  std::ifstream f(p);
  return std::string((std::istreambuf_iterator<char>(f)), {});
}

// Runs python3 (with h5py) on a snippet; returns its stdout.
std::string python(const TempDir& dir, const std::string& code) {
  const auto script = dir.write("check.py", code);
  const auto out = dir.path / "py.txt";
  const std::string cmd = "/usr/bin/python3 '" + script.string() + "' > '" + out.string() + "' 2>&1";
  const int rc = std::system(cmd.c_str());
  const std::string text = slurp(out);
  INFO(text);
  REQUIRE(rc == 0);
  return text;
}

}  // namespace

TEST_CASE("auto picks split for a short anneal and the frame where the measured costs say so") {
  const IsingProblem p = read_problem_file((source_dir() / "data-samples/weak-field-ring.toml").string());
  const Schedule sch = read_schedule_file((source_dir() / "schedules/linear.toml").string());
  const TransverseIsingHamiltonian H(p);
  PropagatorCostLedger ledger;
  const PropagatorChoice short_run = choose_propagator(H, sch.scales, sch.path_for(20.0), 1e-6, {}, ledger);
  CHECK(short_run.chosen == "split-auto");
  CHECK(std::isfinite(short_run.split_seconds));
  CHECK(std::isnan(short_run.frame_seconds));  // the probe solve is not paid for a short anneal

  // Timings as a finished study would have measured them: split stages slow,
  // eigen-solves fast. The model must then pick the frame at a long duration
  // and still split at a short one (split linear in T, frame flat).
  PropagatorCostLedger::Entry e;
  e.stage_seconds = 1e-3;
  e.solve_seconds = 1e-4;
  e.frame_solves = 500;
  ledger.put(H.dim(), e);
  const PropagatorChoice long_run = choose_propagator(H, sch.scales, sch.path_for(5000.0), 1e-6, {}, ledger);
  CHECK(long_run.chosen == "frame");
  CHECK(long_run.frame_seconds == doctest::Approx(0.05));
  CHECK(long_run.frame_seconds < long_run.split_seconds);
  CHECK(choose_propagator(H, sch.scales, sch.path_for(0.01), 1e-6, {}, ledger).chosen == "split-auto");
  // Where split-auto is predicted to take under kMinSplitSecondsForFrame the
  // frame is not considered, however cheap its solves were measured: the choice
  // must not follow timing noise there.
  PropagatorCostLedger fast;
  PropagatorCostLedger::Entry tiny;
  tiny.stage_seconds = 1e-9;
  tiny.solve_seconds = 1e-15;
  tiny.frame_solves = 500;
  fast.put(H.dim(), tiny);
  const PropagatorChoice quick = choose_propagator(H, sch.scales, sch.path_for(5000.0), 1e-6, {}, fast);
  CHECK(quick.split_seconds < kMinSplitSecondsForFrame);
  CHECK(quick.chosen == "split-auto");
  tiny.stage_seconds = 1e-3;  // the same run predicted slow: now the frame
  fast.put(H.dim(), tiny);
  CHECK(choose_propagator(H, sch.scales, sch.path_for(5000.0), 1e-6, {}, fast).chosen == "frame");

  PropagatorChoiceOptions forced;
  forced.frame_above_ns = 1000.0;
  CHECK(choose_propagator(H, sch.scales, sch.path_for(999.0), 1e-6, forced, ledger).chosen == "split-auto");
  CHECK(choose_propagator(H, sch.scales, sch.path_for(1000.0), 1e-6, forced, ledger).chosen == "frame");
}

TEST_CASE("the frame chosen by auto agrees with split-auto within the tolerance") {
  const IsingProblem p = read_problem_file((source_dir() / "data-samples/weak-field-ring.toml").string());
  const Schedule sch = read_schedule_file((source_dir() / "schedules/linear.toml").string());
  const TransverseIsingHamiltonian H(p);
  const GroundManifold gm = find_ground_manifold(p, H.diagonal());
  const AnnealPath path = sch.path_for(2000.0);
  SimulationOptions split;
  const AnnealResult a = simulate_anneal(H, gm, sch.scales, path, initial_state(H, sch, path), split);
  SimulationOptions autos;
  autos.propagator = "auto";
  autos.choice.frame_above_ns = 1000.0;
  const AnnealResult b = simulate_anneal(H, gm, sch.scales, path, initial_state(H, sch, path), autos);
  CHECK(a.propagator == "split-auto");
  CHECK(b.propagator == "frame");
  CHECK(b.choice.chosen == "frame");
  CHECK(b.stats.frame_pieces > 0);
  CHECK(std::abs(a.ground_probability - b.ground_probability) <= 1e-6);
}

TEST_CASE("propagator_used in anneal JSON and HDF5, durations CSV, JSON and HDF5") {
  TempDir dir;
  const std::string prob = quoted("data-samples/weak-field-ring.toml"), sch = quoted("schedules/linear.toml");
  const auto an = run_gapwise("anneal " + prob + " " + sch + " --durations 1500 --propagator auto --frame-above 1000 --json --out '" +
                                  (dir.path / "a.h5").string() + "'",
                              dir);
  INFO(an.err);
  REQUIRE(an.exit_code == 0);
  dir.write("a.json", an.out);
  const auto du = run_gapwise("durations " + prob + " " + sch + " --durations 50,1500 --frame-above 1000 --json --out '" +
                                  (dir.path / "d.h5").string() + "' --csv '" + (dir.path / "d.csv").string() + "'",
                              dir);
  INFO(du.err);
  REQUIRE(du.exit_code == 0);
  dir.write("d.json", du.out);
  const std::string seen = python(dir, "import json, csv, h5py\n"
      "d = '" + dir.path.string() + "/'\n"
      "a = json.load(open(d + 'a.json'))\n"
      "assert a['propagator_used'] == 'frame', a['propagator_used']\n"
      "assert a['propagator_choice']['basis'].startswith('forced'), a['propagator_choice']\n"
      "f = h5py.File(d + 'a.h5', 'r')\n"
      "assert f['/anneal'].attrs['propagator_used'] == 'frame'\n"
      "j = json.load(open(d + 'd.json'))\n"
      "pj = {p['duration_ns']: p['propagator_used'] for p in j['points']}\n"
      "assert pj[50.0] == 'split-auto' and pj[1500.0] == 'frame', pj\n"
      "assert all((v == 'frame') == (t >= 1000) for t, v in pj.items()), pj  # bisection probes too\n"
      "rows = list(csv.DictReader(open(d + 'd.csv')))\n"
      "pc = {float(r['duration_ns']): r['propagator_used'] for r in rows}\n"
      "assert pc == pj, pc\n"
      "g = h5py.File(d + 'd.h5', 'r')['/durations/points']\n"
      "ph = dict(zip(g['duration_ns'][:], [x.decode() if isinstance(x, bytes) else x for x in g['propagator_used'][:]]))\n"
      "assert ph == pj, ph\n"
      "print('ok')\n");
  CHECK(seen.find("ok") != std::string::npos);
}

TEST_CASE("propagator_used per cell in pause-map (text, JSON, HDF5, resumed) and reverse-map (text, HDF5)") {
  // Added-time pause map: the runs take 800, 900 and 1200 ns, so with the
  // crossover forced at 1000 ns the 400 ns pauses (and their reference) run in
  // the frame and the others split-auto; each cell must say what ran it.
  TempDir dir;
  const std::string prob = quoted("data-samples/weak-field-ring.toml");
  const std::string pm = "pause-map " + prob + " " + quoted("schedules/linear.toml") +
                         " -d 800 --cost added --at 0.4,0.6 --pause-ns 0,100,400 --frame-above 1000 --out '" +
                         (dir.path / "pm.h5").string() + "'";
  const auto part = run_gapwise(pm.substr(0, pm.find("--at")) + "--at 0.4 " + pm.substr(pm.find("--pause-ns")), dir);
  INFO(part.err);
  REQUIRE(part.exit_code == 0);
  const auto full = run_gapwise(pm + " --json", dir);  // resumes the first row from the journal
  INFO(full.err);
  REQUIRE(full.exit_code == 0);
  dir.write("pm.json", full.out);
  const auto text = run_gapwise(pm, dir);  // everything read back
  REQUIRE(text.exit_code == 0);
  CHECK(text.out.find("propagators split-auto 4, frame 2 (map cells); split-auto 2, frame 1 (no-pause references)") !=
        std::string::npos);
  const auto rm = run_gapwise("reverse-map " + prob + " " + quoted("schedules/reverse-dwell.toml") +
                                  " --start-bits 01010101 --turn 0.7 --dwell-ns 0,600 --ramp-ns 300 --frame-above 1000 "
                                  "--out '" + (dir.path / "rm.h5").string() + "'",
                              dir);
  INFO(rm.err);
  REQUIRE(rm.exit_code == 0);
  CHECK(rm.out.find("propagators split-auto 1, frame 1 (map cells)") != std::string::npos);
  const std::string seen = python(dir, "import json, h5py\n"
      "d = '" + dir.path.string() + "/'\n"
      "j = json.load(open(d + 'pm.json'))\n"
      "assert j['resumed'] > 0 and j['simulated'] > 0, (j['resumed'], j['simulated'])\n"
      "assert j['propagator_used'] == [['split-auto', 'split-auto', 'frame']] * 2, j['propagator_used']\n"
      "assert j['reference_propagator_used'] == ['split-auto', 'split-auto', 'frame'], j\n"
      "f = h5py.File(d + 'pm.h5', 'r')['/pause_map']\n"
      "used = [x.decode() for x in f['propagator_used'][:]]\n"
      "tot = f['total_ns'][()].ravel()\n"
      "assert used == [('frame' if t >= 1000 else 'split-auto') for t in tot], (used, tot)\n"
      "assert [x.decode() for x in f['reference_propagator_used'][:]] == ['split-auto', 'split-auto', 'frame']\n"
      "r = h5py.File(d + 'rm.h5', 'r')['/reverse_map']\n"
      "used = [x.decode() for x in r['propagator_used'][:]]\n"
      "tot = r['total_ns'][()].ravel()\n"
      "assert used == [('frame' if t >= 1000 else 'split-auto') for t in tot], (used, tot)\n"
      "print('ok')\n");
  CHECK(seen.find("ok") != std::string::npos);
}

TEST_CASE("propagator_used per anneal in ensemble results (text, JSON, HDF5, shards merged, journal, values)") {
  TempDir dir;
  const std::string d = dir.path.string() + "/";
  const auto gen = run_gapwise("generate --graph ring-chords --couplings gaussian --sizes 6 --count 2 --seed 7 --out '" +
                                   d + "set.h5'",
                               dir);
  REQUIRE(gen.exit_code == 0);
  const std::string ens = "ensemble '" + d + "set.h5' " + quoted("schedules/linear.toml") + " -d 200,1500 --frame-above 1000";
  const auto whole = run_gapwise(ens + " --out '" + d + "ens.h5'", dir);
  INFO(whole.err);
  REQUIRE(whole.exit_code == 0);
  CHECK(whole.out.find("propagators   split-auto 2, frame 2") != std::string::npos);
  const auto again = run_gapwise(ens + " --json --out '" + d + "ens.h5'", dir);  // every instance from the journal
  REQUIRE(again.exit_code == 0);
  dir.write("ens.json", again.out);
  for (int s = 0; s < 2; ++s)
    REQUIRE(run_gapwise(ens + " --shard " + std::to_string(s) + "/2 --out '" + d + "part" + std::to_string(s) + ".h5'", dir)
                .exit_code == 0);
  REQUIRE(run_gapwise("merge-shards '" + d + "part0.h5' '" + d + "part1.h5' --out '" + d + "merged.h5'", dir).exit_code == 0);
  const std::string seen = python(dir, "import json, h5py\n"
      "d = '" + d + "'\n"
      "j = json.load(open(d + 'ens.json'))\n"
      "assert j['propagator_counts'] == {'split-auto': 2, 'frame': 2}, j['propagator_counts']\n"
      "for name in ('ens.h5', 'merged.h5'):\n"
      "    g = h5py.File(d + name, 'r')['/ensemble']\n"
      "    used = [x.decode() for x in g['instances/propagator_used'][:]]\n"
      "    durs = list(g['durations_ns'][:]) * 2\n"
      "    assert used == [('frame' if t >= 1000 else 'split-auto') for t in durs], (name, used, durs)\n"
      "print('ok')\n");
  CHECK(seen.find("ok") != std::string::npos);
  // The exact encoding used by journals and between MPI ranks carries it.
  InstanceOutcome o;
  o.ground_probability = {0.5, 0.75};
  o.propagator_used = {"split-auto", "frame"};
  const InstanceOutcome back = InstanceOutcome::from_values(3, o.to_values(), 2);
  CHECK(back.propagator_used == o.propagator_used);
  CHECK(back.ground_probability == o.ground_probability);
}

TEST_CASE("the anneal report names the split kernels that ran (variant and phase method), and 'not used' for the frame") {
  TempDir dir;
  // A problem with many distinct diagonal values (Gaussian couplings, 8 qubits):
  // the report must name the phase method the propagator object itself chose.
  const std::string glass = (source_dir() / "data-samples/ring-chords-glasses/n08-000.toml").string();
  const IsingProblem p = read_problem_file(glass);
  const TransverseIsingHamiltonian H(p);
  const std::string expected = make_propagator("split-auto", H, {.tolerance = 1e-6})->kernels();
  REQUIRE(!expected.empty());
  const std::string sch = quoted("schedules/linear.toml");
  const auto a = run_gapwise("anneal '" + glass + "' " + sch + " -d 20 --json --out '" + (dir.path / "a.h5").string() + "'", dir);
  INFO(a.err);
  REQUIRE(a.exit_code == 0);
  dir.write("a.json", a.out);
  // GAPWISE_KERNELS picks the instruction-set variant; the report must say so.
  ::setenv("GAPWISE_KERNELS", "baseline", 1);
  const auto b = run_gapwise("anneal '" + glass + "' " + sch + " -d 20 --out '" + (dir.path / "b.h5").string() + "'", dir);
  ::unsetenv("GAPWISE_KERNELS");
  INFO(b.err);
  REQUIRE(b.exit_code == 0);
  CHECK(b.out.find("kernels      baseline, ") != std::string::npos);
  const auto f = run_gapwise("anneal " + quoted("data-samples/weak-field-ring.toml") + " " + sch +
                                 " -d 1500 --propagator frame --json --out '" + (dir.path / "f.h5").string() + "'",
                             dir);
  REQUIRE(f.exit_code == 0);
  dir.write("f.json", f.out);
  const std::string seen = python(dir, "import h5py\n"
      "d = '" + dir.path.string() + "/'\n"
      "assert h5py.File(d + 'a.h5', 'r')['/anneal'].attrs['kernels'] == '" + expected + "'\n"
      "assert h5py.File(d + 'b.h5', 'r')['/anneal'].attrs['kernels'].startswith('baseline, ')\n"
      "assert h5py.File(d + 'f.h5', 'r')['/anneal'].attrs['kernels'] == 'not used'\n"
      "print('ok')\n");
  CHECK(seen.find("ok") != std::string::npos);
}

TEST_CASE("--frame-above is refused without --propagator auto and for a non-positive duration") {
  TempDir dir;
  const std::string prob = quoted("data-samples/weak-field-ring.toml"), sch = quoted("schedules/linear.toml");
  const auto a = run_gapwise("anneal " + prob + " " + sch + " --frame-above 5000", dir);
  CHECK(a.exit_code == 2);
  CHECK(a.err.find("--propagator auto") != std::string::npos);
  const auto b = run_gapwise("durations " + prob + " " + sch + " --durations 20 --frame-above 0", dir);
  CHECK(b.exit_code == 2);
  CHECK(b.err.find("not a positive duration") != std::string::npos);
}
