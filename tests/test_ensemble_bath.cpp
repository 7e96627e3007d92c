// ensemble --bath: every anneal of every instance also run as the adiabatic
// master equation. Physics check: with coupling eta = 0 the master equation is
// the Schroedinger equation (the dissipator is proportional to eta; Albash,
// Boixo, Lidar and Zanardi, New J. Phys. 14, 123016 (2012)), so p with the
// bath must equal the closed p for every instance. Then the promises of the
// ensemble: the bath values survive the journal (a run resumed after part of
// the instances equals one straight run bit for bit), the result file, and a
// missing bath file is refused naming it.
#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>

#include "ensemble_compare.hpp"
#include "io/ensemble_result_file.hpp"
#include "io/input_error.hpp"
#include "io/instance_set_file.hpp"
#include "io/schedule_file.hpp"
#include "io/toml_reader.hpp"
#include "studies/ensemble_study.hpp"
#include "test_support.hpp"

using namespace gapwise;
using gapwise::testing::ensemble_difference;
using gapwise::testing::run_gapwise;
using gapwise::testing::TempDir;

namespace {

// Gaussian (real-valued) couplings on rings with chords, plus a problem with a
// field: the invented dinner-table sample (6 qubits, h = 0.1 on qubit 0).
InstanceSet bath_test_set() {
  FamilySpec f;
  f.graph = GraphKind::RingPlusChords;
  f.couplings = CouplingKind::Gaussian;
  f.seed = 17;
  InstanceSet s;
  s.source = "bath test set";
  s.family = family_name(f);
  s.instances = generate_family(f, {4}, 3);
  return s;
}

std::string schedule_path() { return (gapwise::testing::source_dir() / "schedules" / "linear.toml").string(); }

EnsembleSettings bath_settings(double coupling) {
  EnsembleSettings st;
  st.durations_ns = {0.5, 2.0};
  st.gap_coarse_points = 21;
  st.gap_s_tolerance = 1e-5;
  st.bootstrap_resamples = 100;
  OhmicBath b;
  b.coupling = coupling;
  b.temperature_mk = 12.0;
  st.bath = b;
  st.open.tolerance = 1e-6;
  return st;
}

}  // namespace

TEST_CASE("ensemble with a bath of coupling 0 gives the closed p for every instance") {
  const InstanceSet set = bath_test_set();
  const Schedule sch = read_schedule_file(schedule_path());
  EnsembleRun run{set, sch, read_text_file(schedule_path()), bath_settings(0.0)};
  run.threads = 2;
  const EnsembleResult r = run_ensemble_study(run);
  REQUIRE(r.instances.size() == 3);
  for (const auto& o : r.instances) {
    REQUIRE(o.bath_ground_probability.size() == 2);
    for (std::size_t k = 0; k < 2; ++k) {
      CAPTURE(o.name);
      CAPTURE(k);
      // Both runs hold 1e-6 each; 1e-5 leaves room for the two step controls.
      CHECK(std::abs(o.bath_ground_probability[k] - o.ground_probability[k]) < 1e-5);
    }
    CHECK(o.bath_max_trace_error < 1e-8);
  }
  // With eta = 0 the TTS with the bath is the closed one up to the same tolerance.
  REQUIRE(r.sizes.size() == 1);
  CHECK(r.sizes[0].bath_tts_ns.count == 3);
}

