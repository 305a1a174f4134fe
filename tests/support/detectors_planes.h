// Test helpers for the detectors (flash, jerk, local flicker): frames of
// known colours and their linear-light planes, computed here from the
// published formulas rather than with the library's own conversion.
#pragma once

#include <opencv2/core.hpp>

namespace clipwarden::testing {

// WCAG 2.x "relative luminance" definition: an 8-bit sRGB code linearised
// with the given threshold on the encoded value (WCAG quotes 0.03928,
// IEC 61966-2-1 0.04045), c/12.92 below it, ((c+0.055)/1.055)^2.4 above.
double wcag_linear(int code8, double threshold);

// Relative luminance of an 8-bit sRGB colour: 0.2126 R + 0.7152 G + 0.0722 B
// on the linearised values (WCAG 2.x; BT.709 primaries).
double wcag_relative_luminance(cv::Vec3b bgr, double threshold);

struct LinearPlanes {
  cv::Mat luminance;   // CV_32FC1
  cv::Mat linear_bgr;  // CV_32FC3
};

// Per-pixel linear planes of an 8-bit BGR image.
LinearPlanes linear_planes(const cv::Mat& bgr8, double threshold = 0.04045);

}  // namespace clipwarden::testing
