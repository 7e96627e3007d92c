#include "dynamics/propagator_choice.hpp"

#include <algorithm>
#include <chrono>

#include <fmt/format.h>

#include "dynamics/propagator.hpp"
#include "dynamics/quantum_state.hpp"
#include "dynamics/split_operator_propagator.hpp"
#include "hamiltonian/spin_flip_sector.hpp"
#include "spectrum/lowest_levels.hpp"

namespace gapwise {
namespace {

using Clock = std::chrono::steady_clock;

double seconds_since(Clock::time_point t0) { return std::chrono::duration<double>(Clock::now() - t0).count(); }

// Seconds per exponential stage: Strang steps (one stage each) on this
// Hamiltonian, doubled in number until the probe lasts 2 ms (at most 256).
double probe_stage_seconds(const SplitOperatorPropagator& split, const EnergyScales& scales, const AnnealPath& path,
                           std::size_t dim) {
  const AnnealDrive drive{&scales, path};
  SplitState x = SplitState::from(uniform_superposition(split.exponentials().qubits()));
  (void)dim;
  const double h = path.duration_ns() / 1e4;
  for (int steps = 4;; steps *= 2) {
    const auto t0 = Clock::now();
    for (int k = 0; k < steps; ++k) split.fixed_step(drive, h * k, h, x);
    const double dt = seconds_since(t0);
    if (dt >= 2e-3 || steps >= 256) return std::max(dt, 1e-9) / steps;
  }
}

// Seconds of one eigen-solve as the frame makes them: kProbeLevels levels with
// vectors at mid-path, in the sector the frame uses (even without fields).
double probe_solve_seconds(const TransverseIsingHamiltonian& h, const EnergyScales& scales, const AnnealPath& path) {
  const bool even = !h.problem().has_fields() && h.qubits() >= 2;
  const SectorHamiltonian sec(h, even ? SpinFlipSector::Even : SpinFlipSector::Full);
  const double s = 0.5 * (path.s_min() + path.s_max());
  LevelOptions lo;
  lo.levels = static_cast<int>(std::min<std::size_t>(kProbeLevels, sec.dim()));
  lo.vectors = true;
  const auto t0 = Clock::now();
  (void)lowest_levels(sec, scales.a_ghz(s), scales.b_ghz(s), lo);
  return std::max(seconds_since(t0), 1e-9);
}

PropagatorOptions with_tolerance(double tolerance) {
  PropagatorOptions o;
  o.tolerance = tolerance;
  return o;
}

double split_stages(const SplitOperatorPropagator& split, const EnergyScales& scales, const AnnealPath& path,
                    double tolerance) {
  const double rate = scales.b_max_ghz() * split.flip_energy_max() + 2.0 * scales.a_max_ghz();
  return path.duration_ns() * std::max(rate, 1e-3) *
         SplitOperatorPropagator::first_pair_work(SplitComposition::Auto, tolerance);
}

}  // namespace

PropagatorCostLedger::Entry PropagatorCostLedger::get(std::size_t dim) const {
  std::lock_guard<std::mutex> lock(mutex_);
  const auto it = entries_.find(dim);
  return it == entries_.end() ? Entry{} : it->second;
}

void PropagatorCostLedger::put(std::size_t dim, const Entry& e) {
  std::lock_guard<std::mutex> lock(mutex_);
  entries_[dim] = e;
}

double predicted_split_stages(const TransverseIsingHamiltonian& h, const EnergyScales& scales, const AnnealPath& path,
                              double tolerance) {
  const SplitOperatorPropagator split(h, with_tolerance(tolerance), SplitComposition::Strang2);
  return split_stages(split, scales, path, tolerance);
}

PropagatorChoice choose_propagator(const TransverseIsingHamiltonian& h, const EnergyScales& scales,
                                   const AnnealPath& path, double tolerance, const PropagatorChoiceOptions& options,
                                   PropagatorCostLedger& ledger) {
  PropagatorChoice c;
  const double T = path.duration_ns();
  if (!std::isnan(options.frame_above_ns)) {
    c.chosen = T >= options.frame_above_ns ? "frame" : "split-auto";
    c.basis = fmt::format("forced (frame at or above {} ns)", options.frame_above_ns);
    return c;
  }
  const std::size_t dim = h.dim();
  PropagatorCostLedger::Entry e = ledger.get(dim);
  const SplitOperatorPropagator split(h, with_tolerance(tolerance), SplitComposition::Strang2);
  if (e.stage_seconds <= 0) {
    e.stage_seconds = probe_stage_seconds(split, scales, path, dim);
    ledger.put(dim, e);
  }
  const double stages = split_stages(split, scales, path, tolerance);
  c.split_seconds = stages * e.stage_seconds * e.split_factor;
  if (c.split_seconds < kMinSplitSecondsForFrame) {
    c.chosen = "split-auto";
    c.basis = fmt::format("split predicted under {} s", kMinSplitSecondsForFrame);
    return c;
  }
  const double solves = e.frame_solves > 0 ? e.frame_solves : kModelFrameSolves;
  if (stages * e.split_factor <= solves * kLeastStagesPerSolve) {
    c.chosen = "split-auto";
    c.basis = "split below the frame's least cost";
    return c;
  }
  if (e.solve_seconds <= 0) {
    e.solve_seconds = probe_solve_seconds(h, scales, path);
    PropagatorCostLedger::Entry now = ledger.get(dim);
    now.solve_seconds = e.solve_seconds;
    ledger.put(dim, now);
  }
  c.frame_seconds = solves * e.solve_seconds;
  c.chosen = c.frame_seconds < c.split_seconds ? "frame" : "split-auto";
  c.basis = "cost model";
  return c;
}

void record_choice_outcome(const TransverseIsingHamiltonian& h, const PropagatorChoice& choice, double wall_seconds,
                           const PropagationStats& stats, PropagatorCostLedger& ledger) {
  if (choice.chosen.empty() || !(wall_seconds > 0)) return;
  const std::size_t dim = h.dim();
  PropagatorCostLedger::Entry e = ledger.get(dim);
  if (choice.chosen == "frame") {
    const long points = stats.frame_eigen_solves + stats.frame_reused_points;
    // A run that fell back entirely says nothing about the cost of solves.
    if (stats.frame_eigen_solves > 0 && stats.frame_fallback_pieces == 0) {
      e.solve_seconds = wall_seconds / static_cast<double>(stats.frame_eigen_solves);
      e.frame_solves = static_cast<double>(points);
    }
  } else if (std::isfinite(choice.split_seconds) && choice.split_seconds > 0 && e.split_factor > 0) {
    e.split_factor *= wall_seconds / choice.split_seconds;
  }
  ledger.put(dim, e);
}

}  // namespace gapwise
