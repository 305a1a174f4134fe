// Looking at one frame closely (`clipwarden inspect`, and the panels of the
// HTML report): the frame, its predecessor, the predecessor warped onto it
// by optical flow, where the warp fails (error heat map), the flow itself in
// the Middlebury colour coding, and the occlusion mask. All images are at
// the analysis working size, so they line up with the report's numbers.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include <opencv2/core.hpp>

#include "clipwarden/analysis.h"
#include "clipwarden/error.h"

namespace clipwarden {

// Per-pixel warp error shown by the heat map: the squared difference between
// the current frame and the warped previous frame, summed over R, G, B (each
// in [0, 1], so 0 to 3): the per-pixel term of the warping error of Lai et
// al. (ECCV 2018), whose mean over non-occluded pixels is the warp_error
// metric. The colour scale is fixed so that heat maps of different frames
// and clips compare: 0 (dark) to kWarpErrorHeatMax (bright, and everything
// above it; 0.25 is an RGB distance of 0.5), with colour position
// sqrt(error / max) so that small errors stay visible; the colour bar's
// ticks give the squared error.
inline constexpr double kWarpErrorHeatMax = 0.25;

struct FramePanels {
  int64_t frame_index = 0;
  double t_s = 0;
  bool has_previous = false;  // false for frame 0: only `current` is set

  cv::Mat current;          // CV_8UC3 BGR
  cv::Mat previous;         // CV_8UC3 BGR
  cv::Mat warped_previous;  // previous warped onto current by the backward flow
  cv::Mat warp_error_heat;  // heat map, occluded pixels greyed out (they do not count)
  cv::Mat flow_colour;      // motion previous -> current at each current pixel (the negated
                            // backward flow), Middlebury coding, normalised by max_flow_px
  cv::Mat occlusion_mask;   // CV_8UC1: 255 where the forward-backward check fails

  // Numbers that belong with the pictures.
  double max_flow_px = 0;      // flow length that maps to full saturation
  double mean_warp_error = 0;  // over non-occluded pixels, same units as the heat map
  double occluded_pct = 0;     // share of pixels failing the forward-backward check
};

// The legends, the same for every frame: the heat map's colour bar (with
// its scale written on it) and the flow colour wheel.
cv::Mat warp_error_colour_bar(int width_px, int height_px, bool with_labels);
cv::Mat flow_colour_key(int size_px);

// Decodes `clip_path` up to `frame_index` (streaming; only the previous frame
// is kept) at the settings' working size and builds the panels with the same
// optical flow as the analysis. Errors: the clip cannot be read, or the
// index is past the end (the message says how many frames the clip has).
Expected<FramePanels> inspect_frame(const std::string& clip_path, int64_t frame_index,
                                    const AnalysisSettings& settings);

// Writes the panels (and the two legends) as PNG files named
// <dir>/<stem>-f<index, 6 digits>-<what>.png and returns their paths, in
// the order previous, current, warped-prev, warp-error-heat,
// warp-error-colour-bar, flow-colour, flow-colour-wheel, occlusion-mask. For
// a frame without a previous frame only the current frame is written.
Expected<std::vector<std::string>> write_panel_pngs(const FramePanels& panels,
                                                    const std::string& dir,
                                                    const std::string& stem);

}  // namespace clipwarden
