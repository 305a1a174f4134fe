// The forward-backward consistency check of Sundaram, Brox & Keutzer,
// "Dense point trajectories by GPU-accelerated large displacement optical
// flow", ECCV 2010, eq. (5): a pixel x of frame t with backward flow w
// (t -> t-1) is consistent when the forward flow w^ (t-1 -> t) sampled at
// x + w brings it back:
//   |w + w^|^2 < 0.01 (|w|^2 + |w^|^2) + 0.5
// Pixels failing it (or whose match falls outside frame t-1) are occluded.
#pragma once

#include <opencv2/core.hpp>

namespace clipwarden {

inline constexpr float kOcclusionRelative = 0.01f;
inline constexpr float kOcclusionAbsolute = 0.5f;

// flow_backward: CV_32FC2 (t -> t-1); forward_at_target: the forward flow
// already sampled at x + w (CV_32FC2, same size). Writes `valid` (CV_8UC1,
// 255 = consistent) and returns the share of valid pixels.
double forward_backward_check(const cv::Mat& flow_backward, const cv::Mat& forward_at_target,
                              cv::Mat& valid);

// The same check for a band of rows: forward_at_target holds rows
// [first_row, first_row + its rows) of the whole-frame one; those rows of
// `valid` (already CV_8UC1 of the frame's size) are written. Returns how
// many of them pass.
size_t forward_backward_rows(const cv::Mat& flow_backward, const cv::Mat& forward_at_target,
                             int first_row, cv::Mat& valid);

// Absolute sampling map x + flow(x) for cv::remap (CV_32FC2). With
// first_row, `flow` is a band of rows of a larger flow starting there, and
// the map holds that band's coordinates in the whole frame.
void flow_to_map(const cv::Mat& flow, cv::Mat& map, int first_row = 0);

}  // namespace clipwarden
