// Pictures of one frame pair (include/framelint/inspect.h): computed from a
// FramePair built by PairBuilder, so they show exactly what the metrics saw.
#pragma once

#include "analyzer/metrics/frame_pair.h"
#include "framelint/inspect.h"

namespace framelint {

// Per-pixel warp error, CV_32FC1: mean over B, G, R of the squared
// difference of current and warped previous, channels scaled to [0, 1].
cv::Mat warp_error_map(const cv::Mat& current_bgr, const cv::Mat& warped_previous_bgr);

// The heat map of an error map: colour scale 0..kWarpErrorHeatMax, pixels
// where `valid` is 0 drawn as grey hatching (excluded from the warp error).
cv::Mat warp_error_heat_image(const cv::Mat& error_map, const cv::Mat& valid);

// All panels of a pair; the pair's prev/cur planes must be set.
FramePanels make_pair_panels(const FramePair& pair);

// The panels of a frame with no predecessor (frame 0): only `current`.
FramePanels make_first_frame_panels(const FramePlanes& frame);

}  // namespace framelint
