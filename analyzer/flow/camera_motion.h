// The dominant (camera) motion of a frame pair: a homography fitted by
// RANSAC to flow correspondences sampled on a grid of consistent pixels.
#pragma once

#include <opencv2/core.hpp>

namespace clipwarden {

struct CameraMotion {
  cv::Matx33d homography = cv::Matx33d::eye();  // prev -> cur pixel coordinates
  double inlier_fraction = 0;                   // 0 when no fit was possible
};

// flow_backward maps cur pixels to prev; valid marks consistent pixels.
CameraMotion fit_camera_motion(const cv::Mat& flow_backward, const cv::Mat& valid);

}  // namespace clipwarden
