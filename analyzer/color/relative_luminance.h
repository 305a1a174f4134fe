// Relative luminance of sRGB pixels: IEC 61966-2-1 linearisation, then the
// BT.709 / sRGB primaries' Y weights. Used by flicker and flash.
#pragma once

#include <array>

#include <opencv2/core.hpp>

namespace clipwarden {

// The sRGB transfer threshold on the encoded value. IEC 61966-2-1 uses
// 0.04045; WCAG 2.x quotes 0.03928. For 8-bit input both give identical
// results (no 8-bit code lies between them: 10/255 = 0.0392, 11/255 = 0.0431).
inline constexpr double kSrgbThresholdIec = 0.04045;
inline constexpr double kSrgbThresholdWcag = 0.03928;

// Encoded sRGB value in [0,1] -> linear light in [0,1].
double srgb_to_linear(double encoded, double threshold = kSrgbThresholdIec);

// BT.709 luminance weights for linear R, G, B (ITU-R BT.709-6, item 3.3).
inline constexpr double kLumaR = 0.2126, kLumaG = 0.7152, kLumaB = 0.0722;

// The 256-entry table of srgb_to_linear for 8-bit codes.
const std::array<float, 256>& srgb8_to_linear_table();

// BGR 8-bit image -> CV_32FC1 relative luminance Y in [0,1]. `out` is reused.
void relative_luminance(const cv::Mat& bgr8, cv::Mat& out);

}  // namespace clipwarden
