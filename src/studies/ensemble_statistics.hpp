#pragma once
// Order statistics of an ensemble and their bootstrap confidence intervals.
//
// quantile(): the sample quantile by linear interpolation between order
// statistics, "definition 7" of Hyndman and Fan, Am. Stat. 50, 361 (1996)
// (the default of R and NumPy). Confidence intervals: the percentile bootstrap
// (Efron, Ann. Stat. 7, 1 (1979); Efron and Tibshirani, "An Introduction to the
// Bootstrap", 1993): resample the values with replacement B times, take the
// statistic of each resample, report its (1-level)/2 and (1+level)/2 quantiles.
// The resampling stream is seeded, so the interval is reproducible bit for bit.
//
//   std::vector<double> tts = {...};
//   double med = quantile(tts, 0.5);
//   Interval ci = bootstrap_quantile_interval(tts, 0.5, 2000, 0.95, /*seed=*/7);
#include <cstdint>
#include <vector>

namespace gapwise {

/// q in [0, 1] (clamped); the values need not be sorted. NaNs are ignored; NaN
/// when nothing is left. Infinite values are ordered, never turned into NaN.
double quantile(std::vector<double> values, double q);

struct Interval {
  double low = 0;
  double high = 0;
};

/// Percentile-bootstrap interval for the q-quantile of the non-NaN values. One
/// value gives [v, v]. Throws std::invalid_argument when no value is left or the
/// settings are out of range.
Interval bootstrap_quantile_interval(const std::vector<double>& values, double q, int resamples, double level,
                                     std::uint64_t seed);

/// The quantile and its interval, as reported per size.
struct QuantileEstimate {
  double q = 0.5;
  double value = 0;
  Interval interval;
};

struct SampleSummary {
  std::size_t count = 0;
  std::vector<QuantileEstimate> quantiles;  ///< one per requested q, in order
};

/// quantile + bootstrap interval for each q; the stream for quantile k is
/// derive_seed(seed, {k}), so adding a quantile does not change the others.
SampleSummary summarize_sample(const std::vector<double>& values, const std::vector<double>& qs, int resamples,
                               double level, std::uint64_t seed);

}  // namespace gapwise
