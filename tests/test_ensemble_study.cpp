// Ensemble studies: per-instance numbers against the time-to-solution formula,
// per-size summaries against the sample quantile, and the promises of the
// distribution: any thread count, shards merged, and a run killed with SIGKILL
// and resumed all give bit for bit the result of one uninterrupted run.
#include <doctest/doctest.h>

#include <chrono>
#include <cmath>
#include <csignal>
#include <fstream>
#include <thread>

#include <sys/wait.h>
#include <unistd.h>

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

InstanceSet small_set(CouplingKind kind, std::vector<int> sizes, int count) {
  FamilySpec f;
  f.graph = GraphKind::RingPlusChords;
  f.couplings = kind;
  f.seed = 31;
  f.loops_per_qubit = 0.7;
  InstanceSet s;
  s.source = "test set";
  s.family = family_name(f);
  s.instances = generate_family(f, sizes, count);
  return s;
}

EnsembleSettings quick_settings() {
  EnsembleSettings st;
  st.durations_ns = {0.3, 1.0, 3.0};
  st.gap_coarse_points = 21;
  st.gap_s_tolerance = 1e-5;
  st.bootstrap_resamples = 200;
  return st;
}

std::string schedule_path() { return (gapwise::testing::source_dir() / "schedules" / "linear.toml").string(); }

void check_same(const EnsembleResult& a, const EnsembleResult& b) {
  REQUIRE(a.instances.size() == b.instances.size());
  for (std::size_t k = 0; k < a.instances.size(); ++k) {
    auto x = a.instances[k].to_values(), y = b.instances[k].to_values();
    x[13] = y[13] = 0;  // wall seconds
    CHECK(x == y);
    CHECK(a.instances[k].set_index == b.instances[k].set_index);
  }
  REQUIRE(a.sizes.size() == b.sizes.size());
  for (std::size_t s = 0; s < a.sizes.size(); ++s)
    for (std::size_t q = 0; q < a.sizes[s].tts_ns.quantiles.size(); ++q) {
      CHECK(a.sizes[s].tts_ns.quantiles[q].value == b.sizes[s].tts_ns.quantiles[q].value);
      CHECK(a.sizes[s].tts_ns.quantiles[q].interval.low == b.sizes[s].tts_ns.quantiles[q].interval.low);
      CHECK(a.sizes[s].gap_ghz.quantiles[q].interval.high == b.sizes[s].gap_ghz.quantiles[q].interval.high);
    }
}

std::size_t journal_records(const std::string& path) {
  std::ifstream in(path);
  std::size_t n = 0;
  for (std::string line; std::getline(in, line);)
    if (!line.empty() && line[0] != '#') ++n;
  return n;
}

}  // namespace

TEST_CASE("per-instance TTS follows the time-to-solution formula; per-size medians are sample quantiles") {
  const InstanceSet set = small_set(CouplingKind::Gaussian, {3, 4}, 3);
  const Schedule sch = read_schedule_file(schedule_path());
  EnsembleRun run{set, sch, read_text_file(schedule_path()), quick_settings()};
  run.threads = 2;
  std::vector<EnsembleProgress> seen;
  run.progress = [&](const EnsembleProgress& p) { seen.push_back(p); };
  const EnsembleResult r = run_ensemble_study(run);
  REQUIRE(r.complete_here);
  REQUIRE(r.instances.size() == 6);
  // Progress: one report per instance; the work estimate n 2^n sums to 3 (3 * 8 + 4 * 16) = 264.
  REQUIRE(seen.size() == 6);
  CHECK(seen.back().cost_total == doctest::Approx(264));
  CHECK(seen.back().cost_done == doctest::Approx(264));
  CHECK(seen.back().seconds_left() == 0);
  for (std::size_t k = 1; k < seen.size(); ++k) CHECK(seen[k].cost_done > seen[k - 1].cost_done);
  const double target = r.settings.target_probability;
  for (const auto& o : r.instances) {
    CAPTURE(o.name);
    CHECK(o.name == set.instances[o.set_index].name);
    // TTS(t_f) = t_f ln(1 - p*)/ln(1 - p), or t_f once p >= p* (Ronnow et al.,
    // Science 345, 420 (2014)); the best over the sampled durations.
    double best = INFINITY;
    for (std::size_t k = 0; k < o.ground_probability.size(); ++k) {
      const double t = r.settings.durations_ns[k], p = o.ground_probability[k];
      CHECK(p >= 0.0);
      CHECK(p <= 1.0 + 1e-9);
      best = std::min(best, p >= target ? t : t * std::log(1 - target) / std::log1p(-p));
    }
    CHECK(o.tts_ns == doctest::Approx(best).epsilon(1e-12));
    CHECK(o.gap_ghz > 0.0);
    CHECK(o.gap_s >= 0.0);
    CHECK(o.gap_s <= 1.0);
    CHECK(o.planted_check == -1);
  }
  // Median per size: the middle of three values (Hyndman and Fan definition 7).
  REQUIRE(r.sizes.size() == 2);
  for (const auto& s : r.sizes) {
    std::vector<double> tts;
    for (const auto& o : r.instances)
      if (o.qubits == s.qubits) tts.push_back(o.tts_ns);
    std::sort(tts.begin(), tts.end());
    CHECK(s.tts_ns.count == 3);
    CHECK(s.tts_ns.quantiles[1].q == 0.5);
    CHECK(s.tts_ns.quantiles[1].value == tts[1]);
    CHECK(s.tts_ns.quantiles[1].interval.low >= tts[0]);
    CHECK(s.tts_ns.quantiles[1].interval.high <= tts[2]);
  }
}

