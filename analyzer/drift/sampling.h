// Bilinear sampling of flow fields and colour planes at sub-pixel points,
// with coordinates clamped to the frame (edge pixels repeat).
#pragma once

#include <algorithm>
#include <cmath>

#include <opencv2/core.hpp>

namespace clipwarden::drift {

struct BilinearTap {
  int x0, y0, x1, y1;
  float fx, fy;
};

inline BilinearTap bilinear_tap(const cv::Mat& m, cv::Point2f p) {
  const float x = std::clamp(p.x, 0.0f, static_cast<float>(m.cols - 1));
  const float y = std::clamp(p.y, 0.0f, static_cast<float>(m.rows - 1));
  BilinearTap t;
  t.x0 = static_cast<int>(x), t.y0 = static_cast<int>(y);
  t.x1 = std::min(t.x0 + 1, m.cols - 1), t.y1 = std::min(t.y0 + 1, m.rows - 1);
  t.fx = x - t.x0, t.fy = y - t.y0;
  return t;
}

// CV_32FC2 flow at p. Plain float arithmetic (the same operations, in the
// same order, as the cv::Vec2f expression it replaces, so the same values):
// cheaper on the serial path, where every followed point samples the flow.
inline cv::Vec2f sample_flow(const cv::Mat& flow, cv::Point2f p) {
  const BilinearTap t = bilinear_tap(flow, p);
  const float* top = flow.ptr<float>(t.y0);
  const float* bottom = flow.ptr<float>(t.y1);
  const float wx = 1 - t.fx, wy = 1 - t.fy;
  cv::Vec2f out;
  for (int k = 0; k < 2; ++k) {
    out[k] = (top[2 * t.x0 + k] * wx + top[2 * t.x1 + k] * t.fx) * wy +
             (bottom[2 * t.x0 + k] * wx + bottom[2 * t.x1 + k] * t.fx) * t.fy;
  }
  return out;
}

// CV_8UC3 colour at p as encoded values in [0,1] (B, G, R order).
inline cv::Vec3f sample_colour(const cv::Mat& bgr, cv::Point2f p) {
  const BilinearTap t = bilinear_tap(bgr, p);
  const cv::Vec3b& a = bgr.at<cv::Vec3b>(t.y0, t.x0);
  const cv::Vec3b& b = bgr.at<cv::Vec3b>(t.y0, t.x1);
  const cv::Vec3b& c = bgr.at<cv::Vec3b>(t.y1, t.x0);
  const cv::Vec3b& d = bgr.at<cv::Vec3b>(t.y1, t.x1);
  const float wa = (1 - t.fx) * (1 - t.fy), wb = t.fx * (1 - t.fy);
  const float wc = (1 - t.fx) * t.fy, wd = t.fx * t.fy;
  cv::Vec3f out;
  for (int k = 0; k < 3; ++k) out[k] = (wa * a[k] + wb * b[k] + wc * c[k] + wd * d[k]) / 255.0f;
  return out;
}

// CV_8UC1 value at p in [0,1].
inline float sample_gray(const cv::Mat& gray, cv::Point2f p) {
  const BilinearTap t = bilinear_tap(gray, p);
  const float top = gray.at<uint8_t>(t.y0, t.x0) * (1 - t.fx) + gray.at<uint8_t>(t.y0, t.x1) * t.fx;
  const float bottom = gray.at<uint8_t>(t.y1, t.x0) * (1 - t.fx) + gray.at<uint8_t>(t.y1, t.x1) * t.fx;
  return (top * (1 - t.fy) + bottom * t.fy) / 255.0f;
}

// CV_32FC1 value at p (nearest pixel; for slowly varying planes).
inline float sample_gray_gradient(const cv::Mat& plane, cv::Point2f p) {
  const int x = std::clamp(static_cast<int>(std::lround(p.x)), 0, plane.cols - 1);
  const int y = std::clamp(static_cast<int>(std::lround(p.y)), 0, plane.rows - 1);
  return plane.at<float>(y, x);
}

inline bool inside(const cv::Mat& m, cv::Point2f p) {
  return p.x >= 0 && p.y >= 0 && p.x <= m.cols - 1 && p.y <= m.rows - 1;
}

inline cv::Point2f apply_homography(const cv::Matx33d& h, cv::Point2f p) {
  const double w = h(2, 0) * p.x + h(2, 1) * p.y + h(2, 2);
  if (std::abs(w) < 1e-12) return p;
  return {static_cast<float>((h(0, 0) * p.x + h(0, 1) * p.y + h(0, 2)) / w),
          static_cast<float>((h(1, 0) * p.x + h(1, 1) * p.y + h(1, 2)) / w)};
}

}  // namespace clipwarden::drift
