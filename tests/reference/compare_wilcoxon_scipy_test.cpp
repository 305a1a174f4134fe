// The Wilcoxon signed-rank test of analyzer/compare/paired_stats against
// scipy.stats.wilcoxon (Debian python3-scipy 1.10, run through
// /usr/bin/python3). Samples are drawn here with a fixed seed and handed to
// Python in a temporary JSON file.
//
// Where each side uses which method, and why the settings are chosen:
// - scipy 1.10's method='auto' is exact for n <= 50 unless there are zeros
//   (then it falls back to the normal approximation). With ties it stays
//   "exact" but truncates the tied rank sum, which is not a valid exact test.
//   Ours is exact with ties too, conditional on them (every sign pattern of
//   the observed average ranks): that is checked against
//   scipy.stats.permutation_test on the pairs (d, 0), which enumerates every
//   swap within a pair, i.e. every sign flip of d (n <= 17, 2^17 patterns).
//   Our normal approximation on tied samples is checked against scipy's
//   method='approx'.
// - Our default drops zeros first ("wilcox") and then uses the exact
//   distribution of the remaining ranks when they are untied; that case is
//   compared against scipy on the sample with its zeros removed.
// Tolerances: exact p-values 1e-12 absolute (both are sums of the same
// integer counts divided by 2^n); the normal approximation 1e-12 absolute as
// well (both evaluate the same closed form through erfc; the worst deviation
// seen is printed).
#include <gtest/gtest.h>

#include <cmath>
#include <random>

#include "analyzer/compare/paired_stats.h"
#include "support/compare_python.h"

namespace {

using clipwarden::stats::Alternative;
using clipwarden::stats::TestMethod;
using clipwarden::stats::ZeroMethod;

constexpr const char* kWilcoxonScript = R"PY(
import json, sys, warnings
import numpy as np
from scipy import stats
warnings.simplefilter("ignore")
cases = json.load(open(sys.argv[1]))
out = []
for c in cases:
    d = np.array(c["d"], dtype=float)
    if c["drop_zeros_first"]:
        d = d[d != 0]
    if c["scipy_method"] == "permutation":
        ranks = stats.rankdata(np.abs(d))
        def r_plus(x, y, axis=-1):
            return np.sum(ranks * ((x - y) > 0), axis=axis)
        r = stats.permutation_test((d, np.zeros_like(d)), r_plus, vectorized=True,
                                   permutation_type="samples", n_resamples=np.inf,
                                   alternative=c["alternative"])
        r_plus_obs = float(r.statistic)
        statistic = min(r_plus_obs, float(ranks.sum()) - r_plus_obs) \
            if c["alternative"] == "two-sided" else r_plus_obs
        out.append([statistic, float(r.pvalue)])
        continue
    r = stats.wilcoxon(d, zero_method=c["zero_method"], correction=c["correction"],
                       alternative=c["alternative"], method=c["scipy_method"])
    out.append([float(r.statistic), float(r.pvalue)])
print(json.dumps(out))
)PY";

struct WilcoxonCase {
  std::string label;
  std::vector<double> d;
  ZeroMethod zero_method = ZeroMethod::wilcox;
  Alternative alternative = Alternative::two_sided;
  bool correction = false;
  TestMethod our_method = TestMethod::automatic;
  TestMethod expected_method = TestMethod::exact;
  std::string scipy_method = "auto";
  bool drop_zeros_first = false;
};

const char* name_of(ZeroMethod z) {
  return z == ZeroMethod::wilcox ? "wilcox" : z == ZeroMethod::pratt ? "pratt" : "zsplit";
}
const char* name_of(Alternative a) {
  return a == Alternative::two_sided ? "two-sided" : a == Alternative::less ? "less" : "greater";
}

// Uniform in [0, 1) from the top 53 bits: std::mt19937_64's output sequence
// is fixed by the C++ standard, unlike its distributions.
double uniform(std::mt19937_64& rng) { return static_cast<double>(rng() >> 11) * 0x1.0p-53; }

