// Where a clip's timestamps leave out frames, and whether the picture shows
// it. The stream's dropped_frames fact counts gaps in the timestamps alone;
// a camera file can stretch one frame's time without losing any picture (a
// variable-rate recorder that held a still scene, a capture that paused),
// so the policy reviews only gaps across which the picture jumps.
#pragma once

#include <cstdint>
#include <vector>

#include "clipwarden/report.h"

namespace clipwarden {

struct TimestampGap {
  int64_t frame = 0;          // the first frame after the gap
  int missing = 0;            // frames the gap leaves out (decode::missing_frames)
  bool picture_jumps = true;  // the picture changes across it as frames were lost
};

// The gaps between analysed frames. A gap's picture jumps when the share of
// pixels the optical flow cannot follow (occluded_pct) at its frame is at
// least twice, and at least 1 percentage point above, the median of the ten
// frames on either side: removing frames from moving footage makes the pair
// across the gap move further than its neighbours (measured 2026-12-05:
// 7.4% against 0.4-1.3% for four frames removed from a still-camera scene of
// two people, 7.3% against 0.5-2.2% in opencv-doc vtest.avi), while a
// stretched timestamp with no lost picture reads like its neighbours (0.75%
// against 0.58%). Without the occlusion series the timestamps decide.
std::vector<TimestampGap> timestamp_gaps(const Report& r);

}  // namespace clipwarden
