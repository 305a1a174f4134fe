#include "analyzer/drift/frame_features.h"

#include <algorithm>
#include <cmath>
#include <iterator>

#include <opencv2/imgproc.hpp>

#include "analyzer/drift/sampling.h"

namespace clipwarden::drift {

void FrameFeatures::compute(int64_t frame_index, const cv::Mat& gray, const cv::Mat& bgr,
                            int window_radius) {
  frame_index_ = frame_index;
  const int side = 2 * window_radius + 1;
  cv::blur(bgr, window_colour_, cv::Size(side, side), cv::Point(-1, -1), cv::BORDER_REPLICATE);
  cv::blur(gray, window_gray_, cv::Size(side, side), cv::Point(-1, -1), cv::BORDER_REPLICATE);
  // sigma 1 smoothing keeps the orientation of fine texture but removes the
  // pixel noise and block edges of compressed video (common practice).
  cv::GaussianBlur(gray, smoothed_, cv::Size(5, 5), 1.0, 1.0, cv::BORDER_REPLICATE);
  // Sobel scaled by 1/8 gives gray levels per pixel. The two gradient
  // planes are only a step towards magnitude and angle, so they are made a
  // band of rows at a time: a band of `smoothed_` is a view into the whole
  // plane, and OpenCV's filters read the rows around a view from the plane
  // itself (the border rule applies only at the plane's own edges), so
  // every value is the one a whole-plane Sobel gives, and the features of a
  // frame in flight hold two planes of floats fewer.
  constexpr int kBandRows = 32;
  magnitude_.create(gray.size(), CV_32FC1);
  angle_.create(gray.size(), CV_32FC1);
  for (int y = 0; y < gray.rows; y += kBandRows) {
    const cv::Range rows(y, std::min(gray.rows, y + kBandRows));
    const cv::Mat band = smoothed_.rowRange(rows);
    cv::Sobel(band, gx_, CV_32F, 1, 0, 3, 1.0 / 8.0, 0, cv::BORDER_REPLICATE);
    cv::Sobel(band, gy_, CV_32F, 0, 1, 3, 1.0 / 8.0, 0, cv::BORDER_REPLICATE);
    cv::Mat magnitude = magnitude_.rowRange(rows), angle = angle_.rowRange(rows);
    cv::cartToPolar(gx_, gy_, magnitude, angle, false);
  }
}

cv::Vec3f FrameFeatures::colour(cv::Point2f p) const { return sample_colour(window_colour_, p); }

float FrameFeatures::gray(cv::Point2f p) const { return sample_gray(window_gray_, p); }

float FrameFeatures::local_histogram(cv::Point2f p, int radius, int stride, float rotation_rad,
                                     OrientationHistogram& out) const {
  const int cx = static_cast<int>(std::lround(p.x));
  const int cy = static_cast<int>(std::lround(p.y));
  const int x0 = std::max(0, cx - radius), x1 = std::min(magnitude_.cols - 1, cx + radius);
  const int y0 = std::max(0, cy - radius), y1 = std::min(magnitude_.rows - 1, cy + radius);
  constexpr float kBinsPerRad = kOrientationBins / (2.0f * static_cast<float>(M_PI));
  const float shift = rotation_rad * kBinsPerRad;
  // Summed in a local array: stores to `out` could alias the planes' rows
  // (both float) and would keep the compiler from holding the sums.
  float bins[kOrientationBins] = {};
  float total = 0;
  for (int y = y0; y <= y1; y += stride) {
    const float* mag = magnitude_.ptr<float>(y);
    const float* ang = angle_.ptr<float>(y);
    for (int x = x0; x <= x1; x += stride) {
      const float m = mag[x];
      if (m <= 0) continue;
      float pos = ang[x] * kBinsPerRad - shift;
      int lo;
      float frac;
      if (pos >= 0 && pos < kOrientationBins) {
        // Already in range (most samples): the wrap below would subtract 0,
        // and the integer part is the floor, so this gives the same values
        // without its division and two floors.
        lo = static_cast<int>(pos);
        frac = pos - static_cast<float>(lo);
      } else {
        pos -= kOrientationBins * std::floor(pos / kOrientationBins);
        lo = static_cast<int>(pos) % kOrientationBins;
        frac = pos - std::floor(pos);
      }
      const int hi = lo + 1 == kOrientationBins ? 0 : lo + 1;
      bins[lo] += m * (1.0f - frac);
      bins[hi] += m * frac;
      total += m;
    }
  }
  std::copy(std::begin(bins), std::end(bins), out.begin());
  return total;
}

float histogram_distance(const float* reference, const float* current, float reference_mass,
                         float current_scale) {
  if (reference_mass <= 0) return 0;
  const float inv_ref = 1.0f / reference_mass;
  const float inv_cur = 1.0f / (reference_mass * std::max(current_scale, 1e-6f));
  float sum = 0;
  for (int i = 0; i < kOrientationBins; ++i) {
    const float d = std::sqrt(reference[i] * inv_ref) - std::sqrt(current[i] * inv_cur);
    sum += d * d;
  }
  return std::sqrt(0.5f * sum);
}

float structure_departure(const OrientationHistogram& reference,
                          const OrientationHistogram& current, float reference_mass,
                          float contrast_gain) {
  if (reference_mass <= 0) return 0;
  float current_mass = 0;
  for (const float bin : current) current_mass += bin;
  // Scaling the current measure by its own energy ratio when that exceeds
  // the contrast gain brings it to the reference's mass: what is left is
  // the orientation mix.
  const float scale = std::max(contrast_gain, current_mass / reference_mass);
  return histogram_distance(reference.data(), current.data(), reference_mass, scale);
}

}  // namespace clipwarden::drift
