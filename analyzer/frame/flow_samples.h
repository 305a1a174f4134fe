// A flow field read at a sparse grid of its checked pixels: about 600
// points whatever the working size, enough for a robust fit or median and
// cheap next to the flow itself. The camera fit (analyzer/flow/
// camera_motion.cpp) and jerk's picture acceleration (analyzer/metrics/
// picture_acceleration.cpp) read the same points.
#pragma once

#include <vector>

#include <opencv2/core.hpp>

namespace clipwarden {

struct FlowSamples {
  std::vector<cv::Point> at;          // grid points, row by row
  std::vector<cv::Point2f> flow;      // the flow there
};

// `flow` (CV_32FC2) at the grid points where `valid` (CV_8UC1, same size)
// is set; empty when either is empty or their sizes differ.
FlowSamples sample_flow_grid(const cv::Mat& flow, const cv::Mat& valid);

}  // namespace clipwarden
