// Progress reports of the propagators (PropagatorOptions::progress) and of the
// anneal command (--progress, -q). What is checked is the project's own
// contract, not physics: fractions rise within a pass, every pass that reaches
// the end of the path ends at 1, and a run with a callback gives the final
// state of a run without it bit for bit.
#include <doctest/doctest.h>

#include <random>
#include <regex>
#include <string>
#include <vector>

#include "dynamics/anneal_simulation.hpp"
#include "test_support.hpp"

using namespace gapwise;
using gapwise::testing::run_gapwise;
using gapwise::testing::source_dir;
using gapwise::testing::TempDir;

namespace {

// Real-valued couplings and fields, as users run (not the easiest +-1 case).
IsingProblem glass_with_fields(int n, unsigned seed) {
  std::mt19937_64 rng(seed);
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  IsingProblem p(n);
  for (int i = 0; i < n; ++i) p.h[static_cast<std::size_t>(i)] = 0.4 * u(rng);
  for (int i = 0; i < n; ++i)
    for (int j = i + 1; j < n; ++j)
      if (rng() % 2 == 0) p.couplings.push_back({i, j, u(rng)});
  return p;
}

struct Observed {
  AnnealResult result;
  std::vector<PropagationProgress> calls;
};

Observed run(const std::string& propagator, bool with_callback, int samples) {
  const IsingProblem prob = glass_with_fields(6, 7);
  TransverseIsingHamiltonian H(prob);
  const GroundManifold gm = find_ground_manifold(prob, H.diagonal());
  static const EnergyScales scales = EnergyScales::linear(5.0, 5.0);
  // A forward anneal with a pause: three pieces, so the driver calls advance() several times.
  const AnnealPath path({{0.0, 0.0}, {12.0, 0.45}, {16.0, 0.45}, {30.0, 1.0}});
  Observed out;
  SimulationOptions o;
  o.propagator = propagator;
  o.propagation.tolerance = 1e-6;
  o.samples_per_piece = samples;
  if (with_callback) {
    o.propagation.progress = [&](const PropagationProgress& p) { out.calls.push_back(p); };
    o.propagation.progress_interval_s = 0.0;  // every check, so the test sees the calls inside a pass
  }
  struct Nothing : AnnealObserver {
    void observe(const ObservationPoint&, const QuantumState&) override {}
  } nothing;
  std::vector<AnnealObserver*> observers;
  if (samples > 0) observers.push_back(&nothing);
  out.result = simulate_anneal(H, gm, scales, path, uniform_superposition(prob.qubits), o, observers);
  return out;
}

void check_calls(const std::vector<PropagationProgress>& calls, int min_passes) {
  REQUIRE(!calls.empty());
  CHECK(calls.back().fraction == 1.0);
  bool inside = false;  // a call strictly inside a pass
  for (std::size_t k = 0; k < calls.size(); ++k) {
    CAPTURE(k);
    CHECK(calls[k].fraction >= 0.0);
    CHECK(calls[k].fraction <= 1.0);
    inside = inside || (calls[k].fraction > 0.0 && calls[k].fraction < 1.0);
    if (k == 0) continue;
    CHECK(calls[k].pass >= calls[k - 1].pass);
    if (calls[k].pass == calls[k - 1].pass) {
      CHECK(calls[k].fraction >= calls[k - 1].fraction);
    } else {
      CHECK(calls[k - 1].fraction == 1.0);  // a pass ends at 1 before the next begins
    }
  }
  CHECK(inside);
  CHECK(calls.back().pass >= min_passes);
}

}  // namespace

TEST_CASE("progress: split and odeint report rising fractions that end at 1, and change no bit of the result") {
  for (const char* name : {"split4", "split2", "odeint"}) {
    for (int samples : {0, 5}) {
      CAPTURE(name);
      CAPTURE(samples);
      const Observed with = run(name, true, samples);
      const Observed without = run(name, false, samples);
      // split: at least the coarse trial run, the fine one and the run along the accepted grid.
      check_calls(with.calls, std::string(name) == "odeint" ? 1 : 3);
      CHECK(without.calls.empty());
      CHECK(with.result.final_state == without.result.final_state);  // bit for bit
      CHECK(with.result.ground_probability == without.result.ground_probability);
      CHECK(with.result.stats.steps == without.result.stats.steps);
      CHECK(with.result.stats.error_estimate == without.result.stats.error_estimate);
    }
  }
}

TEST_CASE("progress: the throttle holds back calls inside a pass but never the end of a pass") {
  const IsingProblem prob = glass_with_fields(5, 3);
  TransverseIsingHamiltonian H(prob);
  const GroundManifold gm = find_ground_manifold(prob, H.diagonal());
  static const EnergyScales scales = EnergyScales::linear(5.0, 5.0);
  std::vector<PropagationProgress> calls;
  SimulationOptions o;
  o.propagation.progress = [&](const PropagationProgress& p) { calls.push_back(p); };
  o.propagation.progress_interval_s = 3600.0;  // one call inside a run at most
  simulate_anneal(H, gm, scales, AnnealPath({{0.0, 0.0}, {40.0, 1.0}}), uniform_superposition(5), o);
  int inside = 0, ends = 0;
  for (const auto& c : calls) (c.fraction == 1.0 ? ends : inside) += 1;
  CHECK(inside <= 1);
  CHECK(ends >= 3);
  CHECK(calls.back().fraction == 1.0);
}

namespace {
// The report without its wall-clock figures (the only thing allowed to differ between runs).
std::string without_times(const std::string& text) {
  return std::regex_replace(text, std::regex(R"([0-9.]+ s\b)"), "T s");
}
}  // namespace

TEST_CASE("anneal --progress: progress lines on stderr, stdout unchanged; -q and short runs print none") {
  TempDir dir;
  const std::string args = "anneal '" + (source_dir() / "data-samples/spin-glass-8.toml").string() + "' '" +
                           (source_dir() / "schedules/linear.toml").string() + "' -d 1500";
  const auto plain = run_gapwise(args, dir);
  const auto shown = run_gapwise(args + " --progress", dir);
  const auto quiet = run_gapwise(args + " --progress -q", dir);
  REQUIRE(plain.exit_code == 0);
  REQUIRE(shown.exit_code == 0);
  REQUIRE(quiet.exit_code == 0);
  CHECK(plain.err.empty());  // stderr is not a terminal here: nothing without --progress
  CHECK(quiet.err.empty());
  INFO(shown.err);
  CHECK(shown.err.find("anneal run 1 of 2, pass 1 [") != std::string::npos);
  CHECK(shown.err.find("\033") == std::string::npos);  // whole lines in a log, no terminal codes
  CHECK(without_times(shown.out) == without_times(plain.out));
  CHECK(shown.out.find("probability") != std::string::npos);
}
