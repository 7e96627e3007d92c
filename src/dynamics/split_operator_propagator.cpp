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
    case SplitComposition::BlanesMoan4:
      return {};  // not a composition of Strang stages (aba_coefficients)
    case SplitComposition::Auto:
      return {1.0};  // starts as Strang2
  }
  throw std::logic_error("unknown split composition");
}

// Blanes and Moan's S6 (J. Comput. Appl. Math. 142, 313 (2002), from memory;
// the tests check the order, which wrong digits would lower): phase
// coefficients a1 a2 a3 a4 a3 a2 a1, rotation coefficients b1 b2 b3 b3 b2 b1.
void aba_coefficients(SplitComposition c, std::vector<double>& phase, std::vector<double>& rot) {
  phase.clear();
  rot.clear();
  if (c != SplitComposition::BlanesMoan4) return;
  const double a1 = 0.0792036964311957, a2 = 0.353172906049774, a3 = -0.0420650803577195;
  const double a4 = 1.0 - 2.0 * (a1 + a2 + a3);
  const double b1 = 0.209515106613362, b2 = -0.143851773179818, b3 = 0.5 - b1 - b2;
  phase = {a1, a2, a3, a4, a3, a2, a1};
  rot = {b1, b2, b3, b3, b2, b1};
}

// Integral of b(t) over [t0, t1] (t1 < t0 allowed): 2-point Gauss-Legendre,
// exact for cubic b (linear ramps and cubic tables inside one piece).
double b_integral(const AnnealDrive& drive, double t0, double t1) {
  const double mid = 0.5 * (t0 + t1), half = 0.5 * (t1 - t0);
  const double d = half / std::sqrt(3.0);
  return half * (drive.b_ghz(mid - d) + drive.b_ghz(mid + d));
}

// States kept at waypoints only while they fit in this much memory.
constexpr double kKeepBytes = 256.0 * 1024 * 1024;
// The first pair of runs has kFirstCoarse : kFirstFine steps per piece, and
// its difference d is read as an error of kFirstPairFactor x d (see prepare).
constexpr long kFirstCoarse = 4;
constexpr long kFirstFine = 5;
constexpr double kFirstPairFactor = 20.0;
// Give up (the schedule needs a finer grid than this) beyond this many steps.
constexpr double kMaxStepsPerRun = 2e8;

}  // namespace

SplitOperatorPropagator::SplitOperatorPropagator(const TransverseIsingHamiltonian& h, PropagatorOptions options,
                                                 SplitComposition composition)
    : ex_(h), opt_(options), composition_(composition), weights_(composition_weights(composition)) {
  if (composition_ == SplitComposition::Auto) {
    adaptive_ = true;
    composition_ = SplitComposition::Strang2;
  }
  aba_coefficients(composition, aba_phase_, aba_rot_);
  if (!(opt_.tolerance > 0.0)) throw std::invalid_argument("split propagator: tolerance must be positive");
  const std::vector<double>& d = h.diagonal();
  for (std::size_t b = 0; b < d.size(); ++b)
    for (int q = 0; q < h.qubits(); ++q) flip_max_ = std::max(flip_max_, std::abs(d[b ^ (std::size_t{1} << q)] - d[b]));
}

std::string SplitOperatorPropagator::kernels() const {
  const std::string method = ex_.phase_method_name();
  return method == "table" ? fmt::format("{}, table phases ({} levels)", ex_.kernels(), ex_.distinct_levels())
                           : fmt::format("{}, {} phases", ex_.kernels(), method);
}

