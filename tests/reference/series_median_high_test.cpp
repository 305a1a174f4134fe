// upper_median_in_place (analyzer/frame/series_math.h) against Python's
// statistics.median_high (the standard library of Debian's /usr/bin/python3):
// the middle value for an odd count, the larger of the two middle ones for
// an even count. Series drawn here with a fixed seed: odd and even lengths,
// ties, integers and floats.
#include <gtest/gtest.h>

#include <cstdint>
#include <random>
#include <vector>

#include "analyzer/frame/series_math.h"
#include "support/compare_python.h"

namespace {

constexpr const char* kMedianHighScript = R"PY(
import json, statistics, sys
print(json.dumps([statistics.median_high(v) for v in json.load(open(sys.argv[1]))]))
)PY";

}  // namespace

TEST(UpperMedianAgainstPython, EqualsStatisticsMedianHigh) {
  if (auto why = clipwarden::test::scipy_unavailable_reason()) GTEST_SKIP() << *why;
  std::mt19937_64 rng(20261205);
  std::vector<std::vector<int64_t>> series;
  for (int n : {1, 2, 3, 4, 7, 10, 25, 64}) {
    std::vector<int64_t> v(n);
    for (auto& x : v) x = static_cast<int64_t>(rng() % 9);  // few distinct values: ties
    series.push_back(v);
  }
  std::string error;
  const nlohmann::json expected =
      clipwarden::test::run_python_json(kMedianHighScript, series, error);
  ASSERT_FALSE(expected.is_discarded()) << error;
  ASSERT_EQ(expected.size(), series.size());
  for (size_t k = 0; k < series.size(); ++k) {
    std::vector<int64_t> ints = series[k];
    std::vector<float> floats(ints.begin(), ints.end());
    for (auto& f : floats) f = f * 0.25f + 0.1f;  // the same order, as floats
    EXPECT_EQ(clipwarden::upper_median_in_place(ints), expected[k].get<int64_t>()) << "series " << k;
    EXPECT_FLOAT_EQ(clipwarden::upper_median_in_place(floats),
                    expected[k].get<int64_t>() * 0.25f + 0.1f)
        << "series " << k;
  }
}

// Worked example of the Python documentation for median_high (recalled
// from memory): median_high([1, 3, 5, 7]) == 5.
TEST(UpperMedian, EvenCountTakesTheLargerMiddleValue) {
  std::vector<double> v{7, 1, 5, 3};
  EXPECT_EQ(clipwarden::upper_median_in_place(v), 5);
}
