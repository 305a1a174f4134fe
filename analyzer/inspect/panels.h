// Pictures of one frame pair (include/clipwarden/inspect.h): computed from a
// FramePair built by PairBuilder, so they show exactly what the metrics saw.
#pragma once

#include <vector>

#include "analyzer/frame/frame_pair.h"
#include "clipwarden/inspect.h"

namespace clipwarden {

// Per-pixel warp error, CV_32FC1: the squared difference of current and
// warped previous summed over B, G, R, channels scaled to [0, 1].
cv::Mat warp_error_map(const cv::Mat& current_bgr, const cv::Mat& warped_previous_bgr);

// The heat map of an error map: the colour position along the scale is
// sqrt(error / kWarpErrorHeatMax), clipped to 1 (the RGB distance relative
// to sqrt(max), so small errors stay visible); pixels where `valid` is 0 are
// drawn as grey hatching (excluded from the warp error).
cv::Mat warp_error_heat_image(const cv::Mat& error_map, const cv::Mat& valid);

// The colour bar's ticks: positions along the scale (0..1) and the squared
// error each stands for.
std::vector<double> warp_error_tick_positions();
double warp_error_at_position(double position);

// All panels of a pair; the pair's prev/cur planes must be set.
FramePanels make_pair_panels(const FramePair& pair);

// The panels of a frame with no predecessor (frame 0): only `current`.
FramePanels make_first_frame_panels(const FramePlanes& frame);

}  // namespace clipwarden
