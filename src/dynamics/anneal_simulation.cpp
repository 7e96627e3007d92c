#include "dynamics/anneal_simulation.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <numbers>
#include <numeric>

#include <fmt/format.h>

#include "io/input_error.hpp"
#include "spectrum/lowest_levels.hpp"

namespace gapwise {

QuantumState initial_state(const TransverseIsingHamiltonian& h, const Schedule& schedule, const AnnealPath& path) {
  const int n = h.qubits();
  if (schedule.start.kind == StartKind::Classical) return basis_state(n, start_basis_state(schedule, n));
  const double s0 = path.points().front().s;
  const double a = schedule.scales.a_ghz(s0), b = schedule.scales.b_ghz(s0);
  if (b == 0.0 && a > 0.0) return uniform_superposition(n);
  if (!(a > 0.0))
    throw InputError({schedule.source, 0, 0, "path.start"},
                     fmt::format("A(s) = 0 at the start s = {}: the ground state there is classical and may be degenerate",
                                 s0),
                     "give the start state with start = \"classical\" and start_bits");
  // A > 0: the ground state is unique (off-diagonal elements <= 0 and connected:
  // Perron-Frobenius), with amplitudes of one sign.
  Levels lv = lowest_levels(h, a, b, 1, true);
  QuantumState psi(h.dim());
  const double sign = lv.vectors.col(0).sum() < 0 ? -1.0 : 1.0;
  const double norm = lv.vectors.col(0).norm();
  for (std::size_t k = 0; k < h.dim(); ++k) psi[k] = sign * lv.vectors(static_cast<Eigen::Index>(k), 0) / norm;
  return psi;
}

std::vector<Outcome> most_probable_outcomes(const QuantumState& psi, const TransverseIsingHamiltonian& h,
                                            const GroundManifold& ground, int k) {
  std::vector<BasisIndex> idx(psi.size());
  std::iota(idx.begin(), idx.end(), BasisIndex{0});
  const std::size_t m = std::min<std::size_t>(static_cast<std::size_t>(std::max(k, 0)), idx.size());
  std::partial_sort(idx.begin(), idx.begin() + static_cast<std::ptrdiff_t>(m), idx.end(), [&](BasisIndex x, BasisIndex y) {
    const double px = std::norm(psi[x]), py = std::norm(psi[y]);
    return px != py ? px > py : x < y;
  });
  std::vector<Outcome> out;
  for (std::size_t i = 0; i < m; ++i) {
    const BasisIndex b = idx[i];
    out.push_back({b, std::norm(psi[b]), h.diagonal()[b] + h.problem().offset, ground.contains(b)});
  }
  return out;
}

std::vector<double> times_at_s(const AnnealPath& path, double s) {
  std::vector<double> out;
  const auto& pts = path.points();
  constexpr double kSame = 1e-12;  // s values this close are the waypoint's own
  for (std::size_t k = 0; k < pts.size(); ++k) {
    const bool at_waypoint = std::abs(pts[k].s - s) <= kSame;
    // A waypoint at s counts once per passage: not again when the previous
    // waypoint was at s too (a pause at s is observed at its start).
    if (at_waypoint && !(k > 0 && std::abs(pts[k - 1].s - s) <= kSame)) out.push_back(pts[k].t_ns);
    if (k + 1 == pts.size()) break;
    const double s0 = pts[k].s, s1 = pts[k + 1].s;
    if (std::min(s0, s1) + kSame < s && s < std::max(s0, s1) - kSame)
      out.push_back(pts[k].t_ns + (s - s0) / (s1 - s0) * (pts[k + 1].t_ns - pts[k].t_ns));
  }
  return out;
}

void apply_diagonal_phases(const TransverseIsingHamiltonian& h, double b_ghz, double dt_ns, QuantumState& psi) {
  const double w = -2.0 * std::numbers::pi * 0.5 * b_ghz * dt_ns;
  const auto& d = h.diagonal();
  for (std::size_t k = 0; k < psi.size(); ++k) psi[k] *= std::polar(1.0, w * d[k]);
}

AnnealResult simulate_anneal(const TransverseIsingHamiltonian& h, const GroundManifold& ground,
                             const EnergyScales& scales, const AnnealPath& path, QuantumState psi,
                             const SimulationOptions& options, const std::vector<AnnealObserver*>& observers) {
  const auto t_start = std::chrono::steady_clock::now();
  PropagatorOptions popt = options.propagation;
  if (popt.watched_states.empty()) popt.watched_states.assign(ground.states.begin(), ground.states.end());
  AnnealResult r;
  double choice_seconds = 0.0;
  std::shared_ptr<PropagatorCostLedger> ledger = options.cost_ledger;
  if (options.propagator == kAutoPropagator) {
    if (!ledger) ledger = std::make_shared<PropagatorCostLedger>();
    r.choice = choose_propagator(h, scales, path, popt.tolerance, options.choice, *ledger);
    choice_seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t_start).count();
  }
  auto prop = make_propagator(r.choice.chosen.empty() ? options.propagator : r.choice.chosen, h, popt);
  AnnealDrive drive{&scales, path};
  r.duration_ns = path.duration_ns();
  r.propagator = prop->name();
  r.kernels = prop->kernels();
  // Where to stop and observe: waypoints, evenly spaced samples inside each
  // piece, and every passage through a requested s (exact s kept for those).
  struct Stop {
    double t;
    double s;
    bool requested;
  };
  const auto& pts = path.points();
  const double eps = 1e-12 * std::max(1.0, path.duration_ns());
  std::vector<Stop> requested;
  if (!observers.empty())
    for (double s : options.observe_s) {
      const std::vector<double> ts = times_at_s(path, s);
      if (ts.empty())
        throw std::invalid_argument(fmt::format("observation at s = {}: the path covers s from {} to {} only", s,
                                                path.s_min(), path.s_max()));
      for (double t : ts) requested.push_back({t, s, true});
    }
  auto observe = [&](const Stop& stop) {
    if (observers.empty()) return;
    const double s = stop.requested ? stop.s : path.s_at(stop.t);
    ObservationPoint at{stop.t, s, scales.a_ghz(s), scales.b_ghz(s), stop.requested};
    for (auto* o : observers) o->observe(at, psi);
  };
  // The stop at time t: requested when a requested s is passed there.
  auto stop_at = [&](double t) {
    for (const Stop& q : requested)
      if (std::abs(q.t - t) <= eps) return Stop{t, q.s, true};
    return Stop{t, 0.0, false};
  };
  observe(stop_at(pts.front().t_ns));
  for (std::size_t k = 0; k + 1 < pts.size(); ++k) {
    const double t0 = pts[k].t_ns, t1 = pts[k + 1].t_ns;
    const int m = observers.empty() ? 0 : std::max(options.samples_per_piece, 0);
    std::vector<Stop> stops;
    for (int j = 1; j <= m; ++j) stops.push_back(stop_at(t0 + (t1 - t0) * j / (m + 1)));
    for (const Stop& q : requested)
      if (q.t > t0 + eps && q.t < t1 - eps) {
        bool merged = false;  // one observation per time (a sample there is already marked requested)
        for (const Stop& st : stops) merged = merged || std::abs(st.t - q.t) <= eps;
        if (!merged) stops.push_back(q);
      }
    std::sort(stops.begin(), stops.end(), [](const Stop& a, const Stop& b) { return a.t < b.t; });
    stops.push_back(stop_at(t1));
    // A piece at constant s where A(s) = 0 (a pause or dwell with the transverse
    // term off) has the diagonal Hamiltonian (B/2) D: its propagator is exactly
    // the phase exp(-i 2 pi (B/2) D_b dt) on each basis state, applied as such.
    const bool diagonal_pause = pts[k].s == pts[k + 1].s && scales.a_ghz(pts[k].s) == 0.0;
    double t = t0;
    for (const Stop& st : stops) {
      const double tn = st.t;
      if (tn > t) {
        if (diagonal_pause)
          apply_diagonal_phases(h, scales.b_ghz(pts[k].s), tn - t, psi);
        else
          prop->advance(drive, t, tn, psi, r.stats);
        t = tn;
      }
      observe(st);
    }
  }
  r.norm_drift = std::abs(norm_squared(psi) - 1.0);
  r.ground_probability = ground_probability(psi, ground);
  r.top_outcomes = most_probable_outcomes(psi, h, ground, options.top_outcomes);
  r.final_state = std::move(psi);
  r.wall_seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t_start).count();
  if (ledger) record_choice_outcome(h, r.choice, r.wall_seconds - choice_seconds, r.stats, *ledger);
  return r;
}

}  // namespace gapwise