std::vector<WilcoxonCase> make_cases() {
  std::mt19937_64 rng(20240607);
  std::vector<WilcoxonCase> cases;
  const int sizes[] = {5, 6, 9, 12, 17, 25, 33, 50, 51, 64, 90, 130, 200};
  const Alternative alternatives[] = {Alternative::two_sided, Alternative::less,
                                      Alternative::greater};
  for (int n : sizes) {
    std::vector<double> continuous(n), tied(n), zeros_and_ties(n), zeros_untied(n);
    for (int i = 0; i < n; ++i) {
      continuous[i] = uniform(rng) - 0.35;
      tied[i] = std::floor(uniform(rng) * 9) - 4.5 + (i % 3 == 0 ? 1.0 : 0.0);  // +-0.5 .. +-4.5
      zeros_and_ties[i] = std::floor(uniform(rng) * 7) - 2;                     // -2 .. 4
      zeros_untied[i] = i % 4 == 1 ? 0.0 : uniform(rng) - 0.45;
    }
    zeros_and_ties[0] = 1;  // at least one non-zero difference, as scipy requires
    const bool small = n <= 50;
    for (Alternative alt : alternatives) {
      const std::string suffix = " n=" + std::to_string(n) + " " + name_of(alt);
      cases.push_back({"continuous" + suffix, continuous, ZeroMethod::wilcox, alt, false,
                       TestMethod::automatic, small ? TestMethod::exact : TestMethod::normal});
      cases.push_back({"ties" + suffix, tied, ZeroMethod::wilcox, alt, false, TestMethod::normal,
                       TestMethod::normal, "approx"});
      cases.push_back({"ties, continuity correction" + suffix, tied, ZeroMethod::wilcox, alt, true,
                       TestMethod::normal, TestMethod::normal, "approx"});
      if (n <= 17)
        cases.push_back({"ties, exact given the ties" + suffix, tied, ZeroMethod::wilcox, alt,
                         false, TestMethod::automatic, TestMethod::exact, "permutation"});
      for (ZeroMethod z : {ZeroMethod::wilcox, ZeroMethod::pratt, ZeroMethod::zsplit})
        cases.push_back({std::string("zeros+ties ") + name_of(z) + suffix, zeros_and_ties, z, alt,
                         false, TestMethod::normal, TestMethod::normal, "approx"});
      // Our default rule on untied data with zeros: drop them, then exact
      // (n - n/4 ranked differences, <= 50 for n <= 64).
      const bool exact_after_drop = n - (n + 2) / 4 <= 50;
      cases.push_back({"zeros dropped, untied" + suffix, zeros_untied, ZeroMethod::wilcox, alt,
                       false, TestMethod::automatic,
                       exact_after_drop ? TestMethod::exact : TestMethod::normal, "auto", true});
    }
  }
  return cases;
}

}  // namespace

TEST(WilcoxonAgainstScipy, StatisticAndPValueAgree) {
  if (auto why = clipwarden::test::scipy_unavailable_reason()) GTEST_SKIP() << *why;
  const auto cases = make_cases();
  nlohmann::json input = nlohmann::json::array();
  for (const auto& c : cases)
    input.push_back({{"d", c.d},
                     {"zero_method", name_of(c.zero_method)},
                     {"alternative", name_of(c.alternative)},
                     {"correction", c.correction},
                     {"scipy_method", c.scipy_method},
                     {"drop_zeros_first", c.drop_zeros_first}});
  std::string error;
  const auto reference = clipwarden::test::run_python_json(kWilcoxonScript, input, error);
  ASSERT_FALSE(reference.is_discarded()) << error;
  ASSERT_EQ(reference.size(), cases.size());

  double worst_exact = 0, worst_normal = 0;
  int exact_cases = 0, normal_cases = 0;
  for (size_t i = 0; i < cases.size(); ++i) {
    const auto& c = cases[i];
    clipwarden::stats::WilcoxonOptions options;
    options.zero_method = c.zero_method;
    options.alternative = c.alternative;
    options.continuity_correction = c.correction;
    options.method = c.our_method;
    const auto ours = clipwarden::stats::wilcoxon_signed_rank(c.d, options);
    const double scipy_statistic = reference[i][0].get<double>();
    const double scipy_p = reference[i][1].get<double>();
    ASSERT_EQ(ours.method_used, c.expected_method) << c.label;
    EXPECT_DOUBLE_EQ(ours.statistic, scipy_statistic) << c.label;
    const double deviation = std::fabs(ours.p_value - scipy_p);
    EXPECT_LE(deviation, 1e-12) << c.label << ": ours " << ours.p_value << ", scipy " << scipy_p;
    if (ours.method_used == TestMethod::exact) {
      worst_exact = std::max(worst_exact, deviation);
      ++exact_cases;
    } else {
      worst_normal = std::max(worst_normal, deviation);
      ++normal_cases;
    }
  }
  std::printf(
      "wilcoxon vs scipy: %d exact cases, worst |dp| %.3g; %d normal cases, worst |dp| %.3g\n",
      exact_cases, worst_exact, normal_cases, worst_normal);
  EXPECT_GT(exact_cases, 40);
  EXPECT_GT(normal_cases, 100);
}
