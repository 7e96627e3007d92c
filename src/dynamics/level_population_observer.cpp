#include "dynamics/level_population_observer.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

namespace gapwise {

LevelPopulations level_populations(const TransverseIsingHamiltonian& h, double a, double b, const QuantumState& psi,
                                   const LevelPopulationOptions& o) {
  return level_populations(SectorHamiltonian(h, o.sector), a, b, psi, o);
}

LevelPopulations level_populations(const SectorHamiltonian& h, double a, double b, const QuantumState& psi,
                                   const LevelPopulationOptions& o) {
  if (o.levels < 1) throw std::invalid_argument("level populations need at least one level");
  if (psi.size() != h.full().dim()) throw std::invalid_argument("state and Hamiltonian dimensions differ");
  const std::size_t dim = h.dim();
  EigenMethod method = o.method;
  // Dense resolves every degenerate level (the transverse term alone has levels
  // of binomial degeneracy); Lanczos only sees a few vectors of each. Dense
  // costs a fraction of a second up to dimension 512.
  constexpr std::size_t kPopulationDenseMaxDim = 512;
  if (method == EigenMethod::Auto) method = dim <= kPopulationDenseMaxDim ? EigenMethod::Dense : EigenMethod::Lanczos;
  // Dense gives every level at the same cost; Lanczos gets headroom so the last
  // wanted eigenspace can be seen to be complete (a level beyond it exists).
  const int want = method == EigenMethod::Dense
                       ? static_cast<int>(dim)
                       : static_cast<int>(std::min<std::size_t>(dim, static_cast<std::size_t>(3 * o.levels + 2)));
  LevelOptions lo;
  lo.levels = want;
  lo.vectors = true;
  lo.method = method;
  const Levels lv = lowest_levels(h, a, b, lo);
  // <v|psi> for a sector vector v: sum_i v_i (psi[b_i] + p psi[~b_i]) / sqrt(2).
  const bool full = h.sector() == SpinFlipSector::Full;
  const double parity = h.sector() == SpinFlipSector::Odd ? -1.0 : 1.0;
  auto overlap = [&](Eigen::Index c) {
    Complex sum(0.0, 0.0);
    const auto col = lv.vectors.col(c);
    for (std::size_t i = 0; i < dim; ++i) {
      const Complex x = full ? psi[i] : (psi[h.representative(i)] + parity * psi[h.partner(i)]) * M_SQRT1_2;
      sum += col[static_cast<Eigen::Index>(i)] * x;
    }
    return sum;
  };
  const int m = static_cast<int>(lv.energies_ghz.size());
  const bool all_levels = m == static_cast<int>(dim);

  const double nan = std::numeric_limits<double>::quiet_NaN();
  LevelPopulations out;
  out.energies_ghz.assign(static_cast<std::size_t>(o.levels), nan);
  out.degeneracy.assign(static_cast<std::size_t>(o.levels), 0);
  out.populations.assign(static_cast<std::size_t>(o.levels), nan);
  int i = 0;
  for (int level = 0; level < o.levels && i < m; ++level) {
    int j = i + 1;
    while (j < m && lv.energies_ghz[static_cast<std::size_t>(j)] - lv.energies_ghz[static_cast<std::size_t>(i)] <=
                        o.degeneracy_tol_ghz)
      ++j;
    if (j == m && !all_levels) break;  // the eigenspace may continue beyond what was computed
    double pop = 0.0;
    for (int c = i; c < j; ++c) pop += std::norm(overlap(c));
    const auto l = static_cast<std::size_t>(level);
    out.energies_ghz[l] = lv.energies_ghz[static_cast<std::size_t>(i)];
    out.degeneracy[l] = j - i;
    out.populations[l] = pop;
    i = j;
  }
  return out;
}

void LevelPopulationObserver::observe(const ObservationPoint& at, const QuantumState& psi) {
  if (opt_.requested_only && !at.requested) return;
  const bool last = opt_.final_time_ns > 0 && at.t_ns >= opt_.final_time_ns;
  if (!rows_.empty() && !last && !at.requested && at.t_ns - rows_.back().t_ns < opt_.min_interval_ns * (1 - 1e-9) &&
      std::abs(at.s - rows_.back().s) < opt_.min_interval_s * (1 - 1e-9))
    return;
  rows_.push_back({at.t_ns, at.s, level_populations(h_, at.a_ghz, at.b_ghz, psi, opt_)});
}

PopulationLeak largest_ground_level_leak(const std::vector<LevelPopulationObserver::Row>& rows) {
  PopulationLeak leak;
  if (rows.empty()) return leak;
  leak.final_ground_level = rows.back().levels.populations.front();
  for (std::size_t k = 1; k < rows.size(); ++k) {
    const double drop = rows[k - 1].levels.populations.front() - rows[k].levels.populations.front();
    if (drop > leak.drop) {
      leak.drop = drop;
      leak.s_from = rows[k - 1].s;
      leak.s_to = rows[k].s;
      leak.t_from_ns = rows[k - 1].t_ns;
      leak.t_to_ns = rows[k].t_ns;
    }
  }
  return leak;
}

}  // namespace gapwise
