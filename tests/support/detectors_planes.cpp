#include "support/detectors_planes.h"

#include <array>
#include <cmath>

namespace clipwarden::testing {

double wcag_linear(int code8, double threshold) {
  const double c = code8 / 255.0;
  return c <= threshold ? c / 12.92 : std::pow((c + 0.055) / 1.055, 2.4);
}

double wcag_relative_luminance(cv::Vec3b bgr, double threshold) {
  return 0.2126 * wcag_linear(bgr[2], threshold) + 0.7152 * wcag_linear(bgr[1], threshold) +
         0.0722 * wcag_linear(bgr[0], threshold);
}

LinearPlanes linear_planes(const cv::Mat& bgr8, double threshold) {
  std::array<float, 256> table{};
  for (int i = 0; i < 256; ++i) table[i] = static_cast<float>(wcag_linear(i, threshold));
  LinearPlanes out;
  out.luminance.create(bgr8.size(), CV_32FC1);
  out.linear_bgr.create(bgr8.size(), CV_32FC3);
  for (int y = 0; y < bgr8.rows; ++y) {
    const cv::Vec3b* in = bgr8.ptr<cv::Vec3b>(y);
    float* lum = out.luminance.ptr<float>(y);
    cv::Vec3f* lin = out.linear_bgr.ptr<cv::Vec3f>(y);
    for (int x = 0; x < bgr8.cols; ++x) {
      lin[x] = {table[in[x][0]], table[in[x][1]], table[in[x][2]]};
      lum[x] = static_cast<float>(0.2126 * lin[x][2] + 0.7152 * lin[x][1] + 0.0722 * lin[x][0]);
    }
  }
  return out;
}

}  // namespace clipwarden::testing
