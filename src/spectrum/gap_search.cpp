#include "spectrum/gap_search.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <limits>
#include <map>
#include <numbers>

#include <boost/math/tools/minima.hpp>
#include <fmt/format.h>

#include "hamiltonian/memory_budget.hpp"
#include "io/input_error.hpp"

namespace gapwise {

namespace {

using Eigen::Index;

/// Levels closer than this count as degenerate (for matrix elements and flags).
double degeneracy_tolerance(const std::vector<double>& e, double error_bound) {
  double scale = 1.0;
  for (double x : e) scale = std::max(scale, std::abs(x));
  return std::max(1e-9 * scale, 10.0 * error_bound);
}

/// The rounding of eigenvalues of size up to max|E| (at least 1 GHz): a few
/// ulps. A dense solve of a tiny or diagonal matrix can report a residual of
/// exactly zero, which is not an error of zero.
double eigenvalue_rounding_ghz(const std::vector<double>& energies) {
  double e = 1.0;
  for (double x : energies) e = std::max(e, std::abs(x));
  return 4.0 * std::numeric_limits<double>::epsilon() * e;
}

/// Error bound of a point's governing gap: the residual bounds on E_0 and E_g
/// plus rounding (already in points computed here; added for points resumed
/// from journals written before it was).
double gap_error_ghz(const SpectrumPoint& p) {
  return std::max(p.error_bound_ghz, eigenvalue_rounding_ghz(p.energies_ghz));
}

/// Norm of <j|w> over the levels j degenerate with `level` (excluding level 0).
double subspace_element(const std::vector<double>& e, const Eigen::VectorXd& elements, int level, double tol) {
  double sum = 0.0;
  for (int j = 1; j < static_cast<int>(e.size()); ++j)
    if (std::abs(e[static_cast<std::size_t>(j)] - e[static_cast<std::size_t>(level)]) <= tol)
      sum += elements[j] * elements[j];
  return std::sqrt(sum);
}

}  // namespace

SpectrumPoint spectrum_from_levels(const SectorHamiltonian& h, const EnergyScales& scales, double s, int g,
                                   const Levels& lv) {
  SpectrumPoint p;
  p.s = s;
  p.a_ghz = scales.a_ghz(s);
  p.b_ghz = scales.b_ghz(s);
  p.energies_ghz = lv.energies_ghz;
  const int k = static_cast<int>(p.energies_ghz.size());
  const double da = scales.da_ds(s), db = scales.db_ds(s);
  const Index n = static_cast<Index>(h.dim());
  Eigen::MatrixXd dv(n, k);
  for (int j = 0; j < k; ++j) h.apply(da, db, lv.vectors.col(j).data(), dv.col(j).data());
  p.slopes_ghz.resize(static_cast<std::size_t>(k));
  for (int j = 0; j < k; ++j) p.slopes_ghz[static_cast<std::size_t>(j)] = lv.vectors.col(j).dot(dv.col(j));
  const Eigen::VectorXd elements = lv.vectors.transpose() * dv.col(0);  // <j| dH/ds |0>
  const int gi = std::min(g, k - 1);
  // min(residual, Kato-Temple) per level when the solver gave them, else the residual.
  const std::vector<double>& bound = lv.error_bounds_ghz.size() == lv.residuals_ghz.size() ? lv.error_bounds_ghz
                                                                                            : lv.residuals_ghz;
  p.error_bound_ghz = bound[0] + bound[static_cast<std::size_t>(gi)] + eigenvalue_rounding_ghz(p.energies_ghz);
  const double tol = degeneracy_tolerance(p.energies_ghz, p.error_bound_ghz);
  p.gap_ghz = p.energies_ghz[static_cast<std::size_t>(gi)] - p.energies_ghz[0];
  p.gap_10_ghz = k > 1 ? p.energies_ghz[1] - p.energies_ghz[0] : 0.0;
  p.matrix_element_ghz = gi > 0 ? subspace_element(p.energies_ghz, elements, gi, tol) : 0.0;
  p.matrix_element_10_ghz = k > 1 ? subspace_element(p.energies_ghz, elements, 1, tol) : 0.0;
  return p;
}

SpectrumPoint spectrum_at(const SectorHamiltonian& h, const EnergyScales& scales, double s, int levels, int g,
                          const LevelOptions& base) {
  LevelOptions lo = base;
  lo.levels = levels;
  lo.vectors = true;
  return spectrum_from_levels(h, scales, s, g, lowest_levels(h, scales.a_ghz(s), scales.b_ghz(s), lo));
}

std::vector<double> spectrum_point_values(const SpectrumPoint& p) {
  std::vector<double> v{p.a_ghz, p.b_ghz};
  v.insert(v.end(), p.energies_ghz.begin(), p.energies_ghz.end());
  v.insert(v.end(), p.slopes_ghz.begin(), p.slopes_ghz.end());
  v.insert(v.end(), {p.gap_ghz, p.gap_10_ghz, p.matrix_element_ghz, p.matrix_element_10_ghz, p.error_bound_ghz});
  return v;
}

std::vector<std::string> spectrum_point_value_names(int levels) {
  std::vector<std::string> n{"a_ghz", "b_ghz"};
  for (int j = 0; j < levels; ++j) n.push_back(fmt::format("e{}_ghz", j));
  for (int j = 0; j < levels; ++j) n.push_back(fmt::format("slope{}_ghz", j));
  for (const char* x : {"gap_ghz", "gap_10_ghz", "matrix_element_ghz", "matrix_element_10_ghz", "error_bound_ghz"})
    n.push_back(x);
  return n;
}

SpectrumPoint spectrum_point_from_values(double s, const std::vector<double>& v, int levels) {
  const std::size_t k = static_cast<std::size_t>(levels);
  if (v.size() != 2 * k + 7) throw std::runtime_error("spectrum point record of the wrong length");
  SpectrumPoint p;
  p.s = s;
  p.a_ghz = v[0];
  p.b_ghz = v[1];
  p.energies_ghz.assign(v.begin() + 2, v.begin() + 2 + static_cast<long>(k));
  p.slopes_ghz.assign(v.begin() + 2 + static_cast<long>(k), v.begin() + 2 + 2 * static_cast<long>(k));
  p.gap_ghz = v[2 * k + 2];
  p.gap_10_ghz = v[2 * k + 3];
  p.matrix_element_ghz = v[2 * k + 4];
  p.matrix_element_10_ghz = v[2 * k + 5];
  p.error_bound_ghz = v[2 * k + 6];
  return p;
}

std::string gap_definition(int g) {
  if (g <= 1) return "E_1 - E_0 (ground level to first excited level; the final ground state is unique in the sector)";
  return fmt::format(
      "E_{0} - E_0 (ground level to the lowest level that does not end in the {0}-fold degenerate ground manifold; "
      "levels 0..{1} all end there)",
      g, g - 1);
}

SpinFlipSector default_sector(const IsingProblem& problem) {
  return problem.has_fields() || problem.qubits < 1 ? SpinFlipSector::Full : SpinFlipSector::Even;
}

double estimate_gap_search_bytes(int qubits, SpinFlipSector sector, int levels, EigenMethod method) {
  const double full = std::ldexp(1.0, qubits);
  const double dim = sector == SpinFlipSector::Full ? full : full / 2.0;
  double bytes = 8.0 * full + (sector == SpinFlipSector::Full ? 0.0 : 8.0 * dim);  // diagonals
  const bool dense = method == EigenMethod::Dense || (method == EigenMethod::Auto && dim <= double(kDenseMaxDim));
  if (dense) return bytes + 8.0 * dim * dim * 2.0 + 8.0 * dim * (4.0 * levels + 8.0);
  const double ncv = std::max(2.0 * levels + 1.0, 20.0);
  // Main Lanczos basis, the deflation check's basis, Ritz vectors, d H/ds images, work vectors.
  return bytes + 8.0 * dim * (2.0 * ncv + 4.0 * levels + 12.0);
}

void check_gap_search_size(int qubits, SpinFlipSector sector, int levels, EigenMethod method, const std::string& what) {
  check_gap_search_size(qubits, sector, levels, method, SourcePlace{what, 0, 0, "qubits"});
}

void check_gap_search_size(int qubits, SpinFlipSector sector, int levels, EigenMethod method, const SourcePlace& where) {
  const double need = estimate_gap_search_bytes(qubits, sector, levels, method);
  if (qubits > kMaxSpectrumQubits)
    throw InputError(where,
                     fmt::format("{} qubits: the spectrum search works on at most {} qubits (it would need about {} "
                                 "and many hours on 2^{} amplitudes)",
                                 qubits, kMaxSpectrumQubits, human_bytes(need), qubits),
                     fmt::format("use a problem with at most {} qubits", kMaxSpectrumQubits));
  const double have = available_bytes();
  if (have > 0 && need > 0.9 * have)
    throw InputError(where,
                     fmt::format("the spectrum search on {} qubits needs about {} but only {} is available", qubits,
                                 human_bytes(need), human_bytes(have)),
                     "use fewer qubits, fewer levels, or a machine with more memory");
}

void check_gap_search_options(const GapSearchOptions& o, const EnergyScales& scales) {
  const double first = o.s_first.value_or(scales.s_first()), last = o.s_last.value_or(scales.s_last());
  if (!(first < last) || first < scales.s_first() - 1e-12 || last > scales.s_last() + 1e-12)
    throw InputError({"--s-first", 0, 0, "--s-first"},
                     fmt::format("the s range [{}, {}] is empty or leaves the range [{}, {}] the energy scales cover",
                                 first, last, scales.s_first(), scales.s_last()),
                     "give --s-first < --s-last inside the range the schedule's scales cover");
  if (o.coarse_points < 3)
    throw InputError({o.points_option, 0, 0, o.points_option}, fmt::format("{} coarse points are too few", o.coarse_points),
                     "use at least 3 (a few dozen suit most problems: the search adds points where the levels bend)");
  if (!(o.s_tolerance > 0.0 && o.s_tolerance < 0.1))
    throw InputError({"--s-tolerance", 0, 0, "--s-tolerance"},
                     fmt::format("s tolerance {} is out of range", o.s_tolerance), "use a value in (0, 0.1), e.g. 1e-6");
}

void check_gap_point_budget(const GapSearchOptions& o) {
  if (o.coarse_points <= o.max_points) return;
  const SourcePlace place{o.points_option, 0, 0, o.points_option};
  const std::string problem = fmt::format("{} coarse points are more than the budget of {} points for the whole search",
                                          o.coarse_points, o.max_points);
  if (o.max_points_option.empty())
    throw InputError(place, problem + " (this command has no option to raise it)",
                     fmt::format("give {} {} or fewer", o.points_option, o.max_points));
  throw InputError(place, fmt::format("{} ({})", problem, o.max_points_option),
                   fmt::format("ask for fewer coarse points (a few dozen suit most problems) or raise {}",
                               o.max_points_option));
}

namespace {

class GapSearch {
 public:
  GapSearch(const TransverseIsingHamiltonian& h, const EnergyScales& scales, const GapSearchOptions& o)
      : full_(h), scales_(scales), o_(o), sector_(o.sector.value_or(default_sector(h.problem()))),
        sh_(h, sector_) {}

