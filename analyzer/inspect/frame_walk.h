// One streaming pass over a clip that builds frame pairs only where they are
// wanted (inspect, and the HTML report's panels at the segments' worst
// frames). Only the previous frame is kept, so memory does not grow with
// the clip.
#pragma once

#include <cstdint>
#include <functional>
#include <set>
#include <string>

#include "analyzer/frame/frame_pair.h"
#include "clipwarden/analysis.h"
#include "clipwarden/clip_source.h"
#include "clipwarden/error.h"

namespace clipwarden {

struct FrameWalk {
  std::set<int64_t> pair_frames;  // build the pair (t-1, t) at each of these t >= 1
  bool decode_to_end = false;     // else stop after the last wanted pair frame
  // Every decoded frame, in order (may be null).
  std::function<void(const DecodedFrame&)> on_frame;
  // Each wanted pair, with planes and flow filled in (may be null).
  std::function<void(const FramePair&)> on_pair;
  // The wanted frame 0, which has no predecessor (may be null).
  std::function<void(const FramePlanes&)> on_first_frame;
};

struct FrameWalkResult {
  int64_t frames_decoded = 0;
  bool reached_end = false;  // the clip ended (frames_decoded is its frame count)
};

SourceOptions source_options(const AnalysisSettings& settings);

Expected<FrameWalkResult> walk_frames(const std::string& clip_path,
                                      const AnalysisSettings& settings, const FrameWalk& walk);

}  // namespace clipwarden
