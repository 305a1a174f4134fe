// Re-anchoring an object's points on its reference look. Chained optical
// flow accumulates error, and coarse-to-fine flow (DIS at its FAST presets
// works at 1/4 resolution) lags on small moving objects: on a textured
// 80 px patch moving 2.5 px per frame we measured 1.9 px per frame, so the
// points slide off the back of the object within seconds. Tracking error
// must not read as drift, so after each flow step the object's tracked
// points are moved together by the small rigid motion (rotation about their
// centroid and translation) that best matches each point's reference gray
// level:
// Gauss-Newton image alignment in the manner of Lucas & Kanade (1981), with
// a free gain and offset so that a brightness or contrast change of the
// object does not pull the alignment, on gray levels so that a hue change
// hardly does, and Huber weights so that points covered by something else
// do not either. Without the rotation term the flow's smoothing across the
// object's edges turned a translating patch by 11 degrees in 44 frames.
// Scale is left to the flow: on walking people (opencv-doc vtest.avi) a free
// scale term shrank the objects by a third within a second, since an
// articulated figure constrains scale weakly and the window around an edge
// point sees changing background.
#pragma once

#include <span>

#include <opencv2/core.hpp>

#include "analyzer/drift/similarity_fit.h"

namespace clipwarden::drift {

struct AlignmentLimits {
  float max_shift_px = 2;  // translation per frame
  float max_rim_px = 1;    // rotation per frame, as movement at the object's rim
  float max_scale_rim_px = 0.5f;  // scale change per frame, likewise
};

// `gray` is the window-mean gray plane (CV_8UC1); `templates` the reference
// gray level of each point in [0,1]. Returns in `correction` the transform
// that moves the points onto their reference look (apply it to these and to
// the object's other points); false when the problem is degenerate (too few
// points, no texture).
bool align_to_reference(const cv::Mat& gray, std::span<const cv::Point2f> positions,
                        std::span<const float> templates, const AlignmentLimits& limits,
                        Similarity& correction);

}  // namespace clipwarden::drift