  MinimumGapReport run() {
    const auto t0 = std::chrono::steady_clock::now();
    setup();
    coarse_scan();
    subdivide();
    refine();
    summarize();
    if (o_.other_sector && sector_ != SpinFlipSector::Full) other_sector_levels();
    final_levels();
    r_.wall_seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    return std::move(r_);
  }

 private:
  const TransverseIsingHamiltonian& full_;
  const EnergyScales& scales_;
  const GapSearchOptions& o_;
  SpinFlipSector sector_;
  SectorHamiltonian sh_;
  MinimumGapReport r_;
  GroundManifold gm_;
  LevelOptions lo_;
  int g_ = 1, k_ = 4;
  std::size_t evaluations_ = 0, planned_ = 0;
  const char* stage_ = "";
  std::map<double, SpectrumPoint> memo_;
  std::optional<LevelTracker> tracker_;  ///< warm-started Lanczos (options.warm_start)
  bool missed_seen_ = false;             ///< the deflation check found a missed level somewhere

  void setup() {
    r_.sector = sector_;
    r_.s_first = o_.s_first.value_or(scales_.s_first());
    r_.s_last = o_.s_last.value_or(scales_.s_last());
    check_gap_search_options(o_, scales_);
    const GapSearchPlan plan = plan_gap_search(full_, o_);
    gm_ = plan.ground;
    r_.classical_ground_states = gm_.degeneracy();
    g_ = plan.ground_degeneracy;
    r_.ground_degeneracy = g_;
    k_ = plan.levels;
    r_.levels = k_;
    if (k_ > o_.levels)
      r_.flags.push_back(fmt::format("levels raised from {} to {} so that the first level outside the {}-fold ground "
                                     "manifold is followed",
                                     o_.levels, k_, g_));
    r_.definition = gap_definition(g_);
    lo_.method = plan.method;
    lo_.check_missed_levels = o_.check_missed_levels;
    lo_.tolerance = o_.lanczos_tolerance;
    const EigenMethod m = plan.method;
    r_.method = m;
    if (m == EigenMethod::Lanczos && o_.warm_start) {
      LevelOptions lt = lo_;
      lt.levels = k_;
      lt.quadratic_bounds = true;
      lt.bounded_levels = std::max(g_, 1) + 1;  // E_0, E_1 and E_g carry the reported gaps
      tracker_.emplace(sh_, scales_, lt);
      tracker_->set_warm_distance(0.05 * (r_.s_last - r_.s_first));
    }
  }

