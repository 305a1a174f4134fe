// block_luminance_changes finds each block's median and quartiles by
// partial sorting, the quartile searched only on the median's side. Checked
// here against the plain form (each order statistic by nth_element over the
// whole block, as std::nth_element's definition gives it) on random data:
// the results must be bit-identical, including blocks of a few pixels.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstring>
#include <limits>

#include "analyzer/metrics/block_pulses.h"

using namespace clipwarden;

namespace {

float plain_uniform_change(std::vector<float> diffs) {
  const auto at = [&](size_t k) {
    std::nth_element(diffs.begin(), diffs.begin() + k, diffs.end());
    return diffs[k];
  };
  const size_t n = diffs.size();
  const float median = at(n / 2);
  if (median > 0) return at(n / 4) > 0 ? median : 0.0f;
  if (median < 0) return at(n - 1 - n / 4) < 0 ? median : 0.0f;
  return 0.0f;
}

std::vector<float> plain_block_changes(const cv::Mat& cur, const cv::Mat& prev, const cv::Mat& valid,
                                       int cols, int rows, float floor) {
  std::vector<float> out(static_cast<size_t>(cols) * rows, std::numeric_limits<float>::quiet_NaN());
  for (int by = 0; by < rows; ++by)
    for (int bx = 0; bx < cols; ++bx) {
      const int y0 = by * cur.rows / rows, y1 = (by + 1) * cur.rows / rows;
      const int x0 = bx * cur.cols / cols, x1 = (bx + 1) * cur.cols / cols;
      std::vector<float> diffs;
      double level = 0;
      for (int y = y0; y < y1; ++y)
        for (int x = x0; x < x1; ++x)
          if (valid.at<uint8_t>(y, x)) {
            diffs.push_back(cur.at<float>(y, x) - prev.at<float>(y, x));
            level += prev.at<float>(y, x);
          }
      if (diffs.empty() || 2 * diffs.size() < static_cast<size_t>(y1 - y0) * (x1 - x0)) continue;
      const double mean = level / static_cast<double>(diffs.size());
      const float change = plain_uniform_change(diffs);
      out[static_cast<size_t>(by) * cols + bx] =
          floor > 0 ? change / std::max(floor, static_cast<float>(mean)) : change;
    }
  return out;
}

}  // namespace

TEST(BlockChangesKernel, MatchesPlainOrderStatistics) {
  cv::RNG rng(11);
  for (const cv::Size size : {cv::Size(64, 48), cv::Size(37, 23), cv::Size(16, 16), cv::Size(512, 288)}) {
    for (int trial = 0; trial < 6; ++trial) {
      cv::Mat cur(size, CV_32F), prev(size, CV_32F), valid(size, CV_8U);
      rng.fill(prev, cv::RNG::UNIFORM, 0.0, 1.0);
      // Mostly one-way changes with a share going the other way, so every
      // branch (median > 0, < 0, quartile of either sign) is taken.
      cv::Mat change(size, CV_32F);
      rng.fill(change, cv::RNG::NORMAL, (trial - 3) * 0.01, 0.02);
      if (trial == 5) change.setTo(0);  // median 0
      cur = prev + change;
      rng.fill(valid, cv::RNG::UNIFORM, 0, 4);
      valid = valid > 0;  // about 75% valid
      for (const int grid : {16, 8, 3}) {
        const auto fast = block_luminance_changes(cur, prev, valid, grid, grid, 0.02f);
        const auto plain = plain_block_changes(cur, prev, valid, grid, grid, 0.02f);
        ASSERT_EQ(fast.size(), plain.size());
        EXPECT_EQ(0, std::memcmp(fast.data(), plain.data(), fast.size() * sizeof(float)))
            << size << " grid " << grid << " trial " << trial;
      }
    }
  }
}
