// Paired statistics (analyzer/compare/paired_stats) against worked examples,
// published tables and definitions. The scipy comparisons are in
// tests/reference/compare_*_scipy_test.cpp.
#include <gtest/gtest.h>

#include <cmath>
#include <limits>

#include "analyzer/compare/paired_stats.h"
#include "analyzer/frame/series_math.h"

namespace st = clipwarden::stats;

namespace {
// Darwin's Zea mays experiment as analysed in Fisher, "The Design of
// Experiments" (1935), section 17: height of the cross-fertilised minus the
// self-fertilised plant in 15 pots, in eighths of an inch (data recalled from
// memory; the same numbers are scipy.stats.wilcoxon's documented example).
const std::vector<double> kDarwinDifferences = {49, -67, 8,  16, 6,  23, 28, 41,
                                                14, 29,  56, 24, 75, 60, -48};
}  // namespace

TEST(Wilcoxon, FisherDarwinWorkedExample) {
  // By hand: |d| sorted 6 8 14 16 23 24 28 29 41 48 49 56 60 67 75 take
  // ranks 1..15; the negatives are 48 (rank 10) and 67 (rank 14), so
  // R- = 24 and R+ = 120 - 24 = 96.
  const auto r = st::wilcoxon_signed_rank(kDarwinDifferences);
  EXPECT_EQ(r.r_minus, 24);
  EXPECT_EQ(r.r_plus, 96);
  EXPECT_EQ(r.statistic, 24);
  EXPECT_EQ(r.method_used, st::TestMethod::exact);
  // Exact two-sided p = 2 P(R+ <= 24) = 2 * 676 / 2^15 = 0.041259765625,
  // where 676 sign patterns of 15 ranks have a positive sum <= 24 (counted
  // below by brute force over all 2^15 patterns, independently of the
  // recursion the library uses).
  int at_most_24 = 0;
  for (int mask = 0; mask < (1 << 15); ++mask) {
    int sum = 0;
    for (int rank = 1; rank <= 15; ++rank)
      if (mask & (1 << (rank - 1))) sum += rank;
    if (sum <= 24) ++at_most_24;
  }
  EXPECT_EQ(at_most_24, 676);
  EXPECT_DOUBLE_EQ(r.p_value, 2.0 * 676 / 32768);
  EXPECT_DOUBLE_EQ(r.p_value, 0.041259765625);
  // One-sided (cross-fertilised taller): P(R+ >= 96) = P(R+ <= 24) by symmetry.
  st::WilcoxonOptions greater;
  greater.alternative = st::Alternative::greater;
  EXPECT_DOUBLE_EQ(st::wilcoxon_signed_rank(kDarwinDifferences, greater).p_value, 676.0 / 32768);
  // Normal approximation: mean n(n+1)/4 = 60, variance n(n+1)(2n+1)/24 = 310,
  // z = (24 - 60) / sqrt(310) = -2.04466; p = 2 Phi(-2.04466) = 0.040888.
  st::WilcoxonOptions normal;
  normal.method = st::TestMethod::normal;
  const auto approx = st::wilcoxon_signed_rank(kDarwinDifferences, normal);
  EXPECT_NEAR(approx.z, 36 / std::sqrt(310.0), 1e-12);  // signed like R+ - mean
  EXPECT_NEAR(approx.p_value, 0.040888, 5e-7);
  // Matched-pairs rank-biserial (Kerby 2014): (96 - 24) / 120 = 0.6.
  EXPECT_DOUBLE_EQ(st::rank_biserial(r), 0.6);
}

TEST(Wilcoxon, CriticalValuesOfTheStandardTable) {
  // Two-tailed alpha = 0.05 critical values of the smaller rank sum T
  // (reject when T <= value), from the standard table printed in
  // nonparametric textbooks (e.g. Siegel & Castellan 1988, table H) --
  // recalled from memory. The largest T whose exact two-sided p <= 0.05.
  const std::pair<int, int> table[] = {{6, 0},   {7, 2},   {8, 3},   {9, 5},   {10, 8},  {11, 10},
                                       {12, 13}, {13, 17}, {14, 21}, {15, 25}, {16, 29}, {17, 34},
                                       {18, 40}, {19, 46}, {20, 52}, {25, 89}, {30, 137}};
  for (auto [n, critical] : table) {
    const auto counts = st::signed_rank_null_counts(n);
    uint64_t cumulative = 0;
    int largest = -1;
    for (size_t k = 0; k < counts.size(); ++k) {
      cumulative += counts[k];
      if (2.0 * static_cast<double>(cumulative) / std::ldexp(1.0, n) > 0.05) break;
      largest = static_cast<int>(k);
    }
    EXPECT_EQ(largest, critical) << "n = " << n;
  }
}

