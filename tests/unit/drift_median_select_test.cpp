// drift::median_near against std::nth_element, the selection it replaces in
// the illumination fit: the same value of rank n/2 for any hint (good, poor,
// none), with ties and with values on the bracket's edges.
#include <gtest/gtest.h>

#include <algorithm>
#include <vector>

#include <opencv2/core.hpp>

#include "analyzer/drift/median_select.h"

namespace framelint::drift {
namespace {

float reference_median(std::vector<float> v) {
  const auto mid = v.begin() + static_cast<std::ptrdiff_t>(v.size() / 2);
  std::nth_element(v.begin(), mid, v.end());
  return *mid;
}

TEST(DriftMedianSelect, SameValueAsNthElementForAnyHint) {
  cv::RNG rng(20261202);
  std::vector<float> bracket;
  for (int trial = 0; trial < 2000; ++trial) {
    const int n = rng.uniform(1, 300);
    std::vector<float> v(static_cast<size_t>(n));
    const bool ties = rng.uniform(0, 2) == 0;  // few distinct values
    for (float& x : v) {
      x = ties ? static_cast<float>(rng.uniform(0, 6)) * 0.01f : std::abs(rng.gaussian(0.02));
    }
    const float expected = reference_median(v);
    const float hints[] = {-1.0f,
                           0.0f,
                           expected,
                           expected * 0.8f,
                           expected * 1.25f,
                           expected * 0.5f,
                           expected * 3.0f,
                           static_cast<float>(rng.uniform(0.0, 0.05))};
    for (const float hint : hints) {
      std::vector<float> copy = v;
      EXPECT_EQ(median_near(copy, hint, bracket), expected) << "n " << n << " hint " << hint;
    }
  }
}

TEST(DriftMedianSelect, EmptyIsZero) {
  std::vector<float> v, bracket;
  EXPECT_EQ(median_near(v, 1.0f, bracket), 0.0f);
}

}  // namespace
}  // namespace framelint::drift
