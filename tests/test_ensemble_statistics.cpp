// Sample quantiles and percentile-bootstrap confidence intervals.
#include <doctest/doctest.h>

#include <cmath>
#include <limits>
#include <numbers>
#include <random>

#include "problem/seeded_random.hpp"
#include "studies/ensemble_statistics.hpp"

using namespace gapwise;

TEST_CASE("quantile follows definition 7 of Hyndman and Fan (1996)") {
  // Values worked by hand from h = (n - 1) q (Hyndman and Fan, Am. Stat. 50, 361
  // (1996)); they agree with NumPy's default quantile (from memory).
  CHECK(quantile({3, 1, 2}, 0.5) == 2.0);
  CHECK(quantile({4, 1, 3, 2}, 0.5) == 2.5);
  CHECK(quantile({1, 2, 3, 4}, 0.25) == doctest::Approx(1.75));
  CHECK(quantile({1, 2, 3, 4}, 0.75) == doctest::Approx(3.25));
  CHECK(quantile({10, 20, 30, 40, 50}, 0.1) == doctest::Approx(14.0));
  CHECK(quantile({7}, 0.9) == 7.0);
  CHECK(quantile({1, 2}, 0.0) == 1.0);
  CHECK(quantile({1, 2}, 1.0) == 2.0);
  const double inf = std::numeric_limits<double>::infinity();
  CHECK(quantile({1, inf, inf}, 0.75) == inf);  // never nan
  CHECK(std::isnan(quantile({}, 0.5)));
  CHECK_THROWS(bootstrap_quantile_interval({}, 0.5, 10, 0.9, 1));
}

TEST_CASE("bootstrap interval of the median: reproducible and of the asymptotic width") {
  std::mt19937_64 rng(99);
  std::vector<double> x(400);
  for (auto& v : x) v = standard_normal(rng);
  const Interval a = bootstrap_quantile_interval(x, 0.5, 2000, 0.95, 7);
  const Interval b = bootstrap_quantile_interval(x, 0.5, 2000, 0.95, 7);
  const Interval c = bootstrap_quantile_interval(x, 0.5, 2000, 0.95, 8);
  CHECK(a.low == b.low);
  CHECK(a.high == b.high);
  CHECK((a.low != c.low || a.high != c.high));
  const double med = quantile(x, 0.5);
  CHECK(a.low < med);
  CHECK(med < a.high);
  // The sample median of n normal values has standard error sqrt(pi/2) sigma/sqrt(n)
  // for large n (Laplace; e.g. Kendall and Stuart, The Advanced Theory of
  // Statistics, vol. 1). A 95 % interval spans about 2 * 1.96 of them; the
  // bootstrap of a median is coarse, so allow 30 %.
  const double expected = 2 * 1.96 * std::sqrt(std::numbers::pi / 2) / std::sqrt(400.0);
  CHECK((a.high - a.low) == doctest::Approx(expected).epsilon(0.3));
}

TEST_CASE("summary: one value, and quantile streams independent of each other") {
  const SampleSummary one = summarize_sample({5.0}, {0.25, 0.5}, 100, 0.9, 1);
  CHECK(one.count == 1);
  CHECK(one.quantiles[1].value == 5.0);
  CHECK(one.quantiles[1].interval.low == 5.0);
  CHECK(one.quantiles[1].interval.high == 5.0);
  const std::vector<double> v = {1, 5, 2, 8, 3, 9, 4};
  const SampleSummary s1 = summarize_sample(v, {0.5}, 500, 0.9, 3);
  const SampleSummary s2 = summarize_sample(v, {0.5, 0.75}, 500, 0.9, 3);
  CHECK(s1.quantiles[0].interval.low == s2.quantiles[0].interval.low);
  CHECK(s1.quantiles[0].interval.high == s2.quantiles[0].interval.high);
  CHECK(s2.quantiles[1].value == doctest::Approx(6.5));
}
