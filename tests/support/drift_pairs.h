// Test support for drift: frame pairs built the way the pipeline builds them
// (OpenCV DIS flow both ways, the Sundaram et al. 2010 forward-backward
// check, a RANSAC homography of the camera motion), a driver that runs a
// Metric over frames in pipeline order, and frame sources for real footage.
#pragma once

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include <opencv2/core.hpp>

#include "analyzer/metrics/frame_pair.h"
#include "analyzer/metrics/metric.h"
#include "framelint/report.h"

namespace framelint::test {

FramePlanes make_planes(int64_t index, double t_s, const cv::Mat& bgr);

class TestPairBuilder {
 public:
  TestPairBuilder();
  ~TestPairBuilder();
  void build(const FramePlanes& prev, const FramePlanes& cur, FramePair& pair);

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

// Runs `metric` over the frames like the pipeline: measure_first, then per
// pair measure_pair and observe_in_order, then finish. Frame i is at i / fps.
Report run_metric_on_frames(Metric& metric, const std::vector<cv::Mat>& frames, double fps);

// Decodes the first `max_frames` frames of a video with the ffmpeg CLI,
// scaled to `long_side` (even sizes). Empty when ffmpeg or the file is missing.
std::vector<cv::Mat> read_video_frames(const std::string& path, int max_frames, int long_side);

// opencv-doc sample data folder, or "" when absent.
std::string opencv_sample(const std::string& name);

}  // namespace framelint::test