std::string SplitOperatorPropagator::name() const {
  if (adaptive_) return "split-auto";
  switch (composition_) {
    case SplitComposition::Strang2: return "split2";
    case SplitComposition::Yoshida4: return "split4-yoshida";
    case SplitComposition::Suzuki4: return "split4";
    case SplitComposition::BlanesMoan4: return "split4-bm";
    case SplitComposition::Auto: return "split-auto";
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

// Measured on the benchmark's classes (errors of p against a tight run after
// uniform steps, 10 and 12 qubits, 100 ns; see prepare()): Strang and the triple
// jump are past their threshold from about 0.7 T rate steps, Suzuki's from 0.6,
// Blanes-Moan's from 0.5; the first fine run takes 1/0.8 of that (its coarse
// partner 0.8 of the fine). At tolerance 1e-6, Strang needed about 1.2 T rate
// on the classes where p (not TV) set the step, Blanes-Moan about 0.55.
double SplitOperatorPropagator::floor_steps(SplitComposition c) {
  switch (c) {
    case SplitComposition::Suzuki4: return 0.9;
    case SplitComposition::BlanesMoan4: return 0.75;
    default: return 1.0;
  }
}

double SplitOperatorPropagator::start_steps(SplitComposition c) {
  switch (c) {
    case SplitComposition::Suzuki4: return 0.9;
    case SplitComposition::BlanesMoan4: return 0.5;
    default: return 1.0;
  }
}

double SplitOperatorPropagator::fine_steps(SplitComposition c, double tolerance) {
  const double order = c == SplitComposition::Strang2 || c == SplitComposition::Auto ? 2.0 : 4.0;
  return std::max(floor_steps(c), start_steps(c) * std::pow(1e-6 / tolerance, 1.0 / order));
}

double SplitOperatorPropagator::first_pair_work(SplitComposition c, double tolerance) {
  const double stages = c == SplitComposition::BlanesMoan4 ? 6 : c == SplitComposition::Suzuki4 ? 5
                        : c == SplitComposition::Yoshida4 ? 3 : 1;
  return stages * (1.0 + static_cast<double>(kFirstCoarse) / kFirstFine) * fine_steps(c, tolerance);
}

void SplitOperatorPropagator::switch_to_blanes_moan() {
  composition_ = SplitComposition::BlanesMoan4;
  weights_.clear();
  aba_coefficients(composition_, aba_phase_, aba_rot_);
}

void SplitOperatorPropagator::open_step_aba(const AnnealDrive& drive, double t, double h, SplitState& x,
                                            double& pending_phi) const {
  constexpr double pi = std::numbers::pi;
  double tau = t;
  for (std::size_t k = 0; k < aba_rot_.size(); ++k) {
    const double t_next = tau + aba_phase_[k] * h;
    const double phi = pi * b_integral(drive, tau, t_next);  // exp(-i 2 pi int (b/2) D dt)
    tau = t_next;
    ex_.phase_then_rotate(x, pending_phi + phi, pi * aba_rot_[k] * h * drive.a_ghz(tau));
    pending_phi = 0.0;
  }
  pending_phi = pi * b_integral(drive, tau, t + h);  // the last phase, merged with the next step's first
}

void SplitOperatorPropagator::open_step(const AnnealDrive& drive, double t, double h, SplitState& x,
                                        double& pending_phi) const {
  constexpr double pi = std::numbers::pi;
  if (!aba_rot_.empty()) {
    open_step_aba(drive, t, h, x, pending_phi);
    return;
  }
  double tau = t;
  for (const double w : weights_) {
    const double hs = w * h;
    const double tm = tau + 0.5 * hs;
    const double a = drive.a_ghz(tm), b = drive.b_ghz(tm);
    const double half_phi = 0.5 * pi * hs * b;  // exp(-i 2 pi (hs/2) (b/2) D)
    ex_.phase_then_rotate(x, pending_phi + half_phi, pi * hs * a);  // exp(+i 2 pi hs (a/2) sum X)
    pending_phi = half_phi;
    tau += hs;
  }
}

void SplitOperatorPropagator::fixed_step(const AnnealDrive& drive, double t, double h, SplitState& x) const {
  double pending_phi = 0.0;
  open_step(drive, t, h, x, pending_phi);
  ex_.phase(x, pending_phi);
}

long SplitOperatorPropagator::run_pieces(const AnnealDrive& drive, SplitState& x, long num, long den, bool keep) {
  long steps = 0;
  const double total = drive.path.duration_ns();
  ++pass_;
  for (std::size_t k = 0; k < pieces_.size(); ++k) {
    const Piece p{pieces_[k].t0, pieces_[k].t1, pieces_[k].steps * num / den};
    double pending_phi = 0.0;
    for (long j = 0; j < p.steps; ++j) {
      open_step(drive, p.at(j), p.h(), x, pending_phi);
      ticker_.step(pass_, p.at(j + 1), total);
    }
    ex_.phase(x, pending_phi);  // every piece ends on a whole state (see advance)
    steps += p.steps;
    if (keep) kept_[k].copy_from(x);
  }
  ticker_.finish(pass_);
  return steps;
}

void SplitOperatorPropagator::prepare(const AnnealDrive& drive, double t_start, const QuantumState& psi,
                                      PropagationStats& stats) {
  const std::size_t dim = ex_.dim();
  const auto& pts = drive.path.points();
  const double total = drive.path.duration_ns();
  const double eps = 1e-12 * std::max(1.0, total);
  // First guess for the grid. rate = the largest single-flip phase rate plus the
  // transverse one; T x rate uniform steps is the unit the thresholds are
  // measured in. Measured on the benchmark's five classes (10 and 12 qubits,
  // 100 ns, linear 5 GHz scales; notebooks-free-docs/bench-steps-2026-12-04.txt):
  // below about 0.6 T rate steps Strang's results are meaningless (p off by
  // 1e-3 .. 1), the fourth-order methods below about 0.45-0.55 T rate; just
  // past it the error of p falls steeply, then as h^order. The first fine run
  // therefore takes floor_steps() x T rate steps at loose tolerances and
  // start_steps() x (1e-6 / tolerance)^(1/order) x T rate at tight ones (the
  // step a tolerance of 1e-6 needed on those classes, scaled by the order), so
  // a looser tolerance starts coarser and a tighter one finer.
  const double rate = drive.scales->b_max_ghz() * flip_max_ + 2.0 * drive.scales->a_max_ghz();
  // Auto at tight tolerances: Strang's first pair alone would cost more than
  // kSwitchBias x Blanes-Moan's; start with Blanes-Moan.
  if (adaptive_ && composition_ == SplitComposition::Strang2 &&
      first_pair_work(SplitComposition::Strang2, opt_.tolerance) >
          kSwitchBias * first_pair_work(SplitComposition::BlanesMoan4, opt_.tolerance))
    switch_to_blanes_moan();
  const double fine_per_rate = fine_steps(composition_, opt_.tolerance);
  const double h0 = 1.0 / (std::max(rate, 1e-3) * fine_per_rate);  // the first fine run's step
  // Pieces: the path's linear pieces, cut again where s(t) crosses a knot of
  // an energy-scale table (a kink of A(s) or B(s) with linear interpolation, a
  // jump of the second derivative with the cubic): a step across a kink loses
  // the method's order and makes the error erratic in N, which step doubling
  // cannot read.
  pieces_.clear();
  // The first pair of runs: the coarse one with 4m steps, the fine one with 5m
  // (h0), costing 9m steps where a halving pair costs 12m. Just past the
  // threshold the error of p need not fall with N at all: it can sit on a hump
  // or a plateau (measured, +-1 glass of 8 qubits at 10 ns: e(400) = 1.06e-6,
  // e(500) = 1.11e-6, e(1000) = 4.5e-7; of 14 qubits at 100 ns: 2e-8 to 4e-8
  // from 4000 to 9000 steps), where two close grids differ by far less than
  // their error. This pair alone therefore accepts only with err = 20 d (the
  // 8-qubit case needs 20). Otherwise the next grid is predicted from the
  // pair's Richardson reading and the following pairs are read with the order
  // they show (see below).
  auto add_piece = [&](double a, double b) {
    if (!(b > a + eps)) return;
    const long m = std::max(1L, static_cast<long>(std::ceil((b - a) / h0 / kFirstFine)));
    pieces_.push_back({a, b, kFirstFine * m});
  };
  const std::vector<double> no_knots;
  const std::vector<double>& knots = drive.scales->is_linear_ramp() ? no_knots : drive.scales->table_s();
  for (std::size_t k = 0; k + 1 < pts.size(); ++k) {
    if (pts[k + 1].t_ns <= t_start + eps) continue;
    const double ta = pts[k].t_ns, tb = pts[k + 1].t_ns, sa = pts[k].s, sb = pts[k + 1].s;
    double lo = std::max(ta, t_start);
    if (sa != sb)
      for (std::size_t j = 0; j < knots.size(); ++j) {
        const double kn = sa < sb ? knots[j] : knots[knots.size() - 1 - j];  // in the order the piece meets them
        if (!(std::min(sa, sb) < kn && kn < std::max(sa, sb))) continue;
        const double tk = ta + (kn - sa) / (sb - sa) * (tb - ta);
        if (tk > lo + eps && tk < tb - eps) {
          add_piece(lo, tk);
          lo = tk;
        }
      }
    add_piece(lo, tb);
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

  // Reading a pair of runs with N and q N steps: if the error falls as
  // N^-k, the finer run's error is d / (q^k - 1) (Richardson). k is the
  // method's order unless the differences so far show a slower fall: with the
  // previous pair's ratio q1 and difference d1, the order k predicts
  // d1 / d = (q1^k - 1) / (1 - q^-k); the largest k <= order that the measured
  // ratio supports is used (at least 1), so a run still on a plateau is not
  // credited with the method's order. The first (4:5) pair accepts only with
  // err = 20 d on the controlled quantity (above); its Richardson reading at the
  // method's order predicts the next grid. Two differences are controlled: that
  // of the watched set's probability (p) to the tolerance, and TV (any set of
  // outcomes) to others_factor x tolerance; with nothing watched, TV to the
  // tolerance (and TV takes the 20 d rule). Accepted when both are at most half
  // their limit; otherwise the next grid aims at 0.4 x the limit, q from 1.4 to 4.
  const bool watching = !opt_.watched_states.empty();
  const double tv_limit = watching ? opt_.others_factor * opt_.tolerance : opt_.tolerance;
  const double full_order = order();
  auto supported_order = [&](double q1, double d1, double q, double d) {
    if (!(d1 > 0.0) || !(d > 0.0)) return full_order;  // no second difference to compare
    const double ratio = d1 / d;
    for (double k = full_order; k > 1.0; k -= 0.125)
      if ((std::pow(q1, k) - 1.0) / (1.0 - std::pow(q, -k)) <= ratio) return k;
    return 1.0;
  };
  auto grid_steps = [&] {
    double g = 0;
    for (const auto& p : pieces_) g += static_cast<double>(p.steps);
    return g;
  };
  const double first_fine_grid = grid_steps();  // fine_per_rate x T rate, rounded up per piece
  long steps = 0;
  pass_ = 0;
  coarse_.load(psi);
  steps += run_pieces(drive, coarse_, kFirstCoarse, kFirstFine, false);
  double err = 0.0, err_tv = 0.0;
  double q = static_cast<double>(kFirstFine) / kFirstCoarse, q_prev = 0.0, dp_prev = 0.0, tv_prev = 0.0;
  for (bool first = true;; first = false) {
    x_.load(psi);
    steps += run_pieces(drive, x_, 1, 1, keep);
    const double tv = x_.probability_distance(coarse_);
    const double dp = watching ? std::abs(x_.probability_of(opt_.watched_states) -
                                          coarse_.probability_of(opt_.watched_states))
                               : tv;
    const double k_p = first ? full_order : supported_order(q_prev, dp_prev, q, dp);
    const double k_tv = first ? full_order : supported_order(q_prev, tv_prev, q, tv);
    const double rich_p = dp / (std::pow(q, k_p) - 1.0), rich_tv = tv / (std::pow(q, k_tv) - 1.0);
    err = first ? kFirstPairFactor * dp : rich_p;
    err_tv = first && !watching ? kFirstPairFactor * tv : rich_tv;
    if (!std::isfinite(err) || !std::isfinite(err_tv))
      throw std::runtime_error("the state became non-finite during split-operator propagation");
    if (err <= 0.5 * opt_.tolerance && err_tv <= 0.5 * tv_limit) break;
    // How much finer the next grid must be, from the Richardson readings.
    const double need = std::max(std::pow(rich_p / (0.4 * opt_.tolerance), 1.0 / k_p),
                                 std::pow(rich_tv / (0.4 * tv_limit), 1.0 / k_tv));
    // Auto: second order is the cheapest while the splitting threshold sets the
    // step (one stage per step). When a pair predicts that Strang's next run
    // (need x the current grid, in units of T rate) costs more than kSwitchBias
    // x a Blanes-Moan first pair (the classes whose outcome distribution, TV,
    // converges slowly: degenerate ground manifolds; anneals far from
    // adiabatic), start over with Blanes-Moan. The Strang runs count in the
    // statistics. Asked after every pair, not only the first: just past the
    // splitting threshold the first pair can read as nearly converged and the
    // second show first-order convergence (14-qubit Gaussian class at 100 ns:
    // deciding after the first pair only took 526,383 Strang steps, 6 x
    // Blanes-Moan's work; now 1.4 x).
    if (adaptive_ && composition_ == SplitComposition::Strang2 &&
        need * (grid_steps() / first_fine_grid) * fine_per_rate >
            kSwitchBias * first_pair_work(SplitComposition::BlanesMoan4, opt_.tolerance)) {
      switch_to_blanes_moan();
      stats.steps += steps;
      stats.hamiltonian_applications += steps;  // one stage per Strang step
      prepare(drive, t_start, psi, stats);
      return;
    }
    const double q_next = std::clamp(need, 1.4, 4.0);
    const double before = grid_steps();
    if (2.0 * before * q_next > kMaxStepsPerRun)
      throw std::runtime_error(fmt::format(
          "split propagator: the estimated error {:.2e} is still above the tolerance with {:.0f} steps; "
          "raise the tolerance or use the odeint propagator", err, before));
    for (auto& p : pieces_) p.steps = static_cast<long>(std::ceil(static_cast<double>(p.steps) * q_next));
    q_prev = q;
    dp_prev = dp;
    tv_prev = tv;
    q = grid_steps() / before;
    std::swap(coarse_, x_);
  }
  others_error_ = err_tv;
  replay_pass_ = pass_ + 1;
  stats.steps += steps;
  stats.hamiltonian_applications += steps * stages();
  stats.error_estimate += err;
  x_.load(psi);
  piece_ = 0;
  step_ = 0;
  pending_phi_ = 0.0;
  ready_ = true;
}

void SplitOperatorPropagator::advance(const AnnealDrive& drive, double t0, double t1, QuantumState& psi,
                                      PropagationStats& stats) {
  if (!(t1 > t0)) return;
  if (psi.size() != ex_.dim()) throw std::invalid_argument("split propagator: state size does not match the Hamiltonian");
  const double eps = 1e-12 * std::max(1.0, drive.path.duration_ns());
  // A new run, or a state the caller changed: choose the grid from here.
  if (!ready_ || std::abs(t0 - t_out_) > eps || psi != last_out_) prepare(drive, t0, psi, stats);
  if (t1 > drive.path.duration_ns() + eps)
    throw std::invalid_argument("split propagator: t1 lies beyond the end of the path");
  if (pieces_.empty()) {
    // What is left of the path is shorter than the time resolution eps (a run of
    // about 1e-12 ns or less): the sudden limit, psi unchanged (the phases it
    // would pick up are below eps x the energy scale, far under any tolerance).
    last_out_ = psi;
    t_out_ = t1;
    if (t1 >= drive.path.duration_ns() - eps) ticker_.finish(replay_pass_);
    return;
  }
  const double total = drive.path.duration_ns();

  // The main trajectory x_ owes the phase pending_phi_ inside a piece (the
  // last half phase of a step merged with the first of the next, exactly as in
  // run_pieces, so the replay has the pilot's bits); it is settled at piece
  // ends, and a state handed out mid-piece is settled on a copy.
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
    open_step(drive, p.at(step_), p.h(), x_, pending_phi_);
    ++steps;
    g = next;
    ticker_.step(replay_pass_, g, total);
    if (++step_ == p.steps) {
      ex_.phase(x_, pending_phi_);
      pending_phi_ = 0.0;
      ++piece_;
      step_ = 0;
    }
  }
  const bool settled = pending_phi_ == 0.0;
  if (std::abs(t1 - g) <= eps && settled) {
    x_.store(psi);
  } else {  // mid-piece or off the grid: a side branch from the last grid point
    branch_.copy_from(x_);
    if (std::abs(t1 - g) <= eps) {
      ex_.phase(branch_, pending_phi_);
    } else {
      double pending = pending_phi_;
      open_step(drive, g, t1 - g, branch_, pending);
      ex_.phase(branch_, pending);
      ++steps;
    }
    branch_.store(psi);
  }
  stats.steps += steps;
  stats.hamiltonian_applications += steps * stages();
  last_out_ = psi;
  t_out_ = t1;
  if (t1 >= total - eps) ticker_.finish(replay_pass_);
}

}  // namespace gapwise
