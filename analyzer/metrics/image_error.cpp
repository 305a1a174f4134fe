#include "analyzer/metrics/image_error.h"

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <limits>

#include <opencv2/imgproc.hpp>

namespace clipwarden {

double masked_squared_rgb_error(const cv::Mat& a, const cv::Mat& b, const cv::Mat& mask) {
  CV_Assert(a.type() == CV_8UC3 && b.type() == CV_8UC3 && mask.type() == CV_8UC1);
  // Integer sums are exact; a row of up to ~22000 px fits in 32 bits.
  uint64_t sum = 0, count = 0;
  for (int y = 0; y < a.rows; ++y) {
    const uint8_t* pa = a.ptr<uint8_t>(y);
    const uint8_t* pb = b.ptr<uint8_t>(y);
    const uint8_t* m = mask.ptr<uint8_t>(y);
    uint32_t row = 0;
    for (int x = 0; x < a.cols; ++x, pa += 3, pb += 3) {
      if (!m[x]) continue;
      const int d0 = pa[0] - pb[0], d1 = pa[1] - pb[1], d2 = pa[2] - pb[2];
      row += static_cast<uint32_t>(d0 * d0 + d1 * d1 + d2 * d2);
      ++count;
    }
    sum += row;
  }
  if (count == 0) return std::numeric_limits<double>::quiet_NaN();
  return static_cast<double>(sum) / (255.0 * 255.0) / static_cast<double>(count);
}

double smoothed_squared_rgb_error(const cv::Mat& a, const cv::Mat& b, const cv::Mat& mask, double sigma) {
  cv::Mat a_smooth, b_smooth;
  cv::GaussianBlur(a, a_smooth, cv::Size(0, 0), sigma);
  cv::GaussianBlur(b, b_smooth, cv::Size(0, 0), sigma);
  return masked_squared_rgb_error(a_smooth, b_smooth, mask);
}

double mean_absolute_difference(const cv::Mat& a, const cv::Mat& b) {
  CV_Assert(a.type() == CV_8UC1 && b.type() == CV_8UC1 && a.size() == b.size());
  return cv::norm(a, b, cv::NORM_L1) / (255.0 * static_cast<double>(a.total()));
}

bool same_picture(const cv::Mat& a, const cv::Mat& b) {
  constexpr double kRepeatMaxMeanDifference = 0.001;
  constexpr int kCellPx = 32;
  constexpr double kCellMaxMeanDifference = 2.0 / 255.0;
  if (a.size() != b.size() || mean_absolute_difference(a, b) > kRepeatMaxMeanDifference)
    return false;
  cv::Mat diff;
  cv::absdiff(a, b, diff);
  for (int y = 0; y < diff.rows; y += kCellPx)
    for (int x = 0; x < diff.cols; x += kCellPx) {
      const cv::Rect cell(x, y, std::min(kCellPx, diff.cols - x), std::min(kCellPx, diff.rows - y));
      if (cv::mean(diff(cell))[0] / 255.0 > kCellMaxMeanDifference) return false;
    }
  return true;
}

double masked_mean_difference(const cv::Mat& a, const cv::Mat& b, const cv::Mat& mask) {
  CV_Assert(a.type() == CV_32FC1 && b.type() == CV_32FC1 && mask.type() == CV_8UC1);
  double sum = 0;
  uint64_t count = 0;
  for (int y = 0; y < a.rows; ++y) {
    const float* pa = a.ptr<float>(y);
    const float* pb = b.ptr<float>(y);
    const uint8_t* m = mask.ptr<uint8_t>(y);
    float row = 0;
    for (int x = 0; x < a.cols; ++x) {
      if (!m[x]) continue;
      row += pa[x] - pb[x];
      ++count;
    }
    sum += row;
  }
  return count ? sum / static_cast<double>(count) : std::numeric_limits<double>::quiet_NaN();
}

}  // namespace clipwarden