  SpectrumPoint evaluate(double s, int origin) {
    if (auto it = memo_.find(s); it != memo_.end()) {  // Brent may ask for a point twice
      SpectrumPoint p = it->second;
      p.origin = origin;
      return p;
    }
    std::optional<SpectrumPoint> known = o_.lookup ? o_.lookup(s) : std::nullopt;
    SpectrumPoint p;
    if (known && known->energies_ghz.size() == static_cast<std::size_t>(k_)) {
      p = std::move(*known);
      ++r_.resumed_points;
    } else {
      if (tracker_) {
        // Exact degeneracies that the check catches come from a symmetry of H, which
        // holds at every s: once the scan has shown none among the followed levels,
        // the refinement (points packed between scanned ones) skips the check.
        tracker_->options().check_missed_levels = lo_.check_missed_levels && (origin < 2 || missed_seen_);
        const Levels& lv = tracker_->at(s);
        missed_seen_ = missed_seen_ || lv.missed_levels_found > 0;
        p = spectrum_from_levels(sh_, scales_, s, g_, lv);
        r_.operator_applications = tracker_->stats().operator_applications;
        r_.warm_solves = tracker_->stats().warm_solves;
      } else {
        p = spectrum_at(sh_, scales_, s, k_, g_, lo_);
      }
      if (o_.record) o_.record(p);
    }
    p.origin = origin;
    memo_[s] = p;
    ++evaluations_;
    r_.evaluations = evaluations_;
    planned_ = std::max(planned_, evaluations_);
    if (o_.progress) o_.progress(GapSearchProgress{evaluations_, planned_, s, stage_});
    return p;
  }