TEST_CASE("ensemble with a 12 mK bath: journal resume equals one straight run, and the file keeps the bath") {
  const InstanceSet set = bath_test_set();
  const Schedule sch = read_schedule_file(schedule_path());
  TempDir dir;
  const EnsembleSettings st = bath_settings(1e-3);
  EnsembleRun straight_run{set, sch, read_text_file(schedule_path()), st};
  const EnsembleResult straight = run_ensemble_study(straight_run);

  // Part of the study first (shard 0/2: instances 0 and 2) into the journal,
  // then the whole study from that journal: it computes instance 1 only.
  const std::string journal_path = (dir.path / "bath.h5.journal").string();
  EnsembleRun part{set, sch, read_text_file(schedule_path()), st};
  part.shard = ShardSpec::parse("0/2");
  {
    ResultJournal j(journal_path, ensemble_journal_layout(2, true), ensemble_fingerprint(part));
    part.open_journal = [&](JournalLayout, const std::string&) { return &j; };
    REQUIRE(run_ensemble_study(part).instances.size() == 2);
  }
  EnsembleRun whole{set, sch, read_text_file(schedule_path()), st};
  ResultJournal j(journal_path, ensemble_journal_layout(2, true), ensemble_fingerprint(whole));
  whole.open_journal = [&](JournalLayout, const std::string&) { return &j; };
  const EnsembleResult resumed = run_ensemble_study(whole);
  CHECK(resumed.resumed == 2);
  CHECK(resumed.computed == 1);
  REQUIRE(resumed.instances.size() == straight.instances.size());
  for (std::size_t i = 0; i < straight.instances.size(); ++i) {
    auto a = straight.instances[i].to_values(), b = resumed.instances[i].to_values();
    a[13] = b[13] = 0;  // wall seconds
    CHECK(a == b);
    const auto& o = straight.instances[i];
    CHECK(o.bath_ground_probability.size() == 2);
    CHECK(o.bath_min_eigenvalue > -1e-8);
  }

  // The bath does act at 12 mK, eta = 1e-3: some p differs from the closed one.
  double largest_change = 0;
  for (const auto& o : straight.instances)
    for (std::size_t k = 0; k < 2; ++k)
      largest_change = std::max(largest_change, std::abs(o.bath_ground_probability[k] - o.ground_probability[k]));
  CHECK(largest_change > 1e-5);

  // The result file round trip: bath values and attributes read back equal.
  const std::string a = (dir.path / "a.h5").string(), b = (dir.path / "b.h5").string();
  write_ensemble_result(a, straight, "test", {});
  write_ensemble_result(b, resumed, "test", {});
  CHECK(ensemble_difference(a, b) == "");
  const EnsembleResult back = read_ensemble_result(a);
  REQUIRE(back.settings.bath.has_value());
  CHECK(back.settings.bath->temperature_mk == 12.0);
  CHECK(back.settings.bath->coupling == 1e-3);
  CHECK(back.numerics_fingerprint == straight.numerics_fingerprint);
  for (std::size_t i = 0; i < straight.instances.size(); ++i) {
    CHECK(back.instances[i].bath_ground_probability == straight.instances[i].bath_ground_probability);
    CHECK(back.instances[i].bath_tts_ns == straight.instances[i].bath_tts_ns);
  }
  CHECK(back.sizes[0].bath_tts_ns.quantiles.at(1).value == straight.sizes[0].bath_tts_ns.quantiles.at(1).value);
}

TEST_CASE("command line: ensemble --bath writes the bath columns; a missing bath file is named") {
  TempDir dir;
  const auto p = [&](const char* f) { return (dir.path / f).string(); };
  REQUIRE(run_gapwise("generate --graph ring-chords --couplings gaussian --sizes 4 --count 2 --seed 5 --out " + p("set.h5"), dir).exit_code == 0);
  const std::string bath = (gapwise::testing::source_dir() / "data-samples" / "bath-12mk.toml").string();
  const std::string common = " " + p("set.h5") + " '" + schedule_path() + "' -d 0.5,2 --gap-points 21 --resamples 100 -q ";
  const auto ok = run_gapwise("ensemble" + common + "--bath '" + bath + "' --out " + p("e.h5") + " --csv " + p("e.csv"), dir);
  REQUIRE(ok.exit_code == 0);
  CHECK(ok.out.find("bath TTS_ns q0.5") != std::string::npos);
  CHECK(ok.out.find("closed system / with the bath") != std::string::npos);
  const auto json = run_gapwise("ensemble" + common + "--bath '" + bath + "' --json --out " + p("j.h5"), dir);
  REQUIRE(json.exit_code == 0);
  CHECK(json.out.find("\"p_bath\"") != std::string::npos);
  CHECK(json.out.find("\"bath_tts_ns\"") != std::string::npos);
  CHECK(read_ensemble_result(p("e.h5")).settings.bath.has_value());
  // The figure of the TTS with the bath is drawn beside the closed ones (looked at by eye when added).
  const auto fig = run_gapwise("figure " + p("e.h5") + " --out-dir " + p("figs") + " --format svg", dir);
  REQUIRE(fig.exit_code == 0);
  CHECK(fig.out.find("e-ensemble-tts-bath.svg") != std::string::npos);
  CHECK(std::filesystem::file_size(dir.path / "figs" / "e-ensemble-tts-bath.svg") > 1000);

  const auto missing = run_gapwise("ensemble" + common + "--bath " + p("no-such-bath.toml") + " --out " + p("m.h5"), dir);
  CHECK(missing.exit_code != 0);
  CHECK(missing.err.find("no-such-bath.toml") != std::string::npos);
  // The shared size check of --bath, applied to the largest instance, names it.
  REQUIRE(run_gapwise("generate --graph ring --sizes 4,26 --count 1 --seed 5 --out " + p("big.h5"), dir).exit_code == 0);
  const auto big = run_gapwise("ensemble " + p("big.h5") + " '" + schedule_path() + "' -d 1 --bath '" + bath + "' --out " + p("b.h5"), dir);
  CHECK(big.exit_code == 2);
  CHECK(big.err.find("instance 'n26-000'") != std::string::npos);
  CHECK(big.err.find("26 qubits") != std::string::npos);
  CHECK_FALSE(std::filesystem::exists(p("b.h5")));
  const auto levels = run_gapwise("ensemble" + common + "--bath-levels 4 --out " + p("l.h5"), dir);
  CHECK(levels.exit_code == 2);
  CHECK(levels.err.find("--bath-levels") != std::string::npos);
}
