#include "analyzer/color/relative_luminance.h"

#include <cmath>

namespace clipwarden {

double srgb_to_linear(double encoded, double threshold) {
  // IEC 61966-2-1:1999, section 5.2, inverse of the encoding curve.
  return encoded <= threshold ? encoded / 12.92 : std::pow((encoded + 0.055) / 1.055, 2.4);
}

const std::array<float, 256>& srgb8_to_linear_table() {
  static const std::array<float, 256> table = [] {
    std::array<float, 256> t{};
    for (int i = 0; i < 256; ++i) t[i] = static_cast<float>(srgb_to_linear(i / 255.0));
    return t;
  }();
  return table;
}

void relative_luminance(const cv::Mat& bgr8, cv::Mat& out) {
  CV_Assert(bgr8.type() == CV_8UC3);
  out.create(bgr8.size(), CV_32FC1);
  const auto& lin = srgb8_to_linear_table();
  const float wr = static_cast<float>(kLumaR), wg = static_cast<float>(kLumaG),
              wb = static_cast<float>(kLumaB);
  for (int y = 0; y < bgr8.rows; ++y) {
    const uint8_t* src = bgr8.ptr<uint8_t>(y);
    float* dst = out.ptr<float>(y);
    for (int x = 0; x < bgr8.cols; ++x, src += 3) dst[x] = wb * lin[src[0]] + wg * lin[src[1]] + wr * lin[src[2]];
  }
}

}  // namespace clipwarden