TEST_CASE("the same numbers on 1 or 3 threads, and from shards merged") {
  const InstanceSet set = small_set(CouplingKind::PlusMinusOne, {3, 4, 5}, 2);
  const Schedule sch = read_schedule_file(schedule_path());
  const std::string text = read_text_file(schedule_path());
  EnsembleRun one{set, sch, text, quick_settings()};
  const EnsembleResult serial = run_ensemble_study(one);
  EnsembleRun three{set, sch, text, quick_settings()};
  three.threads = 3;
  check_same(serial, run_ensemble_study(three));

  std::vector<EnsembleResult> parts;
  for (int i : {2, 0, 1}) {  // any order
    EnsembleRun s{set, sch, text, quick_settings()};
    s.shard = ShardSpec{i, 3};
    parts.push_back(run_ensemble_study(s));
    CHECK(parts.back().instances.size() == 2);
  }
  check_same(serial, merge_shards(parts, {"s2", "s0", "s1"}));
  CHECK_THROWS_WITH_AS(merge_shards({parts[0], parts[1]}, {"s2", "s0"}), doctest::Contains("shard 1/3 is missing"), InputError);
  CHECK_THROWS_WITH_AS(merge_shards({parts[0], parts[0], parts[1]}, {"s2", "again", "s0"}),
                       doctest::Contains("given twice"), InputError);
  EnsembleRun other{set, sch, text, quick_settings()};
  other.settings.durations_ns = {0.3, 1.0};
  other.shard = ShardSpec{1, 3};
  CHECK_THROWS_WITH_AS(merge_shards({parts[0], parts[1], run_ensemble_study(other)}, {"s2", "s0", "other"}),
                       doctest::Contains("other: this shard result does not belong"), InputError);
}

TEST_CASE("planted instances: the study confirms the planted ground energy") {
  const InstanceSet set = small_set(CouplingKind::PlantedLoops, {4, 6}, 2);
  const Schedule sch = read_schedule_file(schedule_path());
  EnsembleRun run{set, sch, read_text_file(schedule_path()), quick_settings()};
  const EnsembleResult r = run_ensemble_study(run);
  for (const auto& o : r.instances) {
    CHECK(o.planted_check == 1);
    CHECK(o.ground_energy == *set.instances[o.set_index].planted_energy);
    CHECK(o.ground_states >= 2);  // h = 0: the planted state and its flip
  }
}

TEST_CASE("settings and shards are validated with the option named") {
  EnsembleSettings st = quick_settings();
  st.durations_ns = {3.0, 1.0};
  CHECK_THROWS_WITH_AS(st.validate(), doctest::Contains("--durations"), InputError);
  st = quick_settings();
  st.target_probability = 1.0;
  CHECK_THROWS_WITH_AS(st.validate(), doctest::Contains("--target"), InputError);
  CHECK(ShardSpec::parse("2/5").index == 2);
  CHECK_THROWS_WITH_AS(ShardSpec::parse("5/5"), doctest::Contains("does not exist"), InputError);
  CHECK_THROWS_WITH_AS(ShardSpec::parse("1-4"), doctest::Contains("i/N"), InputError);
}