  void insert(SpectrumPoint p) {
    auto it = std::lower_bound(r_.curve.begin(), r_.curve.end(), p.s,
                               [](const SpectrumPoint& a, double s) { return a.s < s; });
    if (it != r_.curve.end() && it->s == p.s) return;  // already on the curve
    r_.curve.insert(it, std::move(p));
  }

  void coarse_scan() {
    stage_ = "coarse scan";
    planned_ = static_cast<std::size_t>(o_.coarse_points);
    const int n = o_.coarse_points;
    for (int i = 0; i < n; ++i) {
      const double s = i == n - 1 ? r_.s_last : r_.s_first + (r_.s_last - r_.s_first) * i / (n - 1);
      r_.curve.push_back(evaluate(s, 0));
    }
  }

  /// Does a level bend sharply inside [a, b] compared with the local gap?
  bool needs_split(const SpectrumPoint& a, const SpectrumPoint& b) const {
    const double h = b.s - a.s;
    if (h <= std::max(o_.s_tolerance, 1e-12 * std::max(1.0, std::abs(b.s)))) return false;
    const double local = std::min(a.gap_ghz, b.gap_ghz);
    const std::size_t gi = static_cast<std::size_t>(std::min(g_, k_ - 1));
    double bend = 0.0;
    for (std::size_t j : {std::size_t{0}, gi})
      bend = std::max(bend, std::abs(b.slopes_ghz[j] - a.slopes_ghz[j]) * h);
    // The gap itself: the change of its slope across the interval.
    const double gap_bend = std::abs((b.slopes_ghz[gi] - b.slopes_ghz[0]) - (a.slopes_ghz[gi] - a.slopes_ghz[0])) * h;
    bend = std::max(bend, gap_bend);
    return bend > o_.bend_threshold * std::max(local, 0.0) && local > 0.0;
  }

  void subdivide() {
    stage_ = "subdivision";
    for (int pass = 0; pass < 60; ++pass) {
      std::vector<double> mids;
      for (std::size_t i = 0; i + 1 < r_.curve.size(); ++i)
        if (needs_split(r_.curve[i], r_.curve[i + 1])) mids.push_back(0.5 * (r_.curve[i].s + r_.curve[i + 1].s));
      if (mids.empty()) return;
      const std::size_t room =
          static_cast<std::size_t>(std::max(0, o_.max_points - 40)) > r_.curve.size()
              ? static_cast<std::size_t>(o_.max_points - 40) - r_.curve.size()
              : 0;
      bool truncated = false;
      if (mids.size() > room) {
        // Keep the splits nearest the smallest gaps.
        std::sort(mids.begin(), mids.end(), [&](double x, double y) { return gap_near(x) < gap_near(y); });
        mids.resize(room);
        std::sort(mids.begin(), mids.end());
        truncated = true;
      }
      planned_ = evaluations_ + mids.size();
      for (double s : mids) insert(evaluate(s, 1));
      if (truncated) {
        r_.flags.push_back(fmt::format("the point budget ({}) ran out during subdivision: some intervals where levels "
                                       "bend sharply were not resolved; raise the point budget",
                                       o_.max_points));
        return;
      }
    }
  }

  /// The larger distance from curve point `i` to its neighbours.
  double grid_spacing_at(std::size_t i) const {
    const auto& c = r_.curve;
    double d = 0.0;
    if (i > 0) d = std::max(d, c[i].s - c[i - 1].s);
    if (i + 1 < c.size()) d = std::max(d, c[i + 1].s - c[i].s);
    return d;
  }

  double gap_near(double s) const {
    auto it = std::lower_bound(r_.curve.begin(), r_.curve.end(), s,
                               [](const SpectrumPoint& a, double x) { return a.s < x; });
    if (it == r_.curve.end()) return r_.curve.back().gap_ghz;
    if (it == r_.curve.begin()) return it->gap_ghz;
    return std::min(it->gap_ghz, std::prev(it)->gap_ghz);
  }

