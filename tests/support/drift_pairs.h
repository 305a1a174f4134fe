// Test support for drift: runs the drift metric over frames made in memory
// with the pipeline's own pair builder (DIS flow both ways, the Sundaram et
// al. 2010 forward-backward check, the RANSAC camera homography), in the
// order the pipeline uses; and paths to opencv-doc sample data.
#pragma once

#include <string>
#include <vector>

#include <opencv2/core.hpp>

#include "clipwarden/analysis.h"
#include "clipwarden/report.h"

namespace clipwarden::test {

// measure_first, then per pair measure_pair and observe_in_order, then
// finish, like analyze_source; frame i is at i / fps. The report holds the
// drift columns and objects only (no segmenter, no other metric).
Report run_drift_on_frames(const std::vector<cv::Mat>& frames, double fps,
                           const AnalysisSettings& settings = {});

// opencv-doc sample data file, or "" when absent.
std::string opencv_sample(const std::string& name);

// The object whose first box overlaps `where` most (intersection over the
// object's box), or nullptr.
const TrackedObject* object_at(const Report& report, const cv::Rect2f& where, int64_t frame);

// One of an object's per-look values at the look nearest `frame` where it is known.
double object_value(const TrackedObject& object, double TrackedSample::*value, int64_t frame);

}  // namespace clipwarden::test
