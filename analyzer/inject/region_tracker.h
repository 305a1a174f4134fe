// Where a region defect draws: a box that follows the picture's content by
// optical flow between consecutive clean frames, and the automatic choice
// of that box when the spec names no region.
#pragma once

#include <opencv2/core.hpp>
#include <opencv2/video/tracking.hpp>

namespace clipwarden::inject {

// Optical flow (OpenCV DIS) from one clean frame to the next, computed on a
// copy scaled to at most kFlowLongSide pixels, only when asked for.
class MotionField {
 public:
  static constexpr int kFlowLongSide = 320;

  // The next pair of clean frames; the flow is computed on first use.
  void set_pair(const cv::Mat& prev_bgr, const cv::Mat& cur_bgr);
  bool has_pair() const { return !prev_.empty(); }

  // Median displacement, in full-size pixels, of the content of `box` from
  // the previous frame to the current one (its inner 60%, so the box's own
  // edges and the surroundings weigh little).
  cv::Point2d median_motion(const cv::Rect2d& box);

  // |flow - median flow of the frame| per pixel at flow size: what moves
  // apart from the camera. Empty when there is no pair.
  cv::Mat residual_motion();
  double scale() const { return scale_; }  // flow size / full size

 private:
  void compute();
  cv::Ptr<cv::DISOpticalFlow> dis_;
  cv::Mat prev_, cur_;  // full size, shared with the caller
  cv::Mat flow_;        // CV_32FC2 at flow size
  double scale_ = 1;
  bool computed_ = false;
};

// Chooses a box of `box_size` pixels. With prefer_motion, the candidate
// whose content moves most apart from the camera (ties to texture); without,
// a candidate drawn from `rng`. Candidates lie on a 5x5 grid over the frame.
cv::Rect2d choose_region(const cv::Mat& bgr, MotionField& motion, cv::Size2d box_size, bool prefer_motion,
                         cv::RNG& rng);

}  // namespace clipwarden::inject