  /// Brent on [lo, hi] (the neighbours of a grid minimum, or the interval next
  /// to an end point); returns the refined minimum.
  GapMinimum refine_on(double lo, double hi) {
    const double tol = o_.s_tolerance / 2.5;
    const int bits = std::clamp(static_cast<int>(std::ceil(1.0 - std::log2(tol))), 8,
                                std::numeric_limits<double>::digits / 2);
    const double used_tol = std::ldexp(1.0, 1 - bits);
    std::vector<SpectrumPoint> seen;
    auto f = [&](double s) {
      SpectrumPoint p = evaluate(s, 2);
      const double gap = p.gap_ghz;
      seen.push_back(std::move(p));
      return gap;
    };
    boost::uintmax_t iters = 200;
    planned_ = evaluations_ + 30;
    const auto [s_min, gap_min] = boost::math::tools::brent_find_minima(f, lo, hi, bits, iters);
    (void)gap_min;
    GapMinimum m;
    m.s = s_min;
    const double brent_unc = 2.0 * used_tol * std::abs(s_min) + used_tol / 2.0;
    // The point at s*, and two neighbours for the curvature.
    const SpectrumPoint* at = nullptr;
    for (const auto& p : seen)
      if (p.s == s_min) at = &p;
    SpectrumPoint mid = at ? *at : evaluate(s_min, 2);
    if (!at) seen.push_back(mid);
    const double h_local = std::min(s_min - lo, hi - s_min);
    const double delta = std::max({h_local / 8.0, 10.0 * brent_unc, 1e-9});
    double curvature = 0.0;
    if (s_min - delta > r_.s_first && s_min + delta < r_.s_last) {
      const SpectrumPoint left = evaluate(s_min - delta, 2), right = evaluate(s_min + delta, 2);
      curvature = (left.gap_ghz + right.gap_ghz - 2.0 * mid.gap_ghz) / (delta * delta);
      seen.push_back(left);
      seen.push_back(right);
    }
    m.gap_ghz = mid.gap_ghz;
    m.curvature_ghz = curvature;
    const double eig_err = gap_error_ghz(mid);
    const double noise_unc = curvature > 0.0 ? std::sqrt(2.0 * eig_err / curvature) : 0.0;
    m.s_uncertainty = brent_unc + noise_unc;
    m.gap_uncertainty_ghz = eig_err + (curvature > 0.0 ? 0.5 * curvature * m.s_uncertainty * m.s_uncertainty : 0.0);
    // Anything seen lower than the Brent answer (within the error) means the bracket was not unimodal.
    for (const auto& p : seen)
      if (p.gap_ghz < m.gap_ghz - eig_err) {
        m.s = p.s;
        m.gap_ghz = p.gap_ghz;
      }
    for (auto& p : seen) insert(std::move(p));
    return m;
  }

  void refine() {
    stage_ = "refinement";
    // Local minima of the governing gap on the scanned curve.
    std::vector<std::size_t> cand;
    const auto& c = r_.curve;
    for (std::size_t i = 1; i + 1 < c.size(); ++i)
      if (c[i].gap_ghz <= c[i - 1].gap_ghz && c[i].gap_ghz <= c[i + 1].gap_ghz &&
          (c[i].gap_ghz < c[i - 1].gap_ghz || c[i].gap_ghz < c[i + 1].gap_ghz))
        cand.push_back(i);
    double grid_min = std::numeric_limits<double>::infinity();
    for (const auto& p : c) grid_min = std::min(grid_min, p.gap_ghz);
    // Refine the deepest minima (at most 6; each costs about 20 eigenproblems).
    std::sort(cand.begin(), cand.end(), [&](std::size_t x, std::size_t y) { return c[x].gap_ghz < c[y].gap_ghz; });
    if (cand.size() > 6) {
      r_.flags.push_back(fmt::format("{} local minima of the gap along s; the 6 deepest were refined", cand.size()));
      cand.resize(6);
    }
    std::vector<std::pair<double, double>> brackets;
    for (std::size_t i : cand) brackets.push_back({c[i - 1].s, c[i + 1].s});
    // An end point where the sampled gap is smallest is only a candidate: the
    // minimum may sit inside the interval next to it (a grid never samples it
    // there), so that interval is searched like any other bracket.
    const bool front = c.front().gap_ghz < c[1].gap_ghz, back = c.back().gap_ghz < c[c.size() - 2].gap_ghz;
    const SpectrumPoint first = c.front(), last = c.back();
    if (front) brackets.push_back({first.s, c[1].s});
    if (back) brackets.push_back({c[c.size() - 2].s, last.s});
    for (const auto& [lo, hi] : brackets) {
      GapMinimum m = refine_on(lo, hi);
      const SpectrumPoint* end = front && lo == first.s ? &first : back && hi == last.s ? &last : nullptr;
      if (end && !(m.gap_ghz < end->gap_ghz - gap_error_ghz(*end))) m = end_minimum(*end, m);
      r_.minima.push_back(m);
    }
    std::sort(r_.minima.begin(), r_.minima.end(), [](const GapMinimum& x, const GapMinimum& y) { return x.s < y.s; });
    // Two brackets can meet the same minimum (a grid minimum next to an end).
    r_.minima.erase(std::unique(r_.minima.begin(), r_.minima.end(),
                                [](const GapMinimum& x, const GapMinimum& y) {
                                  return x.at_end_point == y.at_end_point &&
                                         std::abs(x.s - y.s) <= x.s_uncertainty + y.s_uncertainty;
                                }),
                    r_.minima.end());
  }

