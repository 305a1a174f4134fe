// Optical flow as colour, in the coding of the Middlebury flow benchmark
// (Baker, Scharstein, Lewis, Roth, Black & Szeliski, "A Database and
// Evaluation Methodology for Optical Flow", IJCV 92(1), 2011, Fig. and
// colour key): hue is the flow's direction on a colour wheel of 55 steps
// (red-yellow 15, yellow-green 6, green-cyan 4, cyan-blue 11, blue-magenta 13,
// magenta-red 6), saturation its length relative to the largest length in
// the field. Zero flow is white.
#pragma once

#include <array>
#include <cstdint>

#include <opencv2/core.hpp>

namespace clipwarden {

// One colour of the wheel, RGB order.
struct Rgb8 {
  uint8_t r = 0, g = 0, b = 0;
  bool operator==(const Rgb8&) const = default;
};

// The 55 wheel colours in order, starting at red.
const std::array<Rgb8, 55>& flow_colour_wheel();

// The colour of one flow vector (u right, v down, image coordinates) whose
// length has been divided by the normalising length: |(u, v)| = 1 is the
// fully saturated hue, 0 is white, beyond 1 the hue is darkened to 75 %.
Rgb8 flow_colour(double u, double v);

// Colours a CV_32FC2 flow field (pixels) as CV_8UC3 BGR, normalised by its
// largest finite length (or by `max_length_px` when > 0). Non-finite vectors
// are black. Returns the normalising length through `used_max_px`.
cv::Mat flow_to_bgr(const cv::Mat& flow, double max_length_px = 0, double* used_max_px = nullptr);

// The colour key: a disk of `size_px` whose centre is zero flow and whose rim
// is flow of the normalising length, on a light grey background, with thin
// axes. CV_8UC3 BGR.
cv::Mat flow_colour_wheel_image(int size_px);

}  // namespace clipwarden
