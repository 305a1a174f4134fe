// Everything the per-pair stage computes for frames t-1 and t, in frame t's
// coordinates, shared read-only by every metric.
#pragma once

#include <cstdint>

#include <opencv2/core.hpp>
#include <opencv2/core/matx.hpp>

namespace framelint {

// Per-frame planes prepared once per decoded frame.
struct FramePlanes {
  int64_t index = 0;
  double t_s = 0;
  cv::Mat bgr;        // CV_8UC3, working size
  cv::Mat gray;       // CV_8UC1, for optical flow
  cv::Mat luminance;  // CV_32FC1, relative luminance Y in [0,1] (sRGB -> linear, BT.709)
};

struct FramePair {
  const FramePlanes* prev = nullptr;
  const FramePlanes* cur = nullptr;
  double dt_s = 0;             // cur.t_s - prev.t_s
  cv::Mat flow_backward;       // CV_32FC2: cur pixel x -> prev at x + flow_backward(x)
  cv::Mat flow_forward;        // CV_32FC2: prev pixel y -> cur at y + flow_forward(y)
  cv::Mat valid;               // CV_8UC1: 255 where the forward-backward check passes
  cv::Mat warped_prev_bgr;     // CV_8UC3: prev warped onto cur by flow_backward
  cv::Mat warped_prev_luminance;  // CV_32FC1
  double valid_fraction = 0;   // share of pixels where `valid` is set

  // Dominant (camera) motion from prev to cur: a homography fitted robustly
  // (RANSAC) to flow samples on valid, textured pixels (analyzer/flow/
  // camera_motion.*). Maps prev pixel coordinates to cur coordinates.
  // Identity with camera_inlier_fraction = 0 when no fit was possible.
  cv::Matx33d camera_homography = cv::Matx33d::eye();
  double camera_inlier_fraction = 0;
};

}  // namespace framelint
