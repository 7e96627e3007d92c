#include "studies/work_estimate.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

namespace gapwise {
namespace {

// Measured on this project's 2-core build machine (split4, tolerance 1e-6, one
// thread, linear 5 GHz scales): a time step took 0.87 us on 3 qubits
// (triangle.toml, 924018 steps in 0.80 s), 146 us on 12 and 590 us on 14
// qubits (seeded Gaussian ring-chords glasses): about
// kSecondsPerOperation x ((n + 2) 2^n + kStepOverheadOperations).
constexpr double kSecondsPerOperation = 2.4e-9;
constexpr double kStepOverheadOperations = 320.0;
// The pilot pair of runs (4:5 steps) and usually one halving: about three
// grids' worth of steps per anneal (measured 92 steps/ns on triangle.toml with
// a rate of 30 GHz; 117 to 670 steps/ns on the 14- and 12-qubit glasses,
// whose estimate is 120 and 170: the estimate can be low by a few times).
constexpr double kGridsPerAnneal = 3.0;
// A spectrum point: about 15 H applications per level (measured: 101 points
// of the 14-qubit glass in 3.0 s), plus a fixed cost (journal record, dense
// solve) of about 0.1 ms per point (20000 points of the triangle in 2.1 s, 5.9 s journaled).
constexpr double kApplicationsPerLevel = 15.0;
constexpr double kPointOverheadOperations = 1e5;
// A generated instance: drawing it and its file record, about 0.25 ms
// (20000 instances of 6 or 14 qubits in 4.7 to 5.8 s).
constexpr double kInstanceOperations = 1e5;

double amplitudes(int qubits) { return std::ldexp(1.0, std::clamp(qubits, 0, 62)); }

std::string count_text(double x) { return x < 1e6 ? fmt::format("{:.0f}", x) : fmt::format("{:.1e}", x); }

// A rough time, to the unit that reads best: "40 minutes", "3 days", "2e+05 years".
std::string rough_time(double seconds) {
  const double minute = 60, hour = 3600, day = 86400, year = 365.25 * day;
  if (seconds < minute) return "under a minute";
  if (seconds < hour) return fmt::format("{:.0f} minutes", seconds / minute);
  if (seconds < 2 * day) return fmt::format("{:.0f} hours", seconds / hour);
  if (seconds < year) return fmt::format("{:.0f} days", seconds / day);
  return fmt::format("{:.2g} years", seconds / year);
}

}  // namespace

WorkEstimate& WorkEstimate::operator+=(const WorkEstimate& o) {
  anneals += o.anneals;
  time_steps += o.time_steps;
  spectrum_points += o.spectrum_points;
  instances += o.instances;
  operations += o.operations;
  return *this;
}

double WorkEstimate::core_seconds() const { return operations * kSecondsPerOperation; }

std::string WorkEstimate::describe() const {
  std::string s;
  auto part = [&](double x, const std::string& what) {
    if (x > 0) s += (s.empty() ? "" : ", ") + count_text(x) + " " + what;
  };
  part(anneals, anneals == 1 ? "anneal" : "anneals");
  part(time_steps, "time steps");
  part(spectrum_points, "spectrum points");
  part(instances, "instances");
  return s;
}

double propagation_rate_ghz(const IsingProblem& problem, const EnergyScales& scales) {
  std::vector<double> local(static_cast<std::size_t>(std::max(problem.qubits, 0)), 0.0);
  for (int i = 0; i < problem.qubits; ++i) local[static_cast<std::size_t>(i)] = std::abs(problem.h[static_cast<std::size_t>(i)]);
  for (const auto& c : problem.couplings) {
    local[static_cast<std::size_t>(c.i)] += std::abs(c.value);
    local[static_cast<std::size_t>(c.j)] += std::abs(c.value);
  }
  const double flip = 2.0 * (local.empty() ? 0.0 : *std::max_element(local.begin(), local.end()));
  return scales.b_max_ghz() * flip + 2.0 * scales.a_max_ghz();
}

WorkEstimate anneal_work(const IsingProblem& problem, const EnergyScales& scales, double duration_ns, double count) {
  WorkEstimate w;
  if (!(count > 0) || !(duration_ns > 0)) return w;
  const double steps = std::max(1.0, kGridsPerAnneal * duration_ns * propagation_rate_ghz(problem, scales)) * count;
  w.anneals = count;
  w.time_steps = steps;
  w.operations = steps * ((problem.qubits + 2) * amplitudes(problem.qubits) + kStepOverheadOperations);
  return w;
}

WorkEstimate perturbed_anneal_work(const IsingProblem& problem, const EnergyScales& scales, double sigma_h,
                                   double sigma_j, bool relative, double duration_ns, double count) {
  IsingProblem wide = problem;
  auto widen = [&](double v, double sigma) { return std::abs(v) + 5.0 * sigma * (relative ? std::abs(v) : 1.0); };
  for (double& h : wide.h) h = widen(h, sigma_h);
  for (auto& c : wide.couplings) c.value = widen(c.value, sigma_j);
  return anneal_work(wide, scales, duration_ns, count);
}

WorkEstimate spectrum_work(int qubits, int levels, double points) {
  WorkEstimate w;
  if (!(points > 0)) return w;
  w.spectrum_points = points;
  w.operations = points * (kApplicationsPerLevel * std::max(levels, 1) * (qubits + 1) * amplitudes(qubits) +
                           kPointOverheadOperations);
  return w;
}

WorkEstimate instance_work(int qubits, double count) {
  WorkEstimate w;
  if (!(count > 0)) return w;
  w.instances = count;
  w.operations = count * (kInstanceOperations + 10.0 * qubits * qubits);
  return w;
}

void check_work_limit(const WorkEstimate& w, bool allow_long, const SourcePlace& place) {
  if (allow_long || !(w.operations > kWorkLimitOperations)) return;
  throw InputError(place,
                   fmt::format("this run would take very long: {} (about {:.1e} amplitude updates, roughly {} on one "
                               "core; the limit is {:.0e}, roughly {})",
                               w.describe(), w.operations, rough_time(w.core_seconds()),
                               kWorkLimitOperations, rough_time(kWorkLimitOperations * kSecondsPerOperation)),
                   "check the units and sizes (durations in ns, fields and couplings relative to each other), "
                   "shorten the run, or add --allow-long to run it anyway");
}

}  // namespace gapwise
