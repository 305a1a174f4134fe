// Exact binomial methods of analyzer/compare/binomial_tests against values
// worked by hand from their definitions; scipy's binomtest is the reference
// in tests/reference/compare_binomial_scipy_test.cpp.
#include <gtest/gtest.h>

#include <cmath>

#include "analyzer/compare/binomial_tests.h"

namespace st = clipwarden::stats;

TEST(SignTest, EveryPromptTheSameWay) {
  // 8 of 8 prompts worse: P(X <= 0) = 1/256 under p = 1/2, two-sided 2/256.
  EXPECT_NEAR(st::binomial_test_half(0, 8), 2.0 / 256, 1e-15);
  EXPECT_NEAR(st::binomial_test_half(8, 8), 2.0 / 256, 1e-15);
  // 1 of 8: P(X <= 1) = (1 + 8) / 256, doubled.
  EXPECT_NEAR(st::binomial_test_half(1, 8), 18.0 / 256, 1e-15);
  // 4 of 8 is the centre: no outcome is more likely, p = 1.
  EXPECT_EQ(st::binomial_test_half(4, 8), 1.0);
  // 2 of 5: P(X <= 2) = (1 + 5 + 10) / 32 = 0.5, doubled and capped at 1.
  EXPECT_EQ(st::binomial_test_half(2, 5), 1.0);
  // No prompt changed: no evidence.
  EXPECT_EQ(st::binomial_test_half(0, 0), 1.0);
}

TEST(SignTest, SmallestPossibleP) {
  EXPECT_EQ(st::smallest_two_sided_p(8), 2.0 / 256);
  EXPECT_EQ(st::smallest_two_sided_p(5), 0.0625);
  EXPECT_EQ(st::smallest_two_sided_p(1), 1.0);
  EXPECT_EQ(st::smallest_two_sided_p(0), 1.0);
  // It is the sign test of n out of n.
  for (int n = 1; n <= 30; ++n)
    EXPECT_NEAR(st::smallest_two_sided_p(n), st::binomial_test_half(n, n), 1e-15) << n;
}

TEST(ClopperPearson, ClosedFormsAtTheEnds) {
  // k = 0: the upper end solves (1 - p)^n = (1 - level) / 2, so
  // p = 1 - 0.025^(1/n) at 95% (the exact form behind the "rule of three").
  for (int n : {1, 8, 30, 800}) {
    const auto ci = st::clopper_pearson(0, n, 0.95);
    EXPECT_EQ(ci.low, 0.0);
    EXPECT_NEAR(ci.high, 1 - std::pow(0.025, 1.0 / n), 1e-12) << n;
    const auto all = st::clopper_pearson(n, n, 0.95);  // mirror image
    EXPECT_NEAR(all.low, std::pow(0.025, 1.0 / n), 1e-12) << n;
    EXPECT_EQ(all.high, 1.0);
  }
  // k = 1 of n = 2: the lower end solves 1 - (1 - p)^2 = 0.025, i.e.
  // p = 1 - sqrt(0.975); the upper end mirrors it.
  const auto half = st::clopper_pearson(1, 2, 0.95);
  EXPECT_NEAR(half.low, 1 - std::sqrt(0.975), 1e-12);
  EXPECT_NEAR(half.high, std::sqrt(0.975), 1e-12);
  EXPECT_TRUE(std::isnan(st::clopper_pearson(0, 0, 0.95).low));
}

TEST(Binomial, TailsAddUpAndMatchTheClosedForm) {
  // P(X = 3) for n = 10, p = 0.3: C(10,3) 0.3^3 0.7^7 = 120 * 0.027 * 0.0823543.
  EXPECT_NEAR(std::exp(st::binomial_log_pmf(3, 10, 0.3)), 120 * 0.027 * 0.0823543, 1e-14);
  for (int k = 0; k <= 10; ++k)
    EXPECT_NEAR(st::binomial_cdf(k, 10, 0.3) + st::binomial_upper_tail(k + 1, 10, 0.3), 1.0, 1e-14);
  EXPECT_EQ(st::binomial_cdf(0, 5, 0.0), 1.0);
  EXPECT_EQ(st::binomial_upper_tail(5, 5, 1.0), 1.0);
}
