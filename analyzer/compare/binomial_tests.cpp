// Exact binomial methods; see binomial_tests.h for the sources.
#include "analyzer/compare/binomial_tests.h"

#include <algorithm>
#include <cmath>
#include <limits>

namespace clipwarden::stats {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// Sum of P(X = i) for i in [from, to]. Every term is positive, so the sum
// keeps the relative precision of its terms, even far out in a tail.
double pmf_sum(int from, int to, int n, double p) {
  double sum = 0;
  for (int i = from; i <= to; ++i) sum += std::exp(binomial_log_pmf(i, n, p));
  return std::min(1.0, sum);
}

// Bisection for the p in [0, 1] where f(p) = target, f monotone; 200 halvings
// reach the spacing of doubles long before they run out.
template <class F>
double solve_monotone(F f, double target, bool increasing) {
  double lo = 0, hi = 1;
  for (int i = 0; i < 200 && hi - lo > 0; ++i) {
    const double mid = 0.5 * (lo + hi);
    if (mid == lo || mid == hi) break;
    if ((f(mid) < target) == increasing)
      lo = mid;
    else
      hi = mid;
  }
  return 0.5 * (lo + hi);
}

}  // namespace

double binomial_log_pmf(int k, int n, double p) {
  if (k < 0 || k > n) return -std::numeric_limits<double>::infinity();
  // p = 0 or 1 puts all the mass on one outcome (log(0) would be -inf * 0).
  if (p <= 0) return k == 0 ? 0.0 : -std::numeric_limits<double>::infinity();
  if (p >= 1) return k == n ? 0.0 : -std::numeric_limits<double>::infinity();
  return std::lgamma(n + 1.0) - std::lgamma(k + 1.0) - std::lgamma(n - k + 1.0) + k * std::log(p) +
         (n - k) * std::log1p(-p);
}

double binomial_cdf(int k, int n, double p) {
  if (k < 0) return 0;
  if (k >= n) return 1;
  return pmf_sum(0, k, n, p);
}

double binomial_upper_tail(int k, int n, double p) {
  if (k <= 0) return 1;
  if (k > n) return 0;
  return pmf_sum(k, n, n, p);
}

namespace {

// P(X <= k) at p = 1/2, k below the centre. Up to n = 1022 (where 2^-n is
// still a normal double) the terms come from C(n, i + 1) = C(n, i) (n - i) /
// (i + 1) on 2^-n: exact while the coefficients stay below 2^53, so small
// studies get exact answers (2/2^n, 18/256); beyond, the log form.
double lower_tail_half(int k, int n) {
  if (n > 1022) return binomial_cdf(k, n, 0.5);
  double term = std::ldexp(1.0, -n), sum = 0;
  for (int i = 0; i <= k; ++i) {
    sum += term;
    term = term * (n - i) / (i + 1);
  }
  return sum;
}

}  // namespace

double binomial_test_half(int k, int n) {
  if (n <= 0) return 1;
  const int smaller = std::min(k, n - k);
  if (2 * smaller == n) return 1;  // k is the centre: every outcome is at most as likely
  return std::min(1.0, 2.0 * lower_tail_half(smaller, n));
}

ProportionInterval clopper_pearson(int k, int n, double confidence_level) {
  if (n <= 0 || k < 0 || k > n) return {kNaN, kNaN};
  const double tail = (1.0 - confidence_level) / 2.0;
  ProportionInterval ci;
  // P(X >= k; p) rises with p; P(X <= k; p) falls with p.
  ci.low = k == 0
               ? 0.0
               : solve_monotone([&](double p) { return binomial_upper_tail(k, n, p); }, tail, true);
  ci.high =
      k == n ? 1.0 : solve_monotone([&](double p) { return binomial_cdf(k, n, p); }, tail, false);
  return ci;
}

double smallest_two_sided_p(int n) {
  if (n <= 0) return 1;
  return std::min(1.0, std::ldexp(1.0, 1 - n));
}

}  // namespace clipwarden::stats