  /// The gap is smallest at an end point: nothing inside the interval next to it
  /// was lower (Brent on that interval, `inner`, converged onto the end). The end
  /// is the minimum's place; its s is known to the distance Brent could still
  /// tell apart from the end, its gap to the eigenvalue error.
  GapMinimum end_minimum(const SpectrumPoint& end, const GapMinimum& inner) const {
    GapMinimum m;
    m.s = end.s;
    m.gap_ghz = end.gap_ghz;
    m.gap_uncertainty_ghz = gap_error_ghz(end);
    m.s_uncertainty = std::abs(inner.s - end.s) + inner.s_uncertainty;
    m.at_end_point = true;
    return m;
  }

  /// GapMinimum::reopening from the curve.
  double reopening_at(const GapMinimum& m) const {
    if (m.at_end_point || !(m.gap_ghz > 0.0)) return 1.0;
    double left = m.gap_ghz, right = m.gap_ghz;
    for (const auto& p : r_.curve) {
      double& side = p.s < m.s ? left : right;
      side = std::max(side, p.gap_ghz);
    }
    return std::min(left, right) / m.gap_ghz;
  }

  void summarize() {
    for (auto& m : r_.minima) m.reopening = reopening_at(m);
    const auto best = std::min_element(r_.minima.begin(), r_.minima.end(), [](const GapMinimum& x, const GapMinimum& y) {
      return x.gap_ghz < y.gap_ghz;
    });
    const SpectrumPoint* pmin = &*std::min_element(
        r_.curve.begin(), r_.curve.end(), [](const SpectrumPoint& x, const SpectrumPoint& y) { return x.gap_ghz < y.gap_ghz; });
    if (best != r_.minima.end() && best->gap_ghz <= pmin->gap_ghz + best->gap_uncertainty_ghz) {
      r_.s_star = best->s;
      r_.s_star_uncertainty = best->s_uncertainty;
      r_.gap_ghz = best->gap_ghz;
      r_.gap_uncertainty_ghz = best->gap_uncertainty_ghz;
      r_.at_end_point = best->at_end_point;
      r_.reopening = best->reopening;
      if (!r_.at_end_point && r_.reopening < kSweptCrossingReopening)
        r_.flags.push_back(fmt::format(
            "the minimum at s* = {:.6f} lies next to an end of the s range: the gap reopens only to {:.4g} x Delta_min "
            "before the range ends, so the anneal stops inside it (an end gap, not a crossing passed through)",
            r_.s_star, r_.reopening));
    } else {  // flat without a strict minimum: the smallest sample, placed no better than its grid neighbours
      r_.s_star = pmin->s;
      r_.s_star_uncertainty = grid_spacing_at(static_cast<std::size_t>(pmin - r_.curve.data()));
      r_.gap_ghz = pmin->gap_ghz;
      r_.gap_uncertainty_ghz = gap_error_ghz(*pmin);
      r_.at_end_point = pmin == &r_.curve.front() || pmin == &r_.curve.back();
    }
    // Matrix element at s* (from the sample there).
    for (const auto& p : r_.curve)
      if (std::abs(p.s - r_.s_star) <= 1e-15) r_.matrix_element_ghz = p.matrix_element_ghz;
    if (r_.at_end_point)
      r_.flags.push_back(fmt::format("the smallest gap lies at the end point s = {} (no interior minimum is smaller)",
                                     r_.s_star));
    // Adiabatic time scale for s = t / t_f.
    const double two_pi = 2.0 * std::numbers::pi;
    double mmax = 0.0;
    for (const auto& p : r_.curve) {
      mmax = std::max(mmax, p.matrix_element_ghz);
      if (p.gap_ghz > 0.0) {
        const double t = p.matrix_element_ghz / (two_pi * p.gap_ghz * p.gap_ghz);
        if (t > r_.adiabatic_time_ns) {
          r_.adiabatic_time_ns = t;
          r_.adiabatic_time_s = p.s;
        }
      }
    }
    if (r_.gap_ghz > 0.0) r_.adiabatic_time_crude_ns = mmax / (two_pi * r_.gap_ghz * r_.gap_ghz);
    // E_1 - E_0, labelled.
    const auto& c = r_.curve;
    r_.gap_10_end_ghz = c.back().gap_10_ghz;
    for (std::size_t i = 1; i + 1 < c.size(); ++i)
      if (c[i].gap_10_ghz <= c[i - 1].gap_10_ghz && c[i].gap_10_ghz <= c[i + 1].gap_10_ghz &&
          (!r_.gap_10_interior_minimum || c[i].gap_10_ghz < r_.gap_10_interior_minimum->gap_ghz)) {
        GapMinimum m;
        m.s = c[i].s;
        m.s_uncertainty = 0.5 * (c[i + 1].s - c[i - 1].s);
        m.gap_ghz = c[i].gap_10_ghz;
        m.gap_uncertainty_ghz = gap_error_ghz(c[i]);
        r_.gap_10_interior_minimum = m;
      }
    if (g_ >= 2)
      r_.flags.push_back(fmt::format("E_1 - E_0 closes to {:.3g} GHz at s = {} because the ground manifold is {}-fold "
                                     "degenerate in the {}; that closing does not cost success",
                                     r_.gap_10_end_ghz, c.back().s, g_, describe_sector(sector_)));
    flag_close_levels();
  }

