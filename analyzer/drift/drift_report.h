// Turning followed objects into report entries: sampled boxes and drift
// series, per-second rates, and the stretches where each object drifted.
#pragma once

#include <vector>

#include <nlohmann/json.hpp>

#include "analyzer/drift/object_track.h"
#include "clipwarden/report.h"

namespace clipwarden::drift {

// Hysteresis on an object's own drift series (same meaning as a policy
// SegmentRule: open at `enter`, close below `leave`, keep >= min_frames).
struct ObjectSegmentRule {
  double enter = 0.35;
  double leave = 0.25;
  int min_frames = 3;
  int merge_gap_frames = 5;
};

// The report entry for one object. `frame_width` and `frame_height` are the
// working size, for boxes given as fractions of the frame.
TrackedObject to_tracked_object(const ObjectTrack& object, int frame_width, int frame_height,
                                const ObjectSegmentRule& rule);

// Theil-Sen slope (median of pairwise slopes; Sen 1968) of y over t,
// skipping NaN values; 0 with fewer than two points.
double theil_sen_slope(const std::vector<double>& t, const std::vector<double>& y);

// Clip-level drift figures for summary.details["drift"].
nlohmann::json drift_summary(const std::vector<ObjectTrack>& objects);

}  // namespace clipwarden::drift
