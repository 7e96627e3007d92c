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
  auto prop = make_propagator(options.propagator, h, popt);
  AnnealDrive drive{&scales, path};
  AnnealResult r;
  r.duration_ns = path.duration_ns();
  r.propagator = prop->name();
  auto observe = [&](double t) {
    if (observers.empty()) return;
    const double s = path.s_at(t);
    ObservationPoint at{t, s, scales.a_ghz(s), scales.b_ghz(s)};
    for (auto* o : observers) o->observe(at, psi);
  };
  const auto& pts = path.points();
  observe(pts.front().t_ns);
  for (std::size_t k = 0; k + 1 < pts.size(); ++k) {
    const double t0 = pts[k].t_ns, t1 = pts[k + 1].t_ns;
    const int m = observers.empty() ? 0 : std::max(options.samples_per_piece, 0);
    // A piece at constant s where A(s) = 0 (a pause or dwell with the transverse
    // term off) has the diagonal Hamiltonian (B/2) D: its propagator is exactly
    // the phase exp(-i 2 pi (B/2) D_b dt) on each basis state, applied as such.
    const bool diagonal_pause = pts[k].s == pts[k + 1].s && scales.a_ghz(pts[k].s) == 0.0;
    double t = t0;
    for (int j = 1; j <= m + 1; ++j) {
      const double tn = j == m + 1 ? t1 : t0 + (t1 - t0) * j / (m + 1);
      if (diagonal_pause)
        apply_diagonal_phases(h, scales.b_ghz(pts[k].s), tn - t, psi);
      else
        prop->advance(drive, t, tn, psi, r.stats);
      t = tn;
      observe(t);
    }
  }
  r.norm_drift = std::abs(norm_squared(psi) - 1.0);
  r.ground_probability = ground_probability(psi, ground);
  r.top_outcomes = most_probable_outcomes(psi, h, ground, options.top_outcomes);
  r.final_state = std::move(psi);
  r.wall_seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t_start).count();
  return r;
}

}  // namespace gapwise
