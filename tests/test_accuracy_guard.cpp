// The accuracy guard: every anneal's norm drift, integrator error estimate and
// convergence re-run are compared with the tolerance; failures are warnings,
// and `--strict` turns them into exit code 3 with the outputs still written.
// Physics fact used: the Schroedinger evolution is unitary, so <psi|psi> stays
// exactly 1 (any textbook, e.g. Sakurai, Modern Quantum Mechanics, ch. 2); a
// drift is integration error.
#include <doctest/doctest.h>

#include <cmath>
#include <limits>

#include <H5Cpp.h>

#include "dynamics/accuracy_guard.hpp"
#include "io/problem_file.hpp"
#include "io/schedule_file.hpp"
#include "problem/classical_spectrum.hpp"
#include "test_support.hpp"

using namespace gapwise;

namespace {
bool has(const std::vector<AccuracyIssue>& v, const std::string& check) {
  for (const auto& i : v) if (i.check == check) return true;
  return false;
}
}  // namespace

TEST_CASE("each check fires exactly when its value exceeds the tolerance") {
  AnnealResult r;
  r.ground_probability = 0.5;
  CHECK(check_accuracy(r, 1e-6, 1e-7).empty());
  r.norm_drift = 2e-6;
  CHECK(has(check_accuracy(r, 1e-6, std::nullopt), "norm_drift"));
  CHECK(check_accuracy(r, 1e-5, std::nullopt).empty());
  r.norm_drift = 0;
  r.stats.error_estimate = 5e-6;
  CHECK(has(check_accuracy(r, 1e-6, std::nullopt), "integrator_error_estimate"));
  // A measured |dp| supersedes the (pessimistic) summed estimate.
  CHECK(check_accuracy(r, 1e-6, 1e-8).empty());
  CHECK(has(check_accuracy(r, 1e-6, 3e-6), "convergence_delta_p"));
  r.ground_probability = std::numeric_limits<double>::quiet_NaN();
  CHECK(has(check_accuracy(r, 1e-6, 1e-8), "non_finite"));
}

TEST_CASE("a short anneal at the default tolerance passes every check, and the checks are honest") {
  const IsingProblem p = read_problem_file((testing::source_dir() / "data-samples/triangle.toml").string());
  const Schedule sch = read_schedule_file((testing::source_dir() / "schedules/linear.toml").string());
  const TransverseIsingHamiltonian H(p);
  const GroundManifold gm = find_ground_manifold(p, H.diagonal());
  const AnnealPath path = sch.path_for(10.0);
  SimulationOptions o;
  o.propagation.tolerance = 1e-6;
  const AnnealResult r = simulate_anneal(H, gm, sch.scales, path, initial_state(H, sch, path), o);
  SimulationOptions tight = o;
  tight.propagation.tolerance = 1e-9;
  const AnnealResult ref = simulate_anneal(H, gm, sch.scales, path, initial_state(H, sch, path), tight);
  const double dp = std::abs(r.ground_probability - ref.ground_probability);
  CHECK(r.stats.error_estimate > 0.0);  // the propagator does report its estimate
  CHECK(check_accuracy(r, 1e-6, dp).empty());
  // Honest means: the true error (against a run 1000x tighter) is below the
  // tolerance, and the summed local-error estimate does not understate it.
  CHECK(dp < 1e-6);
  CHECK(r.stats.error_estimate >= dp);
}

TEST_CASE("--strict exits 3 on a loose long run, warns, and still writes the marked result") {
  testing::TempDir dir;
  const auto src = testing::source_dir();
  const std::string out = (dir.path / "loose.h5").string();
  const auto res = testing::run_gapwise(
      "anneal '" + (src / "data-samples/triangle.toml").string() + "' '" + (src / "schedules/linear.toml").string() +
          "' -d 300 --tolerance 1e-2 --propagator odeint --no-check --strict --out '" + out + "'",
      dir);
  CHECK(res.exit_code == 3);
  CHECK(res.err.find("gapwise: warning: norm drift") != std::string::npos);
  CHECK(res.out.find("NOT within the tolerance") != std::string::npos);
  REQUIRE(std::filesystem::exists(out));
  H5::H5File f(out, H5F_ACC_RDONLY);
  long long ok = -1;
  f.openGroup("/anneal").openAttribute("accuracy_ok").read(H5::PredType::NATIVE_LLONG, &ok);
  CHECK(ok == 0);
  double drift = 0;
  f.openGroup("/anneal").openAttribute("norm_drift").read(H5::PredType::NATIVE_DOUBLE, &drift);
  CHECK(drift > 1e-2);
  // Without --strict the same run warns but exits 0.
  const auto lax = testing::run_gapwise(
      "anneal '" + (src / "data-samples/triangle.toml").string() + "' '" + (src / "schedules/linear.toml").string() +
          "' -d 300 --tolerance 1e-2 --propagator odeint --no-check",
      dir);
  CHECK(lax.exit_code == 0);
  CHECK(lax.err.find("gapwise: warning:") != std::string::npos);
}
