// Exact binomial methods for `clipwarden compare`: the sign test on the
// prompts that changed, its exact (Clopper-Pearson) interval for the share
// of prompts where B is better, and McNemar's exact test, which is the sign
// test on the discordant pairs of a paired 2 x 2 table.
#pragma once

namespace clipwarden::stats {

// log P(X = k) for X ~ Binomial(n, p), 0 <= k <= n, 0 <= p <= 1.
double binomial_log_pmf(int k, int n, double p);
// P(X <= k) and P(X >= k), each summed over its own tail (no 1 - x
// cancellation in the far tail).
double binomial_cdf(int k, int n, double p);
double binomial_upper_tail(int k, int n, double p);

// Two-sided exact binomial test of k successes in n trials against p = 1/2:
// min(1, 2 P(X <= min(k, n - k))). With p = 1/2 the distribution is
// symmetric, so this equals the "sum of outcomes no more likely than k"
// definition. 1 when n = 0 (no evidence).
double binomial_test_half(int k, int n);

// Exact two-sided interval of a binomial proportion (Clopper & Pearson
// 1934, Biometrika 26:404-413): the p at which observing k or more
// (lower end), or k or fewer (upper end), has probability (1 - level) / 2.
// NaN ends when n = 0.
struct ProportionInterval {
  double low = 0;
  double high = 1;
};
ProportionInterval clopper_pearson(int k, int n, double confidence_level);

// The smallest two-sided p-value an exact paired test on n untied, non-zero
// differences can give: 2 / 2^n (every sign the same way), for the sign
// test and for the exact Wilcoxon signed-rank test alike.
double smallest_two_sided_p(int n);

}  // namespace clipwarden::stats
