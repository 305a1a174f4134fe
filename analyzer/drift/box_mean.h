// Mean over a (2r+1) x (2r+1) window of an 8-bit plane (1 or 3 channels),
// edge pixels repeated, rounded to the nearest integer: exactly the values
// of cv::blur(src, dst, {2r+1, 2r+1}, {-1,-1}, cv::BORDER_REPLICATE) for
// 8-bit planes (tests/unit/drift_box_mean_test.cpp), in about a third less
// time. The window sums are exact integers and a mean k/N with N odd is
// never halfway between two integers, so any exact rounding agrees.
#pragma once

#include <cstdint>
#include <vector>

#include <opencv2/core.hpp>

namespace framelint::drift {

// `scratch` is reused between calls (no allocation in the steady state).
void box_mean(const cv::Mat& src, int radius, cv::Mat& dst, std::vector<uint16_t>& scratch);

}  // namespace framelint::drift
