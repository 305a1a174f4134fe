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

#include <opencv2/core.hpp>

#include "analyzer/frame/flow_samples.h"

namespace clipwarden {

// The reading at frame t in frame diagonals per frame^2, NaN when fewer
// than 12 points have both flows or fewer than four in five agree.
// `incoming` is the backward flow of pair t-1 -> t sampled on frame t
// (sample_flow_grid), kept until pair t -> t+1 arrives; `flow_forward` is pair
// t -> t+1's (on frame t's pixels), `valid_next` its check on frame t+1's
// pixels (a forward vector counts when it lands where the backward one
// passed).
double picture_acceleration(const FlowSamples& incoming, const cv::Mat& flow_forward,
                            const cv::Mat& valid_next);

}  // namespace clipwarden
