#include "analyzer/metrics/image_error.h"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdlib>
#include <limits>
#include <optional>

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

namespace {

// Mean over the mask's pixels (x step, y step) of the squared difference
// summed over three float channels (8-bit levels), scaled to [0,1]
// channels as masked_squared_rgb_error.
double masked_squared_float_rgb(const cv::Mat& d32, const cv::Mat& mask, int step) {
  double sum = 0;
  uint64_t count = 0;
  for (int y = 0; y < d32.rows; ++y) {
    const float* p = d32.ptr<float>(y);
    const uint8_t* m = mask.ptr<uint8_t>(y * step);
    for (int x = 0; x < d32.cols; ++x, p += 3) {
      if (!m[x * step]) continue;
      sum += static_cast<double>(p[0] * p[0] + p[1] * p[1] + p[2] * p[2]);
      ++count;
    }
  }
  if (count == 0) return std::numeric_limits<double>::quiet_NaN();
  return sum / (255.0 * 255.0) / static_cast<double>(count);
}

}  // namespace

double smoothed_squared_rgb_error(const cv::Mat& a, const cv::Mat& b, const cv::Mat& mask, double sigma) {
  CV_Assert(a.type() == CV_8UC3 && b.type() == CV_8UC3 && mask.type() == CV_8UC1);
  // The blur is linear, so blurring the difference once equals the
  // difference of the two blurred pictures, at half the cost and without
  // rounding either to 8 bits.
  cv::Mat diff, smooth;
  cv::subtract(a, b, diff, cv::noArray(), CV_32F);
  // kPyramidSigma: the [1 4 6 4 1]/16 kernel of pyrDown has variance
  // (4 + 4 + 4 + 4) / 16 = 1 px^2. A blur of sigma >= 1.5 px leaves little
  // above half the sampling rate, so it is taken as pyrDown's blur, then at
  // half size the rest (sigma^2 = 1 + (2 s)^2) and the mean over every
  // second pixel of each row and column: a quarter of the work. Measured
  // on consecutive unwarped frames of six corpus clips at 512 px against
  // the full-size blur: median pair within 1%, worst pair 10% lower
  // (docs/accuracy.md, "The smoothed warping error at half size").
  constexpr double kPyramidSigma = 1.0;
  if (sigma < 1.5) {
    cv::GaussianBlur(diff, smooth, cv::Size(0, 0), sigma);
    return masked_squared_float_rgb(smooth, mask, 1);
  }
  cv::Mat half;
  cv::pyrDown(diff, half);
  cv::GaussianBlur(half, smooth, cv::Size(0, 0), std::sqrt(sigma * sigma - kPyramidSigma * kPyramidSigma) / 2);
  return masked_squared_float_rgb(smooth, mask, 2);
}

double mean_absolute_difference(const cv::Mat& a, const cv::Mat& b) {
  CV_Assert(a.type() == CV_8UC1 && b.type() == CV_8UC1 && a.size() == b.size());
  return cv::norm(a, b, cv::NORM_L1) / (255.0 * static_cast<double>(a.total()));
}

namespace {

// True when a and b differ by at most max_mean on average and by at most
// max_cell_mean on average in every 32x32 cell (fractions of the 8-bit
// range): the whole frame's mean hides one small region that changes, a
// cell's does not.
bool close_everywhere(const cv::Mat& a, const cv::Mat& b, double max_mean, double max_cell_mean) {
  constexpr int kCellPx = 32;
  if (a.size() != b.size() || mean_absolute_difference(a, b) > max_mean) return false;
  cv::Mat diff;
  cv::absdiff(a, b, diff);
  for (int y = 0; y < diff.rows; y += kCellPx)
    for (int x = 0; x < diff.cols; x += kCellPx) {
      const cv::Rect cell(x, y, std::min(kCellPx, diff.cols - x), std::min(kCellPx, diff.rows - y));
      if (cv::mean(diff(cell))[0] / 255.0 > max_cell_mean) return false;
    }
  return true;
}

}  // namespace

bool same_picture(const cv::Mat& a, const cv::Mat& b) {
  return close_everywhere(a, b, 0.001, 2.0 / 255.0);
}

std::optional<double> dimmed_copy_gain(const cv::Mat& picture, const cv::Mat& cur) {
  CV_Assert(picture.type() == CV_8UC1 && cur.type() == CV_8UC1);
  // Below a mean of 8 codes there is too little picture to fit a gain to
  // (a black frame is a dimmed copy of anything).
  constexpr double kMinPictureLevel = 8.0;
  // The plane clip's fade (corpus, frames 180-279 against its held frame
  // 179, 512 px): rounding and H.264 left 0.4-1.1 codes on average and at
  // most 2.9 codes in a 32 px cell once the gain is divided out, where one
  // frame of hand-held motion leaves 1.5 codes on average and 20 in a cell.
  constexpr double kMaxMeanCodes = 2.0, kMaxCellCodes = 5.0;
  if (picture.size() != cur.size() || cv::mean(picture)[0] < kMinPictureLevel) return std::nullopt;
  // Least-squares gain through 0: the fade's multiplier.
  const double gain = cur.dot(picture) / picture.dot(picture);
  cv::Mat scaled;
  picture.convertTo(scaled, CV_8U, gain);
  if (!close_everywhere(cur, scaled, kMaxMeanCodes / 255.0, kMaxCellCodes / 255.0)) return std::nullopt;
  return gain;
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
