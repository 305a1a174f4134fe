// Per-frame planes for appearance comparisons at tracked points: the colour
// averaged over a small window (a point that is off by a pixel on fine
// texture still reads the same local colour), and the magnitude and signed
// orientation of the image gradient after light smoothing, from which local
// magnitude-weighted orientation histograms are read (soft-binned, as in
// HOG: Dalal & Triggs, CVPR 2005).
#pragma once

#include <array>
#include <cstdint>
#include <vector>

#include <opencv2/core.hpp>

namespace clipwarden::drift {

inline constexpr int kOrientationBins = 12;  // 30 degrees each, signed (0-360)
using OrientationHistogram = std::array<float, kOrientationBins>;

class FrameFeatures {
 public:
  // Recomputes the planes for a frame (gray CV_8UC1, bgr CV_8UC3) with
  // windows of (2 * radius + 1) pixels; buffers are reused.
  void compute(int64_t frame_index, const cv::Mat& gray, const cv::Mat& bgr, int window_radius);

  int64_t frame_index() const { return frame_index_; }
  const cv::Mat& magnitude() const { return magnitude_; }
  const cv::Mat& angle() const { return angle_; }  // gradient orientation, radians in [0, 2 pi)
  const cv::Mat& window_gray() const { return window_gray_; }

  // Window-mean colour at `p` (bilinear between window centres), encoded
  // sRGB in [0,1], B, G, R; and the window-mean gray level in [0,1].
  cv::Vec3f colour(cv::Point2f p) const;
  float gray(cv::Point2f p) const;

  // Histogram over the (2r+1)^2 window centred on `p`, read every `stride`
  // pixels, with orientations measured relative to `rotation_rad` (the
  // object's own rotation), so a turning object keeps its histogram. Returns
  // the total magnitude.
  float local_histogram(cv::Point2f p, int radius, int stride, float rotation_rad,
                        OrientationHistogram& out) const;

 private:
  int64_t frame_index_ = -1;
  cv::Mat smoothed_, magnitude_, angle_, window_colour_, window_gray_;
  cv::Mat gx_, gy_;  // one band of rows of the gradient (compute())
};

// Generalised Hellinger distance between two non-negative measures, after
// dividing both by `reference_mass`: 0 when equal, growing with a change of
// orientation mix or of total gradient energy (a blurred or flattened
// surface). sqrt(0.5 * sum (sqrt(p_i) - sqrt(q_i))^2).
float histogram_distance(const float* reference, const float* current, float reference_mass,
                         float current_scale);

// Drift's structure aspect: `histogram_distance` with the current measure
// (under the global `contrast_gain`) never holding more gradient energy than
// the reference. It counts texture lost (blur, flattening) and texture
// rearranged (another orientation mix), not energy gained: a faint surface
// gains energy whenever a strong edge comes near its windows, and on real
// footage that edge belonged to something else (the dark base of a tumbler
// over faint pen marks in hand-held opencv-doc cup.mp4, 2.7 times the
// reference energy; a small walker's outline against pool tiles, 2.85
// times), read as structure 0.73-0.76 with the same orientation mix
// counting for only 0.39-0.42 (docs/drift.md).
float structure_departure(const OrientationHistogram& reference,
                          const OrientationHistogram& current, float reference_mass,
                          float contrast_gain);

}  // namespace clipwarden::drift
