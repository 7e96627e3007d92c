#include "studies/ground_overlap_track.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "studies/outcome_analysis.hpp"

namespace gapwise {

ClassicalLevels classical_levels(const TransverseIsingHamiltonian& h, const GroundManifold& ground) {
  const auto& d = h.diagonal();
  std::vector<double> sorted(d.begin(), d.end());
  std::sort(sorted.begin(), sorted.end());
  const double tol = ground.tolerance;
  ClassicalLevels cl;
  std::vector<double> reps;  // representative diagonal value of each level
  for (double x : sorted)
    if (reps.empty() || x - reps.back() > tol) reps.push_back(x);
  cl.energies.reserve(reps.size());
  for (double x : reps) cl.energies.push_back(x + h.problem().offset);
  cl.degeneracy.assign(reps.size(), 0);
  cl.level_of.resize(d.size());
  for (std::size_t b = 0; b < d.size(); ++b) {
    // The level whose representative is the last one <= d[b] + tol.
    auto it = std::upper_bound(reps.begin(), reps.end(), d[b] + tol);
    const std::size_t lv = static_cast<std::size_t>(std::distance(reps.begin(), it)) - 1;
    cl.level_of[b] = static_cast<std::uint32_t>(lv);
    ++cl.degeneracy[lv];
  }
  return cl;
}

OverlapPoint level_composition(const TransverseIsingHamiltonian& h, const GroundManifold& ground,
                               const ClassicalLevels& classical, double s, double a, double b, int k,
                               const LevelSource& source) {
  const Levels lv = source ? source(a, b, k) : lowest_levels(h, a, b, k, true);
  if (lv.vectors.cols() < static_cast<Eigen::Index>(lv.energies_ghz.size()))
    throw std::runtime_error("level source returned no eigenvectors");
  OverlapPoint pt;
  pt.s = s;
  std::vector<double> by_level(classical.energies.size());
  for (std::size_t q = 0; q < lv.energies_ghz.size(); ++q) {
    std::fill(by_level.begin(), by_level.end(), 0.0);
    const auto col = lv.vectors.col(static_cast<Eigen::Index>(q));
    const double norm2 = col.squaredNorm();
    for (std::size_t x = 0; x < h.dim(); ++x) by_level[classical.level_of[x]] += col[static_cast<Eigen::Index>(x)] *
                                                                                   col[static_cast<Eigen::Index>(x)];
    LevelComposition c;
    c.energy_ghz = lv.energies_ghz[q];
    double gw = 0;
    for (BasisIndex g : ground.states) gw += col[static_cast<Eigen::Index>(g)] * col[static_cast<Eigen::Index>(g)];
    c.ground_weight = gw / norm2;
    // Level 0 of the classical levels is the ground manifold itself.
    std::size_t best = 0;
    for (std::size_t l = 1; l < by_level.size(); ++l)
      if (best == 0 || by_level[l] > by_level[best]) best = l;
    if (best > 0) {
      c.dominant_excited_energy = classical.energies[best];
      c.dominant_excited_weight = by_level[best] / norm2;
    }
    pt.levels.push_back(c);
  }
  return pt;
}

OverlapTrack track_ground_overlap(const TransverseIsingHamiltonian& h, const GroundManifold& ground,
                                  const EnergyScales& scales, const OverlapTrackOptions& o, LevelSource source) {
  if (o.grid_points < 3) throw std::invalid_argument("the overlap track needs at least 3 grid points");
  const int k = std::max(1, o.levels);
  const ClassicalLevels cl = classical_levels(h, ground);
  const double s0 = scales.s_first(), s1 = scales.s_last();
  auto at = [&](double s, int levels) {
    return level_composition(h, ground, cl, s, scales.a_ghz(s), scales.b_ghz(s), levels, source);
  };
  OverlapTrack tr;
  for (int i = 0; i < o.grid_points; ++i) tr.points.push_back(at(s0 + (s1 - s0) * i / (o.grid_points - 1), k));

  for (std::size_t i = 0; i + 1 < tr.points.size(); ++i) {
    const LevelComposition& before = tr.points[i].levels[0];
    const LevelComposition& after = tr.points[i + 1].levels[0];
    if (!(before.ground_weight < 0.5 && after.ground_weight >= 0.5)) continue;
    if (before.dominant_excited_weight < o.dominance) continue;  // delocalized before: an ordinary crossing
    PerturbativeCrossing x;
    x.s_before = tr.points[i].s;
    x.s_after = tr.points[i + 1].s;
    x.excited_energy = before.dominant_excited_energy;
    x.excited_weight_before = before.dominant_excited_weight;
    x.ground_weight_after = after.ground_weight;
    double best = -1;
    for (std::size_t q = 0; q < tr.points[i].levels.size(); ++q)
      if (tr.points[i].levels[q].ground_weight > best) {
        best = tr.points[i].levels[q].ground_weight;
        x.ground_manifold_level_before = static_cast<int>(q);
      }
    // Bisection on the ground level's ground-manifold weight minus 1/2.
    double lo = x.s_before, hi = x.s_after;
    while (hi - lo > o.s_tolerance) {
      const double mid = 0.5 * (lo + hi);
      (at(mid, 1).levels[0].ground_weight < 0.5 ? lo : hi) = mid;
    }
    x.s_switch = 0.5 * (lo + hi);
    const OverlapPoint sw = at(x.s_switch, 2);
    x.gap_at_switch_ghz = sw.levels.size() > 1 ? sw.levels[1].energy_ghz - sw.levels[0].energy_ghz : 0.0;
    // Degeneracy and distance of the excited classical level.
    const double tol = ground.tolerance;
    const Levels v = source ? source(scales.a_ghz(x.s_before), scales.b_ghz(x.s_before), 1)
                            : lowest_levels(h, scales.a_ghz(x.s_before), scales.b_ghz(x.s_before), 1, true);
    x.hamming_to_ground = h.qubits() + 1;
    double wsum = 0, dsum = 0;
    for (BasisIndex b = 0; b < h.dim(); ++b)
      if (std::abs(h.diagonal()[b] + h.problem().offset - x.excited_energy) <= tol) {
        ++x.excited_degeneracy;
        const int d = gapwise::hamming_to_ground(b, ground);
        x.hamming_to_ground = std::min(x.hamming_to_ground, d);
        const double w = v.vectors(static_cast<Eigen::Index>(b), 0) * v.vectors(static_cast<Eigen::Index>(b), 0);
        wsum += w;
        dsum += w * d;
      }
    x.mean_hamming_before = wsum > 0 ? dsum / wsum : 0.0;
    tr.perturbative_crossings.push_back(x);
  }
  return tr;
}

}  // namespace gapwise
