// The picture operations the defects are made of. Each works in place on a
// CV_8UC3 BGR frame, optionally weighted by a soft mask, and is a plain
// function so the tests can check it on small synthetic frames.
#pragma once

#include <opencv2/core.hpp>

#include "analyzer/color/ciede2000.h"

namespace clipwarden::inject {

// A weight in [0, 1] over part of a frame: `weight` (CV_32FC1) covers `roi`.
// An empty weight means 1 over the roi.
struct SoftMask {
  cv::Rect roi;
  cv::Mat weight;
};

// The whole frame, weight 1.
SoftMask whole_frame(cv::Size frame);

// An ellipse inscribed in `box` (pixels, may reach outside the frame): weight
// 1 inside, falling linearly to 0 over the outer `feather` share of the
// radius so the edit leaves no hard edge. Clipped to the frame; the roi is
// empty when the box is entirely outside.
SoftMask feathered_ellipse(cv::Size frame, const cv::Rect2d& box, double feather = 0.3);

// Multiplies linear light by `gain` (sRGB decoded per IEC 61966-2-1, scaled,
// re-encoded): the relative luminance of every unclipped pixel, and so the
// frame's mean, changes by exactly that factor. Weighted: 1 + (gain-1) * w.
void scale_linear_light(cv::Mat& bgr, double gain, const SoftMask& mask);

// Blends linear light toward white by `alpha` in [0, 1]: Y' = Y + alpha (1 - Y).
void blend_toward_white(cv::Mat& bgr, double alpha);

// A smooth noise field of `size` with zero mean and unit standard deviation
// whose blobs are about `grain_px` wide: white Gaussian noise on a coarse
// grid, upsampled bicubically. Drawn from `rng`, so it is reproducible.
cv::Mat smooth_noise_field(cv::Size size, double grain_px, cv::RNG& rng);

// Adds sigma * field * weight to all three channels (a luminance noise).
// `field` has the roi's size.
void add_noise(cv::Mat& bgr, const cv::Mat& field, double sigma, const SoftMask& mask);

// Mean CIELAB colour (L*, a*, b*; D65, OpenCV's sRGB conversion) of the
// pixels whose weight is at least 0.5.
cv::Vec3d mean_lab(const cv::Mat& bgr, const SoftMask& mask);

// Adds delta_ab to every pixel's a*, b* (weighted) and converts back.
void shift_chroma(cv::Mat& bgr, cv::Vec2d delta_ab, const SoftMask& mask);

// Magnifies the picture about `centre` by `scale` inside the mask (bilinear);
// the original shows through where the weight falls off.
void scale_about(cv::Mat& bgr, cv::Point2d centre, double scale, const SoftMask& mask);

// Replaces the masked area, by `amount` in [0, 1], with a smooth fill drawn
// from its surroundings (normalized convolution of the unmasked pixels).
void fade_into_surroundings(cv::Mat& bgr, const SoftMask& mask, double amount);

// Translates the whole picture by `shift` pixels; edges are replicated.
void displace(cv::Mat& bgr, cv::Point2d shift);

// A CIELAB colour held as (L*, a*, b*), for color::ciede2000.
inline color::Lab as_lab(const cv::Vec3d& lab) { return {lab[0], lab[1], lab[2]}; }

// The length m such that color::ciede2000(lab, lab + m * (0, direction)) equals
// `target_de` (bisection; direction is a unit vector in the a*b* plane).
double chroma_shift_for_de(const cv::Vec3d& lab, const cv::Vec2d& direction, double target_de);

}  // namespace clipwarden::inject