  /// Interior near-degeneracies and crossings among the followed levels.
  void flag_close_levels() {
    const auto& c = r_.curve;
    double scale = 0.0;
    for (const auto& p : c) scale = std::max({scale, std::abs(p.a_ghz), std::abs(p.b_ghz)});
    const double near = 1e-3 * std::max(scale, 1e-9);
    int reported = 0;
    for (int j = 0; j + 1 < k_ && reported < 8; ++j) {
      for (std::size_t i = 1; i + 1 < c.size() && reported < 8; ++i) {
        auto sp = [&](std::size_t q) {
          return c[q].energies_ghz[static_cast<std::size_t>(j + 1)] - c[q].energies_ghz[static_cast<std::size_t>(j)];
        };
        const double d = sp(i);
        if (!(d <= sp(i - 1) && d <= sp(i + 1) && d < near)) continue;
        const double tol = degeneracy_tolerance(c[i].energies_ghz, c[i].error_bound_ghz);
        r_.flags.push_back(fmt::format("levels {} and {} {} at s = {:.6f} (spacing {:.3g} GHz){}", j, j + 1,
                                       d <= tol ? "touch (crossing or exact degeneracy)" : "come close", c[i].s, d,
                                       j + 1 <= g_ ? " - this enters the governing gap" : ""));
        ++reported;
        // Skip the rest of this dip.
        while (i + 1 < c.size() && sp(i + 1) < near) ++i;
      }
    }
  }

  void other_sector_levels() {
    const SpinFlipSector other = sector_ == SpinFlipSector::Even ? SpinFlipSector::Odd : SpinFlipSector::Even;
    const SectorHamiltonian oh(full_, other);
    stage_ = "other sector";
    planned_ = evaluations_ + r_.curve.size();
    LevelOptions lo = lo_;
    lo.levels = k_;
    lo.vectors = false;
    for (auto& p : r_.curve) {
      p.other_energies_ghz = lowest_levels(oh, p.a_ghz, p.b_ghz, lo).energies_ghz;
      ++evaluations_;
      if (o_.progress) o_.progress(GapSearchProgress{evaluations_, planned_, p.s, stage_});
    }
  }

