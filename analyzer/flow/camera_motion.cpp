#include "analyzer/flow/camera_motion.h"

#include <algorithm>
#include <vector>

#include <opencv2/calib3d.hpp>

#include "analyzer/frame/flow_samples.h"

namespace clipwarden {

CameraMotion fit_camera_motion(const cv::Mat& flow_backward, const cv::Mat& valid) {
  const FlowSamples samples = sample_flow_grid(flow_backward, valid);
  std::vector<cv::Point2f> prev_pts, cur_pts;
  prev_pts.reserve(samples.at.size());
  cur_pts.reserve(samples.at.size());
  for (size_t i = 0; i < samples.at.size(); ++i) {
    const cv::Point p = samples.at[i];
    cur_pts.emplace_back(static_cast<float>(p.x), static_cast<float>(p.y));
    prev_pts.emplace_back(p.x + samples.flow[i].x, p.y + samples.flow[i].y);
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
