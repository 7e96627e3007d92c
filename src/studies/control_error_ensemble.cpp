#include "studies/control_error_ensemble.hpp"
#include "platform/thread_count.hpp"

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cmath>
#include <exception>
#include <mutex>
#include <random>
#include <stdexcept>

#include <boost/random/mersenne_twister.hpp>
#include <boost/random/normal_distribution.hpp>

#ifdef _OPENMP
#include <omp.h>
#endif

namespace gapwise {

IsingProblem perturb_problem(const IsingProblem& problem, const ControlErrorModel& model, std::uint64_t seed,
                             std::uint64_t sample) {
  std::seed_seq seq{static_cast<std::uint32_t>(seed), static_cast<std::uint32_t>(seed >> 32),
                    static_cast<std::uint32_t>(sample), static_cast<std::uint32_t>(sample >> 32)};
  boost::random::mt19937_64 rng(seq);
  boost::random::normal_distribution<double> normal(0.0, 1.0);
  IsingProblem p = problem;
  for (double& h : p.h) {
    const double xi = normal(rng);
    h += (model.relative ? std::abs(h) * model.sigma_h : model.sigma_h) * xi;
  }
  for (auto& c : p.couplings) {
    const double xi = normal(rng);
    c.value += (model.relative ? std::abs(c.value) * model.sigma_j : model.sigma_j) * xi;
  }
  return p;
}

void classify_ground_change(const IsingProblem& perturbed, const GroundManifold& intended, ControlSample& sample) {
  const std::vector<double> d = problem_diagonal(perturbed);
  double in = std::numeric_limits<double>::infinity(), out = std::numeric_limits<double>::infinity();
  for (BasisIndex b = 0; b < d.size(); ++b) {
    double& best = intended.contains(b) ? in : out;
    best = std::min(best, d[b]);
  }
  // With every state in the manifold there is nothing to change to.
  sample.classical_margin = std::isfinite(out) ? out - in : std::numeric_limits<double>::infinity();
  sample.ground_changed = sample.classical_margin <= classical_energy_tolerance(perturbed);
}

ControlEnsemble run_control_error_ensemble(const IsingProblem& problem, const GroundManifold& intended,
                                           const ControlEnsembleOptions& options,
                                           const ControlSampleEvaluator& evaluate) {
  if (!(options.model.sigma_h >= 0) || !(options.model.sigma_j >= 0))
    throw std::invalid_argument("control-error sigmas must be >= 0");
  if (options.samples == 0) throw std::invalid_argument("the control-error ensemble needs at least one sample");
  ControlEnsemble e;
  e.options = options;
  e.samples.resize(options.samples);
  std::exception_ptr failure;
  std::mutex mutex;
  std::atomic<std::uint64_t> done{0};
  std::atomic<bool> stop{false};
  auto last_report = std::chrono::steady_clock::now();
  const long long n = static_cast<long long>(options.samples);
#ifdef _OPENMP
  const int threads = thread_count_or_default(options.threads);
#pragma omp parallel for schedule(dynamic, 1) num_threads(threads)
#endif
  for (long long k = 0; k < n; ++k) {
    if (stop.load()) continue;
    try {
      ControlSample& s = e.samples[static_cast<std::size_t>(k)];
      s.index = static_cast<std::uint64_t>(k);
      const IsingProblem perturbed = perturb_problem(problem, options.model, options.seed, s.index);
      classify_ground_change(perturbed, intended, s);
      if (evaluate) evaluate(perturbed, s);
      const std::uint64_t finished = ++done;
      if (options.progress) {
        std::lock_guard<std::mutex> lock(mutex);
        const auto now = std::chrono::steady_clock::now();
        if (finished == options.samples || now - last_report > std::chrono::seconds(2)) {
          last_report = now;
          options.progress(finished, options.samples);
        }
      }
    } catch (...) {
      std::lock_guard<std::mutex> lock(mutex);
      if (!failure) failure = std::current_exception();
      stop.store(true);
    }
  }
  if (failure) std::rethrow_exception(failure);
  std::uint64_t changed = 0;
  for (const auto& s : e.samples) changed += s.ground_changed;
  const double r = static_cast<double>(changed) / static_cast<double>(options.samples);
  e.ground_change_rate = r;
  e.ground_change_stderr = std::sqrt(r * (1 - r) / static_cast<double>(options.samples));
  return e;
}

std::vector<double> ControlEnsemble::column(double ControlSample::*field) const {
  std::vector<double> v;
  v.reserve(samples.size());
  for (const auto& s : samples) v.push_back(s.*field);
  return v;
}

std::vector<double> ControlEnsemble::p_column(std::size_t duration) const {
  std::vector<double> v;
  v.reserve(samples.size());
  for (const auto& s : samples) v.push_back(duration < s.p_intended.size() ? s.p_intended[duration] : kNotComputed);
  return v;
}


}  // namespace gapwise
