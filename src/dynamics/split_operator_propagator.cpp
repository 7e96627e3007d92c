#include "dynamics/split_operator_propagator.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>
#include <stdexcept>
#include <utility>

#include <fmt/format.h>

namespace gapwise {
namespace {

std::vector<double> composition_weights(SplitComposition c) {
  switch (c) {
    case SplitComposition::Strang2:
      return {1.0};
    case SplitComposition::Yoshida4: {
      const double w1 = 1.0 / (2.0 - std::cbrt(2.0));
      return {w1, 1.0 - 2.0 * w1, w1};
    }
    case SplitComposition::Suzuki4: {
      const double p = 1.0 / (4.0 - std::cbrt(4.0));
      return {p, p, 1.0 - 4.0 * p, p, p};
    }
  }
  throw std::logic_error("unknown split composition");
}

// States kept at waypoints only while they fit in this much memory.
constexpr double kKeepBytes = 256.0 * 1024 * 1024;
// Give up (the schedule needs a finer grid than this) beyond this many steps.
constexpr double kMaxStepsPerRun = 2e8;

}  // namespace

SplitOperatorPropagator::SplitOperatorPropagator(const TransverseIsingHamiltonian& h, PropagatorOptions options,
                                                 SplitComposition composition)
    : ex_(h), opt_(options), composition_(composition), weights_(composition_weights(composition)) {
  if (!(opt_.tolerance > 0.0)) throw std::invalid_argument("split propagator: tolerance must be positive");
  const std::vector<double>& d = h.diagonal();
  for (std::size_t b = 0; b < d.size(); ++b)
    for (int q = 0; q < h.qubits(); ++q) flip_max_ = std::max(flip_max_, std::abs(d[b ^ (std::size_t{1} << q)] - d[b]));
}

std::string SplitOperatorPropagator::name() const {
  switch (composition_) {
    case SplitComposition::Strang2: return "split2";
    case SplitComposition::Yoshida4: return "split4-yoshida";
    case SplitComposition::Suzuki4: return "split4";
  }
  return "split";
}

std::size_t SplitOperatorPropagator::memory_bytes() const {
  const std::size_t state = ex_.dim() * 2 * sizeof(double);
  return (3 + kept_.size()) * state + ex_.dim() * sizeof(Complex) /*last output*/ + ex_.memory_bytes();
}

double SplitOperatorPropagator::accepted_steps_per_ns() const {
  double steps = 0, len = 0;
  for (const auto& p : pieces_) {
    steps += static_cast<double>(p.steps);
    len += p.t1 - p.t0;
  }
  return len > 0 ? steps / len : 0.0;
}

void SplitOperatorPropagator::fixed_step(const AnnealDrive& drive, double t, double h, SplitState& x) const {
  constexpr double pi = std::numbers::pi;
  double tau = t;
  double pending_phi = 0.0;  // half phase left over from the previous stage
  for (const double w : weights_) {
    const double hs = w * h;
    const double tm = tau + 0.5 * hs;
    const double a = drive.a_ghz(tm), b = drive.b_ghz(tm);
    const double half_phi = 0.5 * pi * hs * b;  // exp(-i 2 pi (hs/2) (b/2) D)
    ex_.phase_then_rotate(x, pending_phi + half_phi, pi * hs * a);  // exp(+i 2 pi hs (a/2) sum X)
    pending_phi = half_phi;
    tau += hs;
  }
  ex_.phase(x, pending_phi);
}

long SplitOperatorPropagator::run_pieces(const AnnealDrive& drive, SplitState& x, long num, long den, bool keep) {
  long steps = 0;
  for (std::size_t k = 0; k < pieces_.size(); ++k) {
    const Piece p{pieces_[k].t0, pieces_[k].t1, pieces_[k].steps * num / den};
    for (long j = 0; j < p.steps; ++j) fixed_step(drive, p.at(j), p.h(), x);
    steps += p.steps;
    if (keep) kept_[k].copy_from(x);
  }
  return steps;
}

void SplitOperatorPropagator::prepare(const AnnealDrive& drive, double t_start, const QuantumState& psi,
                                      PropagationStats& stats) {
  const std::size_t dim = ex_.dim();
  const auto& pts = drive.path.points();
  const double total = drive.path.duration_ns();
  const double eps = 1e-12 * std::max(1.0, total);
  // First guess for the fine step: below the splitting threshold for the
  // largest single-flip phase and the transverse rotation.
  const double rate = drive.scales->b_max_ghz() * flip_max_ + 2.0 * drive.scales->a_max_ghz();
  // A tighter tolerance starts finer (error ~ h^p), so the anneal command's
  // re-run at tolerance/10 compares two different grids.
  const double h0 = std::min(1.0, std::pow(opt_.tolerance / 1e-6, 1.0 / order())) / std::max(rate, 1e-3);
  pieces_.clear();
  for (std::size_t k = 0; k + 1 < pts.size(); ++k) {
    if (pts[k + 1].t_ns <= t_start + eps) continue;
    const double lo = std::max(pts[k].t_ns, t_start);
    const long coarse = std::max(1L, static_cast<long>(std::ceil((pts[k + 1].t_ns - lo) / (2.0 * h0))));
    pieces_.push_back({lo, pts[k + 1].t_ns, 2 * coarse});
  }
  if (x_.dim() != dim) {
    x_ = SplitState(dim);
    coarse_ = SplitState(dim);
    branch_ = SplitState(dim);
  }
  const bool keep = static_cast<double>(pieces_.size() * dim) * 16.0 <= kKeepBytes;
  kept_.clear();
  if (keep)
    for (std::size_t k = 0; k < pieces_.size(); ++k) kept_.emplace_back(dim);

  // Richardson: with a measured ratio r of successive differences (the error
  // shrinks by r per halving), the finer run's error is TV / (r - 1); r is
  // capped at the method's 2^p and, before two differences exist, taken as 2
  // (TV itself: the error of the finer run is at most the difference when the
  // coarse one is at least twice as far off).
  const double ideal = std::pow(2.0, order());
  long steps = 0;
  coarse_.load(psi);
  steps += run_pieces(drive, coarse_, 1, 2, false);
  double err = 0.0, previous_tv = -1.0;
  for (;;) {
    x_.load(psi);
    steps += run_pieces(drive, x_, 1, 1, keep);
    const double tv = x_.probability_distance(coarse_);
    const double ratio = previous_tv > 0.0 && tv > 0.0 ? std::clamp(previous_tv / tv, 2.0, ideal) : 2.0;
    err = tv / (ratio - 1.0);
    if (!std::isfinite(err)) throw std::runtime_error("the state became non-finite during split-operator propagation");
    if (err <= 0.5 * opt_.tolerance) break;
    previous_tv = tv;
    double grid = 0;
    for (auto& p : pieces_) grid += 2.0 * static_cast<double>(p.steps);
    if (grid > kMaxStepsPerRun)
      throw std::runtime_error(fmt::format(
          "split propagator: the estimated error {:.2e} is still above the tolerance with {:.0f} steps; "
          "raise the tolerance or use the odeint propagator", err, grid / 2));
    std::swap(coarse_, x_);
    for (auto& p : pieces_) p.steps *= 2;
  }
  stats.steps += steps;
  stats.hamiltonian_applications += steps * stages();
  stats.error_estimate += err;
  x_.load(psi);
  piece_ = 0;
  step_ = 0;
  ready_ = true;
}

void SplitOperatorPropagator::advance(const AnnealDrive& drive, double t0, double t1, QuantumState& psi,
                                      PropagationStats& stats) {
  if (!(t1 > t0)) return;
  if (psi.size() != ex_.dim()) throw std::invalid_argument("split propagator: state size does not match the Hamiltonian");
  const double eps = 1e-12 * std::max(1.0, drive.path.duration_ns());
  // A new run, or a state the caller changed: choose the grid from here.
  if (!ready_ || std::abs(t0 - t_out_) > eps || psi != last_out_) prepare(drive, t0, psi, stats);
  if (t1 > pieces_.back().t1 + eps) throw std::invalid_argument("split propagator: t1 lies beyond the end of the path");

  long steps = 0;
  double g = piece_ < pieces_.size() ? pieces_[piece_].at(step_) : pieces_.back().t1;  // main trajectory's time
  while (piece_ < pieces_.size()) {
    const Piece& p = pieces_[piece_];
    if (step_ == 0 && !kept_.empty() && p.t1 <= t1 + eps) {  // the pilot already has this piece's end
      x_.copy_from(kept_[piece_]);
      ++piece_;
      g = p.t1;
      continue;
    }
    const double next = p.at(step_ + 1);
    if (next > t1 + eps) break;
    fixed_step(drive, p.at(step_), p.h(), x_);
    ++steps;
    g = next;
    if (++step_ == p.steps) {
      ++piece_;
      step_ = 0;
    }
  }
  if (std::abs(t1 - g) <= eps) {
    x_.store(psi);
  } else {  // off the grid: a side branch from the last grid point
    branch_.copy_from(x_);
    fixed_step(drive, g, t1 - g, branch_);
    ++steps;
    branch_.store(psi);
  }
  stats.steps += steps;
  stats.hamiltonian_applications += steps * stages();
  last_out_ = psi;
  t_out_ = t1;
}

}  // namespace gapwise
