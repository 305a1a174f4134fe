// Paired-sample statistics; see paired_stats.h for the sources of each method.
#include "analyzer/compare/paired_stats.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>
#include <numeric>

#include "analyzer/frame/series_math.h"

namespace clipwarden::stats {

// ---- SplitMix64 ---------------------------------------------------------------

uint64_t SplitMix64::next() {
  // Constants of the published generator (the golden-ratio increment and
  // the two multipliers of its finaliser).
  state_ += 0x9E3779B97F4A7C15ull;
  uint64_t z = state_;
  z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ull;
  z = (z ^ (z >> 27)) * 0x94D049BB133111EBull;
  return z ^ (z >> 31);
}

uint64_t SplitMix64::below(uint64_t bound) {
  // Rejection of the lowest (2^64 mod bound) values makes every residue
  // equally likely (common practice, e.g. OpenBSD's arc4random_uniform).
  const uint64_t threshold = (0 - bound) % bound;
  for (;;) {
    const uint64_t x = next();
    if (x >= threshold) return x % bound;
  }
}

// ---- normal distribution ---------------------------------------------------------

double normal_cdf(double z) { return 0.5 * std::erfc(-z / std::sqrt(2.0)); }
double normal_sf(double z) { return 0.5 * std::erfc(z / std::sqrt(2.0)); }

namespace {
// Lower-tail quantile for 0 < p <= 0.5. Starting point: Abramowitz & Stegun
// 26.2.23 (|error| < 4.5e-4; coefficients recalled from memory, which is
// harmless: Halley's iterations below converge cubically from any start this
// close), then three Halley steps on Phi(x) - p to full double precision.
double lower_normal_quantile(double p) {
  const double t = std::sqrt(-2.0 * std::log(p));
  double x = -(t - (2.515517 + 0.802853 * t + 0.010328 * t * t) /
                       (1.0 + 1.432788 * t + 0.189269 * t * t + 0.001308 * t * t * t));
  const double sqrt_2pi = std::sqrt(2.0 * std::numbers::pi);
  for (int i = 0; i < 3; ++i) {
    const double e = normal_cdf(x) - p;
    const double u = e * sqrt_2pi * std::exp(0.5 * x * x);
    x -= u / (1.0 + 0.5 * x * u);
  }
  return x;
}
}  // namespace

double normal_quantile(double p) {
  if (!(p >= 0.0 && p <= 1.0)) return std::numeric_limits<double>::quiet_NaN();
  if (p == 0.0) return -std::numeric_limits<double>::infinity();
  if (p == 1.0) return std::numeric_limits<double>::infinity();
  if (p <= 0.5) return lower_normal_quantile(p);
  return -lower_normal_quantile(1.0 - p);  // 1 - p is exact for p >= 0.5
}

// ---- ranks ------------------------------------------------------------------------

std::vector<double> average_ranks_of_abs(std::span<const double> values) {
  const size_t n = values.size();
  std::vector<size_t> order(n);
  std::iota(order.begin(), order.end(), size_t{0});
  std::stable_sort(order.begin(), order.end(),
                   [&](size_t a, size_t b) { return std::fabs(values[a]) < std::fabs(values[b]); });
  std::vector<double> ranks(n);
  for (size_t i = 0; i < n;) {
    size_t j = i;
    while (j + 1 < n && std::fabs(values[order[j + 1]]) == std::fabs(values[order[i]])) ++j;
    const double rank = 0.5 * static_cast<double>(i + j) + 1.0;  // mean of positions i+1..j+1
    for (size_t k = i; k <= j; ++k) ranks[order[k]] = rank;
    i = j + 1;
  }
  return ranks;
}

namespace {
// Sum over groups of tied |values| of t(t^2 - 1), the tie term of the
// variance of R+ (e.g. Hollander & Wolfe, Nonparametric Statistical
// Methods, section 3.1).
double tie_term(std::vector<double> abs_values) {
  std::sort(abs_values.begin(), abs_values.end());
  double term = 0;
  for (size_t i = 0; i < abs_values.size();) {
    size_t j = i;
    while (j + 1 < abs_values.size() && abs_values[j + 1] == abs_values[i]) ++j;
    const double t = static_cast<double>(j - i + 1);
    term += t * (t * t - 1.0);
    i = j + 1;
  }
  return term;
}
}  // namespace

// ---- Wilcoxon signed-rank ------------------------------------------------------------

std::vector<uint64_t> signed_rank_null_counts(int n) {
  // Subset-sum recursion: adding rank i either leaves a pattern's R+ alone
  // (negative sign) or adds i (positive sign).
  const int max_sum = n * (n + 1) / 2;
  std::vector<uint64_t> counts(static_cast<size_t>(max_sum) + 1, 0);
  counts[0] = 1;
  for (int i = 1; i <= n; ++i)
    for (int k = i * (i + 1) / 2; k >= i; --k) counts[k] += counts[k - i];
  return counts;
}

namespace {

// Null distribution of 2 R+ for the given ranks (average ranks when |d| is
// tied, so doubling makes them whole numbers): counts[k] is the number of
// the 2^n sign patterns whose positive ranks sum to k / 2. With ties this is
// the exact distribution conditional on the tie pattern, the one a paired
// permutation test enumerates by flipping signs (Hollander & Wolfe,
// Nonparametric Statistical Methods, section 3.1, comment on ties).
std::vector<uint64_t> doubled_rank_sum_counts(const std::vector<double>& ranks) {
  std::vector<int> doubled;
  int total = 0;
  for (double r : ranks) total += doubled.emplace_back(static_cast<int>(std::lround(2 * r)));
  std::vector<uint64_t> counts(static_cast<size_t>(total) + 1, 0);
  counts[0] = 1;
  int reach = 0;
  for (int d : doubled) {
    reach += d;
    for (int k = reach; k >= d; --k) counts[k] += counts[k - d];
  }
  return counts;
}

void exact_p_value(WilcoxonResult& r, Alternative alternative, const std::vector<double>& ranks) {
  const auto counts = doubled_rank_sum_counts(ranks);
  const auto observed = static_cast<size_t>(std::llround(2 * r.r_plus));
  uint64_t at_most = 0, at_least = 0;
  for (size_t k = 0; k < counts.size(); ++k) {
    if (k <= observed) at_most += counts[k];
    if (k >= observed) at_least += counts[k];
  }
  const double total = std::ldexp(1.0, r.n_ranked);
  const double p_le = static_cast<double>(at_most) / total;
  const double p_ge = static_cast<double>(at_least) / total;
  switch (alternative) {
    case Alternative::two_sided:
      r.p_value = std::min(1.0, 2.0 * std::min(p_le, p_ge));
      break;
    case Alternative::less:
      r.p_value = p_le;
      break;
    case Alternative::greater:
      r.p_value = p_ge;
      break;
  }
  r.method_used = TestMethod::exact;
}

// Normal approximation with the tie correction; with pratt the mean and
// variance drop the zeros' ranks 1..n0 (Cureton 1967, "The normal
// approximation to the signed-rank sampling distribution when zero
// differences are present", JASA 62:1068-1069).
void normal_p_value(WilcoxonResult& r, const WilcoxonOptions& o, double tie_sum) {
  const double n = r.n_ranked;
  double mean = n * (n + 1) / 4.0;
  double var24 = n * (n + 1) * (2 * n + 1);
  if (o.zero_method == ZeroMethod::pratt) {
    const double z0 = r.n_zero;
    mean -= z0 * (z0 + 1) / 4.0;
    var24 -= z0 * (z0 + 1) * (2 * z0 + 1);
  }
  var24 -= 0.5 * tie_sum;
  const double se = std::sqrt(var24 / 24.0);
  double shift = 0;
  if (o.continuity_correction) {
    if (o.alternative == Alternative::two_sided)
      shift = r.statistic > mean ? 0.5 : (r.statistic < mean ? -0.5 : 0.0);
    else
      shift = o.alternative == Alternative::less ? -0.5 : 0.5;
  }
  const double z = (r.statistic - mean - shift) / se;
  switch (o.alternative) {
    case Alternative::two_sided:
      r.p_value = std::min(1.0, 2.0 * normal_sf(std::fabs(z)));
      r.z = r.r_plus >= r.r_minus ? std::fabs(z) : -std::fabs(z);
      break;
    case Alternative::less:
      r.p_value = normal_cdf(z);
      r.z = z;
      break;
    case Alternative::greater:
      r.p_value = normal_sf(z);
      r.z = z;
      break;
  }
  r.method_used = TestMethod::normal;
}

}  // namespace

WilcoxonResult wilcoxon_signed_rank(std::span<const double> differences, const WilcoxonOptions& o) {
  WilcoxonResult r;
  r.n = static_cast<int>(differences.size());
  std::vector<double> ranked;  // the differences that receive ranks
  for (double d : differences) {
    if (d == 0) ++r.n_zero;
    if (d != 0 || o.zero_method != ZeroMethod::wilcox) ranked.push_back(d);
  }
  r.n_ranked = static_cast<int>(ranked.size());
  if (r.n_zero == r.n) {  // nothing to rank: no evidence either way
    r.method_used = TestMethod::none;
    return r;
  }
  const std::vector<double> ranks = average_ranks_of_abs(ranked);
  double r_zero = 0;
  std::vector<double> abs_nonzero, abs_all;
  for (size_t i = 0; i < ranked.size(); ++i) {
    if (ranked[i] > 0) r.r_plus += ranks[i];
    if (ranked[i] < 0) r.r_minus += ranks[i];
    if (ranked[i] == 0) r_zero += ranks[i];
    if (ranked[i] != 0) abs_nonzero.push_back(std::fabs(ranked[i]));
    abs_all.push_back(std::fabs(ranked[i]));
  }
  if (o.zero_method == ZeroMethod::zsplit) {
    r.r_plus += r_zero / 2;
    r.r_minus += r_zero / 2;
  }
  r.statistic = o.alternative == Alternative::two_sided ? std::min(r.r_plus, r.r_minus) : r.r_plus;
  // The tie term counts the zeros' own tie only where they keep their ranks
  // in the sums (zsplit), as Pratt's and Cureton's adjustments prescribe.
  const double tie_sum = tie_term(o.zero_method == ZeroMethod::zsplit ? abs_all : abs_nonzero);
  const double nonzero_ties = tie_term(abs_nonzero);
  r.ties = nonzero_ties > 0;
  // Exact (conditional on ties) whenever every ranked difference is
  // non-zero; ranked zeros (pratt, zsplit) take the normal approximation.
  const bool exact_valid = r.n_zero == 0 || o.zero_method == ZeroMethod::wilcox;
  bool use_exact = false;
  if (o.method == TestMethod::automatic) use_exact = exact_valid && r.n_ranked <= o.exact_max_n;
  if (o.method == TestMethod::exact) use_exact = exact_valid && r.n_ranked <= 62;
  if (use_exact)
    exact_p_value(r, o.alternative, ranks);
  else
    normal_p_value(r, o, tie_sum);
  r.p_value = std::clamp(r.p_value, 0.0, 1.0);
  return r;
}

double rank_biserial(const WilcoxonResult& r) {
  const double total = r.r_plus + r.r_minus;
  return total > 0 ? (r.r_plus - r.r_minus) / total : 0.0;
}

// ---- bootstrap ------------------------------------------------------------------------

std::vector<double> bootstrap_means(std::span<const double> values, int resamples, uint64_t seed) {
  std::vector<double> means(static_cast<size_t>(std::max(resamples, 0)));
  if (values.empty()) return means;
  // Each resample is summed in the original order, weighted by how often a
  // value was drawn, so a resample that merely permutes the data gives
  // exactly the original mean: rounding must not decide whether a resample
  // lies below the estimate, which the BCa bias correction counts.
  SplitMix64 rng(seed);
  const uint64_t n = values.size();
  std::vector<uint32_t> drawn(n);
  for (auto& m : means) {
    std::fill(drawn.begin(), drawn.end(), 0u);
    for (uint64_t i = 0; i < n; ++i) ++drawn[rng.below(n)];
    double sum = 0;
    for (uint64_t i = 0; i < n; ++i)
      if (drawn[i] != 0) sum += drawn[i] == 1 ? values[i] : drawn[i] * values[i];
    m = sum / static_cast<double>(n);
  }
  return means;
}

ConfidenceInterval bca_interval_of_mean(std::span<const double> values,
                                        std::span<const double> bootstrap_distribution,
                                        double confidence_level) {
  ConfidenceInterval ci;
  const double nan = std::numeric_limits<double>::quiet_NaN();
  const size_t n = values.size();
  if (n < 2 || bootstrap_distribution.empty()) return {nan, nan, nan, nan, false};
  const double theta_hat = mean_of(values);
  if (std::all_of(values.begin(), values.end(), [&](double v) { return v == values[0]; }))
    return {values[0], values[0], 0, 0, true};

  // Bias correction: the bootstrap distribution's share below theta_hat,
  // ties counted half (mid-rank), through Phi^-1 (Efron & Tibshirani 14.14).
  std::vector<double> sorted(bootstrap_distribution.begin(), bootstrap_distribution.end());
  std::sort(sorted.begin(), sorted.end());
  const auto below = std::lower_bound(sorted.begin(), sorted.end(), theta_hat) - sorted.begin();
  const auto at_most = std::upper_bound(sorted.begin(), sorted.end(), theta_hat) - sorted.begin();
  ci.bias_correction_z0 = normal_quantile(static_cast<double>(below + at_most) /
                                          (2.0 * static_cast<double>(sorted.size())));

  // Acceleration from the jackknife means (Efron & Tibshirani 14.15).
  const double sum = std::accumulate(values.begin(), values.end(), 0.0);
  std::vector<double> jack(n);
  for (size_t i = 0; i < n; ++i) jack[i] = (sum - values[i]) / static_cast<double>(n - 1);
  const double jack_mean = mean_of(jack);
  double num = 0, den = 0;
  for (double t : jack) {
    const double u = jack_mean - t;
    num += u * u * u;
    den += u * u;
  }
  ci.acceleration = num / (6.0 * std::pow(den, 1.5));

  // Adjusted percentiles (Efron & Tibshirani 14.10).
  const double z_alpha = normal_quantile((1.0 - confidence_level) / 2.0);
  auto adjusted = [&](double z) {
    const double s = ci.bias_correction_z0 + z;
    return normal_cdf(ci.bias_correction_z0 + s / (1.0 - ci.acceleration * s));
  };
  ci.low = quantile_of_sorted(sorted, adjusted(z_alpha));
  ci.high = quantile_of_sorted(sorted, adjusted(-z_alpha));
  return ci;
}

ConfidenceInterval bca_interval_of_mean(std::span<const double> values,
                                        const BootstrapOptions& options) {
  const auto distribution = bootstrap_means(values, options.resamples, options.seed);
  return bca_interval_of_mean(values, distribution, options.confidence_level);
}

// ---- Holm and summaries ------------------------------------------------------------------

std::vector<double> holm_adjust(std::span<const double> p_values) {
  // Holm 1979: with the m defined p-values sorted p(1) <= ... <= p(m),
  // adjusted p(i) = max over j <= i of min(1, (m - j + 1) p(j)).
  std::vector<double> adjusted(p_values.size(), std::numeric_limits<double>::quiet_NaN());
  std::vector<size_t> order;
  for (size_t i = 0; i < p_values.size(); ++i)
    if (!std::isnan(p_values[i])) order.push_back(i);
  std::stable_sort(order.begin(), order.end(),
                   [&](size_t a, size_t b) { return p_values[a] < p_values[b]; });
  const double m = static_cast<double>(order.size());
  double running_max = 0;
  for (size_t j = 0; j < order.size(); ++j) {
    const double scaled = std::min(1.0, (m - static_cast<double>(j)) * p_values[order[j]]);
    running_max = std::max(running_max, scaled);
    adjusted[order[j]] = running_max;
  }
  return adjusted;
}

double mean_of(std::span<const double> values) {
  if (values.empty()) return std::numeric_limits<double>::quiet_NaN();
  return std::accumulate(values.begin(), values.end(), 0.0) / static_cast<double>(values.size());
}

double median_of(std::span<const double> values) {
  return quantile(std::vector<double>(values.begin(), values.end()), 0.5);
}

}  // namespace clipwarden::stats
