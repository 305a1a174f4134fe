// The Theil-Sen line of analyzer/frame/series_math against
// scipy.stats.theilslopes (Debian python3-scipy 1.10, run through
// /usr/bin/python3) with method='joint', whose intercept is the median of
// y - slope * x as ours is (the default 'separate' takes median(y) -
// slope * median(x) instead). Series are drawn here with a fixed seed: a
// trend with noise, with a few points thrown far off (the line must not
// follow them), with ties, with undefined values (left out on our side,
// dropped before scipy with their x kept), and very short ones.
#include <gtest/gtest.h>

#include <cmath>
#include <limits>
#include <random>

#include "analyzer/frame/series_math.h"
#include "support/compare_python.h"

namespace {

constexpr const char* kTheilSenScript = R"PY(
import json, sys
import numpy as np
from scipy import stats
out = []
for y in json.load(open(sys.argv[1])):
    x = np.array([i for i, v in enumerate(y) if v is not None], dtype=float)
    v = np.array([v for v in y if v is not None], dtype=float)
    r = stats.theilslopes(v, x, method="joint")
    out.append([float(r[0]), float(r[1])])
print(json.dumps(out))
)PY";

double uniform(std::mt19937_64& rng) { return static_cast<double>(rng() >> 11) * 0x1.0p-53; }

std::vector<std::vector<double>> make_series() {
  std::mt19937_64 rng(20261205);
  std::vector<std::vector<double>> all;
  for (int n : {2, 3, 5, 9, 13, 16, 31}) {
    std::vector<double> trend(n), outliers(n), ties(n), gaps(n);
    const double slope = uniform(rng) * 0.02 - 0.01, level = 0.1 + uniform(rng) * 0.3;
    for (int i = 0; i < n; ++i) {
      trend[i] = level + slope * i + 0.003 * (uniform(rng) - 0.5);
      outliers[i] = trend[i] + (i % 4 == 1 ? 0.2 : 0.0);
      ties[i] = std::round(trend[i] * 50) / 50;
      gaps[i] = i % 3 == 2 ? std::numeric_limits<double>::quiet_NaN() : trend[i];
    }
    all.insert(all.end(), {trend, outliers, ties});
    if (n >= 5) all.push_back(gaps);
  }
  return all;
}

}  // namespace

TEST(TheilSenAgainstScipy, SlopeAndInterceptAgree) {
  if (auto why = clipwarden::test::scipy_unavailable_reason()) GTEST_SKIP() << *why;
  const auto series = make_series();
  nlohmann::json input = nlohmann::json::array();
  for (const auto& y : series) {
    nlohmann::json row = nlohmann::json::array();
    for (double v : y) row.push_back(std::isnan(v) ? nlohmann::json() : nlohmann::json(v));
    input.push_back(row);
  }
  std::string error;
  const nlohmann::json expected = clipwarden::test::run_python_json(kTheilSenScript, input, error);
  ASSERT_FALSE(expected.is_discarded()) << error;
  ASSERT_EQ(expected.size(), series.size());
  for (size_t k = 0; k < series.size(); ++k) {
    const clipwarden::Line line = clipwarden::theil_sen_line(series[k]);
    // Both take medians of the same pairwise slopes and offsets: equal up
    // to rounding.
    EXPECT_NEAR(line.slope, expected[k][0].get<double>(), 1e-12) << "series " << k;
    EXPECT_NEAR(line.intercept, expected[k][1].get<double>(), 1e-12) << "series " << k;
  }
}

TEST(TheilSen, FewerThanTwoValuesHaveNoLine) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  EXPECT_TRUE(std::isnan(clipwarden::theil_sen_line(std::vector<double>{0.3}).slope));
  EXPECT_TRUE(std::isnan(clipwarden::theil_sen_line(std::vector<double>{nan, 0.3, nan}).intercept));
}
