// Paired-sample statistics for `clipwarden compare`: the Wilcoxon signed-rank
// test, the matched-pairs rank-biserial correlation, a BCa bootstrap interval
// of the mean difference, Holm's step-down adjustment and simple summaries.
// Pure C++ on plain vectors of differences d = B - A; no other dependency.
#pragma once

#include <cstdint>
#include <span>
#include <vector>

namespace clipwarden::stats {

// ---- pseudo-random numbers -------------------------------------------------

// SplitMix64 (Steele, Lea & Flood, "Fast splittable pseudorandom number
// generators", OOPSLA 2014): a 64-bit counter passed through a mixing
// function. Small, fast, passes BigCrush, and the same on every platform,
// which is what a reproducible bootstrap needs.
class SplitMix64 {
 public:
  explicit SplitMix64(uint64_t seed) : state_(seed) {}
  uint64_t next();
  // Uniform in [0, bound), bound > 0, without modulo bias (Lemire 2019,
  // "Fast random integer generation in an interval", ACM TOMACS 29(1)).
  uint64_t below(uint64_t bound);

 private:
  uint64_t state_;
};

// ---- the standard normal distribution ----------------------------------------

double normal_cdf(double z);       // Phi(z), via erfc for accuracy in the tails
double normal_sf(double z);        // 1 - Phi(z), without cancellation
double normal_quantile(double p);  // Phi^-1(p); -inf at 0, +inf at 1, NaN outside

// ---- Wilcoxon signed-rank test -------------------------------------------------

// What to do with zero differences (Pratt 1959; scipy names them the same):
//   wilcox: drop them, then rank the rest (Wilcoxon's original rule; default)
//   pratt:  rank them with the others, then drop their ranks
//   zsplit: rank them with the others and split their ranks evenly
//           between the positive and the negative sums
enum class ZeroMethod { wilcox, pratt, zsplit };

// Alternatives are about d = B - A: `greater` means d tends to be positive.
enum class Alternative { two_sided, less, greater };

// automatic: exact when it is valid (no ranked zeros) and the number of
// ranked differences is at most exact_max_n, normal otherwise. With tied
// |d| the exact distribution is the one conditional on the ties (all 2^n
// sign patterns of the observed average ranks).
// exact is honoured only when valid; `none` marks a test with no non-zero
// difference (nothing to rank).
enum class TestMethod { automatic, exact, normal, none };

struct WilcoxonOptions {
  ZeroMethod zero_method = ZeroMethod::wilcox;
  Alternative alternative = Alternative::two_sided;
  TestMethod method = TestMethod::automatic;
  bool continuity_correction = false;  // scipy's `correction`
  int exact_max_n = 50;                // counts stay exact in 64 bits up to 62
};

struct WilcoxonResult {
  double r_plus = 0;     // sum of the ranks of positive differences
  double r_minus = 0;    // sum of the ranks of negative differences
  double statistic = 0;  // min(r_plus, r_minus) two-sided, r_plus one-sided
  double p_value = 1;
  double z = 0;       // normal approximation only (signed like r_plus - mean)
  int n = 0;          // all differences given
  int n_zero = 0;     // differences exactly zero
  int n_ranked = 0;   // ranks in the null distribution
  bool ties = false;  // ties among the ranked |d|
  TestMethod method_used = TestMethod::none;
};

WilcoxonResult wilcoxon_signed_rank(std::span<const double> differences,
                                    const WilcoxonOptions& options = {});

// Exact null distribution of R+ for n untied ranks 1..n: counts[k] is the
// number of the 2^n sign patterns whose positive ranks sum to k.
std::vector<uint64_t> signed_rank_null_counts(int n);

// Matched-pairs rank-biserial correlation (Kerby 2014, "The simple
// difference formula", Comprehensive Psychology 3:11.IT.3.1):
// (R+ - R-) / (R+ + R-), in [-1, 1]; positive when B tends to exceed A.
// 0 when there is no non-zero difference.
double rank_biserial(const WilcoxonResult& result);

// Average ranks of |values| (ties share the mean of their positions), 1-based.
std::vector<double> average_ranks_of_abs(std::span<const double> values);

// ---- bootstrap -------------------------------------------------------------------

struct BootstrapOptions {
  int resamples = 10000;
  uint64_t seed = 20240607;
  double confidence_level = 0.95;
};

// Means of `resamples` resamples of `values` drawn with replacement.
std::vector<double> bootstrap_means(std::span<const double> values, int resamples, uint64_t seed);

struct ConfidenceInterval {
  double low = 0;
  double high = 0;
  double bias_correction_z0 = 0;  // Efron's z0
  double acceleration = 0;        // Efron's a, from the jackknife
  bool degenerate = false;        // all values equal: the interval is that value
};

// BCa interval of the mean (Efron 1987, "Better bootstrap confidence
// intervals", JASA 82:171-185; Efron & Tibshirani 1993, ch. 14.3) from a
// bootstrap distribution of the mean already drawn. Needs >= 2 values.
ConfidenceInterval bca_interval_of_mean(std::span<const double> values,
                                        std::span<const double> bootstrap_distribution,
                                        double confidence_level);
ConfidenceInterval bca_interval_of_mean(std::span<const double> values,
                                        const BootstrapOptions& options = {});

// ---- multiple comparisons and summaries ----------------------------------------

// Holm (1979) step-down adjusted p-values, in the input order. NaN entries
// are not hypotheses: they stay NaN and do not count in the family size.
std::vector<double> holm_adjust(std::span<const double> p_values);

double mean_of(std::span<const double> values);
double median_of(std::span<const double> values);

}  // namespace clipwarden::stats
