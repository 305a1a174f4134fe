// Per-pixel comparisons shared by several metrics.
#pragma once

#include <optional>

#include <opencv2/core.hpp>

namespace clipwarden {

// Mean over pixels where mask != 0 of the squared RGB difference summed over
// the three channels, with 8-bit values scaled to [0,1]. NaN if the mask is
// empty. (The warping error of Lai et al. 2018.)
double masked_squared_rgb_error(const cv::Mat& a_bgr8, const cv::Mat& b_bgr8, const cv::Mat& mask);

// masked_squared_rgb_error of the two images after a Gaussian blur of
// `sigma` px of each (computed as one blur of their difference, in float;
// from 1.5 px on, pyrDown's blur and the rest at half size): a pattern at
// the pixel scale, such as a GIF palette's dithering that is drawn anew in
// every picture, is smoothed away, while a change over a region larger
// than the kernel survives whole.
double smoothed_squared_rgb_error(const cv::Mat& a_bgr8, const cv::Mat& b_bgr8, const cv::Mat& mask,
                                  double sigma);

// The blur of warp_error_smooth, in px at the working size: one pixel of a
// 256 px GIF shown at the default 512 px. Measured 2026-12-05 on the
// corpus (docs/accuracy.md, "A reject that survives a small blur"): at 1 px
// a dithered fireworks clip kept 0.29 of its warping error, at 2 px 0.13,
// camera footage 0.26-0.50.
inline constexpr double kWarpSmoothSigmaPx = 2.0;

// Mean absolute difference of two CV_8UC1 images, in [0,1].
double mean_absolute_difference(const cv::Mat& a8, const cv::Mat& b8);

// True when two CV_8UC1 frames show the same picture: mean absolute
// difference at most 0.001 of the full range (-60 dB), the noise floor
// FFmpeg's freezedetect filter uses by default (its `noise` option) [recalled
// from FFmpeg's filter documentation], and no 32x32 cell differing by more
// than 2/255 on average. The second test keeps a near-still scene in which
// one small thing moves (a person drinking, filmed from afar) from reading
// as a frozen picture: the whole frame's mean hides the moving cell, and a
// stored repeat's compression noise stays far below 2 levels in every
// cell. The freeze metric and the cadence filter share this one test, so a
// repeat the cadence keeps reads as still.
bool same_picture(const cv::Mat& a8, const cv::Mat& b8);

// The gain g when CV_8UC1 frame `cur` shows `picture` scaled by g (a fade:
// an editor multiplies code values), fitted by least squares; nothing when
// what is left after the scaling is more than rounding and compression
// noise (2 codes on average, 5 in any 32x32 cell) or `picture` is nearly
// black.
std::optional<double> dimmed_copy_gain(const cv::Mat& picture, const cv::Mat& cur);

// Mean over mask of (a - b) for CV_32FC1 images; NaN if the mask is empty.
double masked_mean_difference(const cv::Mat& a32, const cv::Mat& b32, const cv::Mat& mask);

}  // namespace clipwarden
