// The whole picture's acceleration at a frame, read from the flow alone, for
// frames where no camera homography fits (a hand-held close-up whose object
// fills the view, a scene of flat colour with a few things moving): jerk's
// camera path is undefined there, yet a frame displaced as a whole is still
// plain to see.
//
// At frame t, a point x of frame t came from x + b(x) in frame t-1 (the
// backward flow of pair t-1 -> t) and goes to x + f(x) in frame t+1 (the
// forward flow of pair t -> t+1). Its second difference (Sundaram, Brox &
// Keutzer, ECCV 2010, follow points by the forward flow and the backward
// check; here one step either side) is
//   a(x) = f(x) + b(x)                                         [px / frame^2]
// (velocity out f, velocity in -b). A frame displaced by d moves every point
// by d: a(x) = a_scene(x) - 2 d for all x. Things that accelerate on their
// own (a head turning, a hand) change a(x) only where they are. So the
// reading counts only when the picture agrees: four in five sampled points
// within 2 px (or a quarter of its length) of the median vector; then it is the median's
// length over the frame diagonal (what jolt reads: 2 d / diagonal for a
// one-frame displacement), else undefined.
#pragma once

#include <vector>

#include <opencv2/core.hpp>

namespace clipwarden {

// Backward flow of pair t-1 -> t sampled on a grid of frame t, kept until
// pair t -> t+1 arrives.
struct IncomingFlowSamples {
  std::vector<cv::Point> at;          // grid points of frame t
  std::vector<cv::Point2f> backward;  // b(x) there; only points where it passed the check
};

// Samples `flow_backward` (CV_32FC2, frame t's pixels) where `valid` is set,
// on a grid of about 600 points whatever the size.
IncomingFlowSamples sample_incoming_flow(const cv::Mat& flow_backward, const cv::Mat& valid);

// The reading at frame t in frame diagonals per frame^2, NaN when fewer than
// 12 points have both flows or fewer than half agree. `flow_forward` is pair
// t -> t+1's (on frame t's pixels), `valid_next` its check on frame t+1's
// pixels (a forward vector counts when it lands where the backward one
// passed).
double picture_acceleration(const IncomingFlowSamples& incoming, const cv::Mat& flow_forward,
                            const cv::Mat& valid_next);

}  // namespace clipwarden
