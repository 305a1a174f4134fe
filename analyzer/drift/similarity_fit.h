// A similarity transform (rotation, uniform scale, translation) fitted
// robustly to point correspondences: RANSAC (Fischler & Bolles 1981) over
// two-point minimal samples, then least squares on the inliers (Umeyama 1991
// without reflection). Used for an object's own motion from its reference
// points to their current positions.
#pragma once

#include <cstdint>
#include <span>
#include <vector>

#include <opencv2/core.hpp>

namespace clipwarden::drift {

struct Similarity {
  // x' = [a -b; b a] x + t
  double a = 1, b = 0, tx = 0, ty = 0;

  cv::Point2f apply(cv::Point2f p) const {
    return {static_cast<float>(a * p.x - b * p.y + tx), static_cast<float>(b * p.x + a * p.y + ty)};
  }
  double scale() const;
  double rotation_rad() const;
};

// Fits dst ~ S(src). Returns false with fewer than 2 points. `inliers`
// receives one flag per point. Deterministic for a given seed.
bool fit_similarity(std::span<const cv::Point2f> src, std::span<const cv::Point2f> dst,
                    float inlier_px, uint32_t seed, Similarity& fit, std::vector<uint8_t>& inliers,
                    int iterations = 48);

}  // namespace clipwarden::drift
