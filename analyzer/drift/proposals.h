// Where objects come from: regions that move differently from the dominant
// (camera) motion, and textured cells of the static scene. Both work on a
// node grid (one node every `step` pixels) over the previous frame of a pair,
// where the reference appearance is read.
#pragma once

#include <vector>

#include <opencv2/core.hpp>

#include "analyzer/frame/frame_pair.h"

namespace clipwarden::drift {

// Node (col, row) sits at pixel ((col + 0.5) * step, (row + 0.5) * step).
struct NodeGrid {
  int step = 5;
  int cols = 0, rows = 0;
  static NodeGrid for_frame(int width, int height, int step);
  cv::Point2f position(int col, int row) const {
    return {(col + 0.5f) * step, (row + 0.5f) * step};
  }
  cv::Point node_of(cv::Point2f p) const {
    return {static_cast<int>(p.x / step), static_cast<int>(p.y / step)};
  }
};

// Marks nodes (CV_8U, 255) whose forward flow departs from the camera
// homography by more than `threshold_px`, whose flow passes the
// forward-backward check, and whose cell changed once the camera motion is
// compensated (the flow alone marks a halo around a moving object).
// Isolated nodes (fewer than two moving neighbours) are noise and cleared.
struct MotionMasks {
  cv::Mat flow;  // flow departs from the camera (with the halo the flow smears)
  cv::Mat core;  // ... and the picture changed there: the moving object itself
};
void mark_moving_nodes(const FramePair& pair, const NodeGrid& grid, float threshold_px,
                       MotionMasks& masks);

struct RegionProposal {
  std::vector<cv::Point2f> points;  // reference positions in the previous frame
  cv::Rect box;                     // in pixels
  float score = 0;                  // nodes for movers, texture for scene cells
};

// Connected moving regions (cores 8-connected after closing one-node gaps,
// which merges fragments of one object; then grown by a node and with their
// holes filled, within the flow's mask), largest first. Regions touching the
// frame edge are left for later, when they are fully in view (the reference
// is the first full view); regions mostly covered by `covered` nodes are
// already followed; regions over 40% of the frame are a camera-motion misfit.
// Each region keeps only the nodes its own fitted motion explains clearly
// better than the camera's (flow is smeared across motion boundaries).
std::vector<RegionProposal> propose_moving_regions(const FramePair& pair, const MotionMasks& masks,
                                                   const cv::Mat& covered, const NodeGrid& grid,
                                                   int min_nodes);

// Coarse cells of the static scene (3 x 2, or 2 x 3 in portrait), most
// textured first, skipping cells whose nodes are mostly moving or covered and
// cells with mean gradient magnitude below `min_texture`. Points sit on every
// second node.
std::vector<RegionProposal> propose_scene_cells(const cv::Mat& magnitude, const cv::Mat& moving,
                                                const cv::Mat& covered, const NodeGrid& grid,
                                                float min_texture);

}  // namespace clipwarden::drift
