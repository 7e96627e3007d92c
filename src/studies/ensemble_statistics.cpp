#include "studies/ensemble_statistics.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <random>
#include <stdexcept>

#include "problem/seeded_random.hpp"

namespace gapwise {
namespace {
// Definition 7 on sorted data: h = (n - 1) q, interpolate between x[floor h] and x[floor h + 1].
double sorted_quantile(const std::vector<double>& x, double q) {
  const std::size_t n = x.size();
  const double h = static_cast<double>(n - 1) * q;
  const std::size_t lo = static_cast<std::size_t>(std::floor(h));
  if (lo + 1 >= n) return x[n - 1];
  const double frac = h - static_cast<double>(lo);
  if (frac == 0.0 || x[lo] == x[lo + 1]) return x[lo];  // also keeps inf from becoming nan
  return x[lo] + frac * (x[lo + 1] - x[lo]);
}


std::vector<double> without_nan(std::vector<double> v) {
  v.erase(std::remove_if(v.begin(), v.end(), [](double x) { return std::isnan(x); }), v.end());
  return v;
}
}  // namespace

double quantile(std::vector<double> values, double q) {
  values = without_nan(std::move(values));
  if (values.empty()) return std::numeric_limits<double>::quiet_NaN();
  std::sort(values.begin(), values.end());
  return sorted_quantile(values, std::clamp(q, 0.0, 1.0));
}

Interval bootstrap_quantile_interval(const std::vector<double>& all, double q, int resamples, double level,
                                     std::uint64_t seed) {
  const std::vector<double> values = without_nan(all);
  if (values.empty()) throw std::invalid_argument("bootstrap of an empty sample");
  if (resamples < 1 || !(level > 0.0 && level < 1.0)) throw std::invalid_argument("bootstrap settings out of range");
  std::mt19937_64 rng(seed);
  std::vector<double> stats(static_cast<std::size_t>(resamples));
  std::vector<double> draw(values.size());
  for (auto& s : stats) {
    for (auto& d : draw) d = values[uniform_index(rng, values.size())];
    std::sort(draw.begin(), draw.end());
    s = sorted_quantile(draw, q);
  }
  std::sort(stats.begin(), stats.end());
  return {sorted_quantile(stats, (1.0 - level) / 2.0), sorted_quantile(stats, (1.0 + level) / 2.0)};
}

SampleSummary summarize_sample(const std::vector<double>& values, const std::vector<double>& qs, int resamples,
                               double level, std::uint64_t seed) {
  SampleSummary s;
  s.count = without_nan(values).size();
  for (std::size_t k = 0; k < qs.size(); ++k) {
    QuantileEstimate e;
    e.q = qs[k];
    e.value = quantile(values, qs[k]);
    e.interval = bootstrap_quantile_interval(values, qs[k], resamples, level, derive_seed(seed, {k}));
    s.quantiles.push_back(e);
  }
  return s;
}

}  // namespace gapwise