TEST(Wilcoxon, ExactGivenTheTies) {
  // d = 1, 1, 2, -2: |d| ranks 1.5 1.5 3.5 3.5, R+ = 6.5, R- = 3.5. By hand,
  // the 16 sign patterns of the doubled ranks {3, 3, 7, 7} give the doubled
  // sums 0 (1 pattern), 3 (2), 6 (1), 7 (2), 10 (4), 13 (2), 14 (1), 17 (2),
  // 20 (1); the observed 13 has P(>= 13) = 6/16 and P(<= 13) = 12/16, so the
  // two-sided p is 2 * 6/16 = 0.75.
  const auto r = st::wilcoxon_signed_rank(std::vector<double>{1, 1, 2, -2});
  EXPECT_TRUE(r.ties);
  EXPECT_EQ(r.method_used, st::TestMethod::exact);
  EXPECT_EQ(r.r_plus, 6.5);
  EXPECT_DOUBLE_EQ(r.p_value, 0.75);
  // Every prompt moving by the same whole step (a verdict share with one
  // clip per prompt): all ranks tied, and the exact floor 2/2^n holds, where
  // the normal approximation would give 0.0253 at n = 5 (z = -7.5/sqrt(11.25)).
  EXPECT_DOUBLE_EQ(st::wilcoxon_signed_rank(std::vector<double>(5, -1.0)).p_value, 2.0 / 32);
  EXPECT_DOUBLE_EQ(st::wilcoxon_signed_rank(std::vector<double>(8, 1.0)).p_value, 2.0 / 256);
  st::WilcoxonOptions normal;
  normal.method = st::TestMethod::normal;
  EXPECT_NEAR(st::wilcoxon_signed_rank(std::vector<double>(5, -1.0), normal).p_value,
              2 * st::normal_cdf(-7.5 / std::sqrt(11.25)), 1e-15);
}

TEST(Wilcoxon, NullCountsSumToAllSignPatterns) {
  for (int n : {1, 2, 10, 50}) {
    const auto counts = st::signed_rank_null_counts(n);
    uint64_t total = 0;
    for (auto c : counts) total += c;
    EXPECT_EQ(total, uint64_t{1} << n);
    EXPECT_EQ(counts.front(), 1u);
    EXPECT_EQ(counts.back(), 1u);  // all positive: the single pattern with sum n(n+1)/2
  }
}

TEST(Wilcoxon, ZeroRules) {
  // d = 0, 0, 1, -2, 3, 3: ranks of |d| with zeros are 1.5 1.5 3 4 5.5 5.5.
  const std::vector<double> d = {0, 0, 1, -2, 3, 3};
  st::WilcoxonOptions o;
  o.method = st::TestMethod::normal;
  auto wilcox = st::wilcoxon_signed_rank(d, o);  // ranks 1 2 3.5 3.5 on 1,-2,3,3
  EXPECT_EQ(wilcox.n_zero, 2);
  EXPECT_EQ(wilcox.n_ranked, 4);
  EXPECT_EQ(wilcox.r_plus, 8);
  EXPECT_EQ(wilcox.r_minus, 2);
  EXPECT_TRUE(wilcox.ties);
  o.zero_method = st::ZeroMethod::pratt;
  auto pratt = st::wilcoxon_signed_rank(d, o);
  EXPECT_EQ(pratt.n_ranked, 6);
  EXPECT_EQ(pratt.r_plus, 3 + 5.5 + 5.5);
  EXPECT_EQ(pratt.r_minus, 4);
  o.zero_method = st::ZeroMethod::zsplit;
  auto zsplit = st::wilcoxon_signed_rank(d, o);
  EXPECT_EQ(zsplit.r_plus, 14 + 1.5);
  EXPECT_EQ(zsplit.r_minus, 4 + 1.5);
}

TEST(Wilcoxon, AllZeroDifferencesCarryNoEvidence) {
  const std::vector<double> d = {0, 0, 0};
  const auto r = st::wilcoxon_signed_rank(d);
  EXPECT_EQ(r.method_used, st::TestMethod::none);
  EXPECT_EQ(r.p_value, 1.0);
  EXPECT_EQ(st::rank_biserial(r), 0.0);
  EXPECT_EQ(st::wilcoxon_signed_rank(std::vector<double>{}).method_used, st::TestMethod::none);
}