TEST_CASE("command line: shards merged equal the whole run") {
  TempDir dir;
  const auto p = [&](const char* f) { return (dir.path / f).string(); };
  REQUIRE(run_gapwise("generate --graph ring-chords --couplings gaussian --sizes lin:3:5:3 --count 2 --seed 4 --out " + p("set.h5"), dir).exit_code == 0);
  const std::string common = " " + p("set.h5") + " '" + schedule_path() + "' -d 0.3,1,3 --gap-points 21 --resamples 300 -q ";
  REQUIRE(run_gapwise("ensemble" + common + "--out " + p("whole.h5"), dir).exit_code == 0);
  REQUIRE(run_gapwise("ensemble" + common + "--shard 0/2 --out " + p("s0.h5"), dir).exit_code == 0);
  REQUIRE(run_gapwise("ensemble" + common + "--shard 1/2 --out " + p("s1.h5"), dir).exit_code == 0);
  const auto merged = run_gapwise("merge-shards " + p("s1.h5") + " " + p("s0.h5") + " --out " + p("merged.h5"), dir);
  REQUIRE(merged.exit_code == 0);
  CHECK(merged.out.find("median") == std::string::npos);  // the table names quantiles, not prose
  CHECK(merged.out.find("TTS_ns q0.5") != std::string::npos);
  CHECK(ensemble_difference(p("whole.h5"), p("merged.h5")) == "");
  CHECK(ensemble_difference(p("whole.h5"), p("s0.h5")) != "");  // the comparison can fail
  const auto json = run_gapwise("merge-shards " + p("s1.h5") + " " + p("s0.h5") + " --json --out " + p("merged-j.h5"), dir);
  REQUIRE(json.exit_code == 0);
  CHECK(json.out.rfind("{", 0) == 0);  // JSON only on stdout, no table
  CHECK(json.out.find("TTS_ns q0.5") == std::string::npos);
  CHECK(json.out.find("\"tts_ns\"") != std::string::npos);
  CHECK(json.out.find("\"set_size\" : 6") != std::string::npos);
  const auto missing = run_gapwise("merge-shards " + p("s1.h5") + " --out " + p("m2.h5"), dir);
  CHECK(missing.exit_code == 2);
  CHECK(missing.err.find("shard 0/2 is missing") != std::string::npos);
}

TEST_CASE("command line: a run killed with SIGKILL and resumed equals an uninterrupted run") {
  TempDir dir;
  const auto p = [&](const char* f) { return (dir.path / f).string(); };
  REQUIRE(run_gapwise("generate --graph complete --couplings gaussian --sizes lin:4:6:3 --count 4 --seed 9 --out " + p("set.h5"), dir).exit_code == 0);
  const std::string args = p("set.h5") + " '" + schedule_path() + "' -d 0.3,1,3 --gap-points 21 --resamples 300 -q --threads 1 ";
  REQUIRE(run_gapwise("ensemble " + args + "--out " + p("straight.h5"), dir).exit_code == 0);

  // Start the same study in a child process and kill it as soon as it has
  // journaled its first instance.
  const std::string journal = p("killed.h5") + ".journal";
  const pid_t pid = ::fork();
  REQUIRE(pid >= 0);
  if (pid == 0) {
    const std::string cmd = "exec '" + gapwise::testing::gapwise_exe() + "' ensemble " + args + "--out " + p("killed.h5") +
                            " >/dev/null 2>&1";
    ::execl("/bin/sh", "sh", "-c", cmd.c_str(), static_cast<char*>(nullptr));
    ::_exit(127);
  }
  const auto deadline = std::chrono::steady_clock::now() + std::chrono::seconds(120);
  while (journal_records(journal) < 1 && std::chrono::steady_clock::now() < deadline)
    std::this_thread::sleep_for(std::chrono::milliseconds(5));
  ::kill(pid, SIGKILL);
  int status = 0;
  ::waitpid(pid, &status, 0);
  REQUIRE(WIFSIGNALED(status));
  const std::size_t before = journal_records(journal);
  CHECK(before >= 1);
  CHECK(before < 12);
  CHECK_FALSE(std::filesystem::exists(p("killed.h5")));

  const auto resumed = run_gapwise("ensemble " + args + "--out " + p("killed.h5"), dir);
  REQUIRE(resumed.exit_code == 0);
  CHECK(resumed.out.find(fmt::format("{} from the journal", before)) != std::string::npos);
  CHECK(ensemble_difference(p("straight.h5"), p("killed.h5")) == "");
  CHECK(read_ensemble_result(p("killed.h5")).resumed == before);

  // --fresh goes through the same scaffold: the journal is discarded first, all computed anew.
  const auto fresh = run_gapwise("ensemble " + args + "--fresh --out " + p("killed.h5"), dir);
  REQUIRE(fresh.exit_code == 0);
  CHECK(fresh.out.find("12 computed, 0 from the journal") != std::string::npos);
  CHECK(ensemble_difference(p("straight.h5"), p("killed.h5")) == "");
}
