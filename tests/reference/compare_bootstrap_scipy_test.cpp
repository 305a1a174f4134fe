// The BCa bootstrap interval of analyzer/compare/paired_stats against
// scipy.stats.bootstrap(method='BCa') (Debian python3-scipy 1.10 through
// /usr/bin/python3), in two ways:
//
// 1. Same resamples: scipy is handed our bootstrap distribution (its
//    `bootstrap_result` argument with n_resamples=0) and computes the BCa
//    bounds from it. This checks the bias correction, the jackknife
//    acceleration and the percentile interpolation with no Monte Carlo noise;
//    the data lie on a 1/1024 grid so every sum is exact on both sides, and
//    the bounds agree to 1e-9 of the interval width.
// 2. Independent resamples: scipy draws its own 10000 resamples with its own
//    generator. Each side is run with 10 seeds and the mean bounds compared.
//    The tolerance is 5 standard errors of that difference, estimated from
//    the spread of the 2 x 10 runs (floor: 0.2% of the width). For scale:
//    with 10000 resamples one run's bound varies by 0.3-3% of the interval
//    width (measured with scipy over 40 seeds for n = 5..200; largest for
//    the far tail of a skewed n = 5 sample).
#include <gtest/gtest.h>

#include <cmath>
#include <random>

#include "analyzer/compare/paired_stats.h"
#include "support/compare_python.h"

namespace {

namespace st = clipwarden::stats;

constexpr int kResamples = 10000;
constexpr int kSeeds = 10;

constexpr const char* kBootstrapScript = R"PY(
import json, sys, warnings
import numpy as np
from scipy import stats
warnings.simplefilter("ignore")
cases = json.load(open(sys.argv[1]))

class GivenDistribution:
    def __init__(self, values):
        self.bootstrap_distribution = np.array(values, dtype=float)

out = []
for c in cases:
    d = np.array(c["d"], dtype=float)
    if "distribution" in c:
        r = stats.bootstrap((d,), np.mean, n_resamples=0, method="BCa",
                            bootstrap_result=GivenDistribution(c["distribution"]))
        out.append([float(r.confidence_interval.low), float(r.confidence_interval.high)])
    else:
        runs = []
        for seed in range(c["seeds"]):
            r = stats.bootstrap((d,), np.mean, n_resamples=c["resamples"], method="BCa",
                                random_state=np.random.default_rng(seed))
            runs.append([float(r.confidence_interval.low), float(r.confidence_interval.high)])
        out.append(runs)
print(json.dumps(out))
)PY";

double uniform(std::mt19937_64& rng) { return static_cast<double>(rng() >> 11) * 0x1.0p-53; }

// Skewed differences (exponential minus a shift), optionally on a 1/1024 grid.
std::vector<double> skewed_sample(std::mt19937_64& rng, int n, bool on_grid) {
  std::vector<double> d(n);
  for (auto& v : d) {
    v = -std::log1p(-uniform(rng)) - 0.7;
    if (on_grid) v = std::round(v * 1024) / 1024;
  }
  return d;
}

double mean(const std::vector<double>& v) { return st::mean_of(v); }
double stddev(const std::vector<double>& v) {
  double m = mean(v), s = 0;
  for (double x : v) s += (x - m) * (x - m);
  return std::sqrt(s / static_cast<double>(v.size() - 1));
}

}  // namespace

TEST(BootstrapAgainstScipy, SameResamplesGiveTheSameBcaBounds) {
  if (auto why = clipwarden::test::scipy_unavailable_reason()) GTEST_SKIP() << *why;
  std::mt19937_64 rng(11);
  std::vector<std::vector<double>> samples;
  for (int n : {5, 8, 20, 60, 200}) samples.push_back(skewed_sample(rng, n, true));
  // Few distinct values, many ties (segment counts look like this).
  samples.push_back({0, 1, 1, 2, 0, 0, 3, 1, 0, 5, 1, 0, 2, 0, 1});

  nlohmann::json input = nlohmann::json::array();
  std::vector<st::ConfidenceInterval> ours;
  for (size_t i = 0; i < samples.size(); ++i) {
    const auto distribution = st::bootstrap_means(samples[i], kResamples, 100 + i);
    ours.push_back(st::bca_interval_of_mean(samples[i], distribution, 0.95));
    input.push_back({{"d", samples[i]}, {"distribution", distribution}});
  }
  std::string error;
  const auto reference = clipwarden::test::run_python_json(kBootstrapScript, input, error);
  ASSERT_FALSE(reference.is_discarded()) << error;
  for (size_t i = 0; i < samples.size(); ++i) {
    const double low = reference[i][0], high = reference[i][1];
    const double width = high - low;
    ASSERT_GT(width, 0);
    EXPECT_NEAR(ours[i].low, low, 1e-9 * width) << "sample " << i;
    EXPECT_NEAR(ours[i].high, high, 1e-9 * width) << "sample " << i;
  }
}

TEST(BootstrapAgainstScipy, IndependentResamplesAgreeWithinMonteCarloError) {
  if (auto why = clipwarden::test::scipy_unavailable_reason()) GTEST_SKIP() << *why;
  std::mt19937_64 rng(12);
  std::vector<std::vector<double>> samples;
  for (int n : {5, 12, 30, 200}) samples.push_back(skewed_sample(rng, n, false));
  std::vector<double> symmetric(40);
  for (auto& v : symmetric) v = uniform(rng) + uniform(rng) - 0.8;
  samples.push_back(symmetric);

  nlohmann::json input = nlohmann::json::array();
  for (const auto& d : samples)
    input.push_back({{"d", d}, {"seeds", kSeeds}, {"resamples", kResamples}});
  std::string error;
  const auto reference = clipwarden::test::run_python_json(kBootstrapScript, input, error);
  ASSERT_FALSE(reference.is_discarded()) << error;

  for (size_t i = 0; i < samples.size(); ++i) {
    std::vector<double> our_low, our_high, scipy_low, scipy_high;
    for (int s = 0; s < kSeeds; ++s) {
      const auto ci = st::bca_interval_of_mean(samples[i], {kResamples, 1000u + s, 0.95});
      our_low.push_back(ci.low);
      our_high.push_back(ci.high);
      scipy_low.push_back(reference[i][s][0]);
      scipy_high.push_back(reference[i][s][1]);
    }
    const double width = mean(scipy_high) - mean(scipy_low);
    ASSERT_GT(width, 0);
    auto check = [&](const char* which, const std::vector<double>& a,
                     const std::vector<double>& b) {
      const double se = std::sqrt((stddev(a) * stddev(a) + stddev(b) * stddev(b)) / kSeeds);
      const double tolerance = std::max(5 * se, 0.002 * width);
      EXPECT_NEAR(mean(a), mean(b), tolerance)
          << which << " bound, n=" << samples[i].size() << " (standard error " << se << ")";
      std::printf("bca n=%zu %s: ours %.5f scipy %.5f, diff %.2f%% of width, tolerance %.2f%%\n",
                  samples[i].size(), which, mean(a), mean(b),
                  100 * std::fabs(mean(a) - mean(b)) / width, 100 * tolerance / width);
    };
    check("low", our_low, scipy_low);
    check("high", our_high, scipy_high);
  }
}