TEST(Holm, HandCheckedAdjustment) {
  // p = 0.01, 0.04, 0.03, 0.005 and one undefined entry, so m = 4.
  // Sorted: 0.005 0.01 0.03 0.04; multipliers 4 3 2 1:
  //   4 * 0.005 = 0.02, 3 * 0.01 = 0.03, 2 * 0.03 = 0.06, 1 * 0.04 = 0.04;
  // running maximum: 0.02, 0.03, 0.06, 0.06.
  // Step-down check at alpha 0.05: 0.005 <= 0.05/4, 0.01 <= 0.05/3, but
  // 0.03 > 0.05/2, so exactly the first two are rejected -- the two adjusted
  // values below 0.05.
  const double nan = std::numeric_limits<double>::quiet_NaN();
  const auto adjusted = st::holm_adjust(std::vector<double>{0.01, 0.04, nan, 0.03, 0.005});
  ASSERT_EQ(adjusted.size(), 5u);
  EXPECT_NEAR(adjusted[0], 0.03, 1e-15);
  EXPECT_NEAR(adjusted[1], 0.06, 1e-15);
  EXPECT_TRUE(std::isnan(adjusted[2]));
  EXPECT_NEAR(adjusted[3], 0.06, 1e-15);
  EXPECT_NEAR(adjusted[4], 0.02, 1e-15);
  // Capped at 1: 2 * 0.5 = 1, then max(1, 1 * 0.6) = 1.
  const auto capped = st::holm_adjust(std::vector<double>{0.6, 0.5});
  EXPECT_EQ(capped[0], 1.0);
  EXPECT_EQ(capped[1], 1.0);
}

TEST(NormalDistribution, KnownQuantilesAndRoundTrip) {
  // Phi^-1(0.975) = 1.959963984540054 (the familiar 1.96; recalled from memory).
  EXPECT_NEAR(st::normal_quantile(0.975), 1.959963984540054, 1e-14);
  EXPECT_NEAR(st::normal_quantile(0.5), 0.0, 1e-15);
  EXPECT_EQ(st::normal_quantile(0.0), -std::numeric_limits<double>::infinity());
  EXPECT_TRUE(std::isnan(st::normal_quantile(1.5)));
  for (double p : {1e-300, 1e-12, 1e-5, 0.025, 0.3, 0.7, 0.99, 1 - 1e-12})
    EXPECT_NEAR(st::normal_cdf(st::normal_quantile(p)) / p, 1.0, 1e-12) << p;
}

TEST(SplitMix64, KnownOutputsAndUnbiasedRange) {
  // First outputs from state 0 (recalled from memory of the reference
  // generator's published test output).
  st::SplitMix64 rng(0);
  EXPECT_EQ(rng.next(), 0xE220A8397B1DCDAFull);
  EXPECT_EQ(rng.next(), 0x6E789E6AA1B965F4ull);
  EXPECT_EQ(rng.next(), 0x06C45D188009454Full);
  // below(6): each face about 1/6 of 60000 draws (sd ~ 91), all in range.
  st::SplitMix64 dice(1);
  int counts[6] = {};
  for (int i = 0; i < 60000; ++i) {
    const auto v = dice.below(6);
    ASSERT_LT(v, 6u);
    ++counts[v];
  }
  for (int c : counts) EXPECT_NEAR(c, 10000, 500);
}

TEST(Bootstrap, FixedSeedReproducesAndIntervalCoversTheMean) {
  const std::vector<double> d = {0.3, -0.1, 0.8, 0.25, 0.5, 0.05, 0.9, -0.2, 0.4, 0.6};
  const auto a = st::bca_interval_of_mean(d);
  const auto b = st::bca_interval_of_mean(d);
  EXPECT_EQ(a.low, b.low);
  EXPECT_EQ(a.high, b.high);
  EXPECT_LT(a.low, st::mean_of(d));
  EXPECT_GT(a.high, st::mean_of(d));
  const auto constant = st::bca_interval_of_mean(std::vector<double>{2, 2, 2});
  EXPECT_TRUE(constant.degenerate);
  EXPECT_EQ(constant.low, 2);
  EXPECT_EQ(constant.high, 2);
  EXPECT_TRUE(std::isnan(st::bca_interval_of_mean(std::vector<double>{1}).low));
}

TEST(Summaries, QuantileMeanMedian) {
  // Hyndman & Fan (1996) definition 7, the percentile intervals' quantile:
  // h = (n-1) q; 0.25 of 1..5 is 2, 0.1 is 1.4.
  const std::vector<double> v = {1, 2, 3, 4, 5};
  EXPECT_DOUBLE_EQ(clipwarden::quantile_of_sorted(v, 0.25), 2.0);
  EXPECT_DOUBLE_EQ(clipwarden::quantile_of_sorted(v, 0.1), 1.4);
  EXPECT_DOUBLE_EQ(st::median_of(std::vector<double>{4, 1, 3, 2}), 2.5);
  EXPECT_DOUBLE_EQ(st::mean_of(v), 3.0);
}