  void final_levels() {
    LevelOptions lo = lo_;
    lo.levels = k_;
    lo.vectors = true;
    const double s = r_.s_last;
    const Levels lv = lowest_levels(sh_, scales_.a_ghz(s), scales_.b_ghz(s), lo);
    const IsingProblem& p = full_.problem();
    const double amp_scale = sector_ == SpinFlipSector::Full ? 1.0 : 0.5;  // weight splits over the pair
    for (int j = 0; j < static_cast<int>(lv.energies_ghz.size()); ++j) {
      FinalLevel fl;
      fl.level = j;
      fl.energy_ghz = lv.energies_ghz[static_cast<std::size_t>(j)];
      std::vector<std::pair<double, std::size_t>> w;
      const auto col = lv.vectors.col(j);
      for (Index i = 0; i < col.size(); ++i)
        if (col[i] * col[i] >= 1e-3) w.push_back({col[i] * col[i], static_cast<std::size_t>(i)});
      std::sort(w.begin(), w.end(), [](auto& x, auto& y) { return x.first > y.first || (x.first == y.first && x.second < y.second); });
      if (w.size() > 4) w.resize(4);
      for (const auto& [weight, idx] : w) {
        fl.states.push_back(sh_.representative(idx));
        fl.weights.push_back(weight * amp_scale);
        if (sector_ != SpinFlipSector::Full) {
          fl.states.push_back(sh_.partner(idx));
          fl.weights.push_back(weight * amp_scale);
        }
      }
      if (!fl.states.empty()) {
        fl.problem_energy = p.energy(fl.states.front());
        fl.in_ground_manifold = gm_.contains(fl.states.front());
      }
      r_.final_levels.push_back(std::move(fl));
    }
    if (scales_.a_ghz(s) > 0.0)
      r_.flags.push_back(fmt::format("at the last s = {} the transverse scale A = {:.3g} GHz is not zero: the final "
                                     "levels are close to, not exactly, classical states",
                                     s, scales_.a_ghz(s)));
  }
};

}  // namespace

GapSearchPlan plan_gap_search(const TransverseIsingHamiltonian& h, const GapSearchOptions& o) {
  GapSearchPlan plan;
  plan.sector = o.sector.value_or(default_sector(h.problem()));
  check_gap_search_size(h.qubits(), plan.sector, std::max(o.levels, 1), o.method, "problem");
  const SectorHamiltonian sh(h, plan.sector);  // refuses a sector the problem does not have
  plan.dimension = sh.dim();
  plan.ground = find_ground_manifold(h.problem(), h.diagonal());
  int g = 0;
  for (BasisIndex b : plan.ground.states)
    if (b < sh.dim()) ++g;  // one representative per pair in a sector
  if (static_cast<std::size_t>(g) >= sh.dim())
    throw InputError({"problem", 0, 0, "problem"},
                     fmt::format("all {} basis states of the {} are classical ground states: there is no level "
                                 "outside the ground manifold, so no gap to find",
                                 sh.dim(), describe_sector(plan.sector)),
                     "add couplings or fields that single out a ground state");
  if (g + 1 > 128)
    throw InputError({"problem", 0, 0, "problem"},
                     fmt::format("the ground manifold holds {} states in the {}; following {} levels is beyond this "
                                 "search",
                                 g, describe_sector(plan.sector), g + 1),
                     "lift the degeneracy with small fields or couplings");
  check_gap_point_budget(o);
  plan.ground_degeneracy = g;
  plan.levels = static_cast<int>(std::min<std::size_t>(static_cast<std::size_t>(std::max(o.levels, g + 1)), sh.dim()));
  EigenMethod m = o.method;
  if (m == EigenMethod::Auto) m = sh.dim() <= kDenseMaxDim ? EigenMethod::Dense : EigenMethod::Lanczos;
  if (m == EigenMethod::Lanczos && static_cast<std::size_t>(plan.levels) + 2 > sh.dim()) m = EigenMethod::Dense;
  plan.method = m;
  plan.memory_bytes = estimate_gap_search_bytes(h.qubits(), plan.sector, plan.levels, m);
  if (plan.levels > o.levels) check_gap_search_size(h.qubits(), plan.sector, plan.levels, m, "problem");
  return plan;
}

EigenvectorsAt eigenvectors_at(const TransverseIsingHamiltonian& h, const EnergyScales& scales, double s, int levels,
                               SpinFlipSector sector, EigenMethod method) {
  const SectorHamiltonian sh(h, sector);
  EigenvectorsAt out;
  out.s = s;
  out.a_ghz = scales.a_ghz(s);
  out.b_ghz = scales.b_ghz(s);
  out.sector = sector;
  out.dimension = h.dim();
  LevelOptions lo;
  lo.levels = levels;
  lo.vectors = true;
  lo.method = method;
  const Levels lv = lowest_levels(sh, out.a_ghz, out.b_ghz, lo);
  out.energies_ghz = lv.energies_ghz;
  out.residuals_ghz = lv.residuals_ghz;
  const std::size_t k = lv.energies_ghz.size();
  out.vectors.reserve(k * h.dim());
  for (std::size_t j = 0; j < k; ++j) {
    const Eigen::VectorXd col = lv.vectors.col(static_cast<Eigen::Index>(j));
    const std::vector<double> full = sh.to_full(col.data());
    out.vectors.insert(out.vectors.end(), full.begin(), full.end());
  }
  return out;
}

MinimumGapReport find_minimum_gap(const TransverseIsingHamiltonian& h, const EnergyScales& scales,
                                  const GapSearchOptions& options) {
  GapSearch search(h, scales, options);
  return search.run();
}

GapCurveColumns gap_curve_columns(const MinimumGapReport& r) {
  GapCurveColumns c;
  for (const auto& pt : r.curve) {
    c.s.push_back(pt.s); c.a.push_back(pt.a_ghz); c.b.push_back(pt.b_ghz);
    c.gap.push_back(pt.gap_ghz); c.gap10.push_back(pt.gap_10_ghz);
    c.m.push_back(pt.matrix_element_ghz); c.m10.push_back(pt.matrix_element_10_ghz);
    c.err.push_back(pt.error_bound_ghz); c.origin.push_back(pt.origin);
    c.energies.insert(c.energies.end(), pt.energies_ghz.begin(), pt.energies_ghz.end());
    c.slopes.insert(c.slopes.end(), pt.slopes_ghz.begin(), pt.slopes_ghz.end());
    c.others.insert(c.others.end(), pt.other_energies_ghz.begin(), pt.other_energies_ghz.end());
  }
  return c;
}

}  // namespace gapwise
