#include "analyzer/flow/camera_motion.h"

#include <algorithm>
#include <vector>

#include <opencv2/calib3d.hpp>

namespace clipwarden {

CameraMotion fit_camera_motion(const cv::Mat& flow_backward, const cv::Mat& valid) {
  // About 600 samples whatever the working size: enough for a stable fit,
  // cheap next to the flow itself.
  const int step = std::max(4, static_cast<int>(std::sqrt(flow_backward.total() / 600.0)));
  std::vector<cv::Point2f> prev_pts, cur_pts;
  prev_pts.reserve(flow_backward.total() / (step * step) + 1);
  cur_pts.reserve(prev_pts.capacity());
  for (int y = step / 2; y < flow_backward.rows; y += step) {
    const cv::Vec2f* b = flow_backward.ptr<cv::Vec2f>(y);
    const uint8_t* v = valid.ptr<uint8_t>(y);
    for (int x = step / 2; x < flow_backward.cols; x += step) {
      if (!v[x]) continue;
      cur_pts.emplace_back(static_cast<float>(x), static_cast<float>(y));
      prev_pts.emplace_back(x + b[x][0], y + b[x][1]);
    }
  }
  CameraMotion out;
  if (prev_pts.size() < 12) return out;
  std::vector<uint8_t> inliers;
  // Reprojection threshold of 1 px at the working size; fixed seedless
  // OpenCV RANSAC is deterministic (its RNG is seeded per call).
  cv::Mat h = cv::findHomography(prev_pts, cur_pts, cv::RANSAC, 1.0, inliers, 500, 0.995);
  if (h.empty()) return out;
  out.homography = cv::Matx33d(h);
  out.inlier_fraction = static_cast<double>(std::count(inliers.begin(), inliers.end(), 1)) / inliers.size();
  return out;
}

}  // namespace clipwarden
